// Package gap holds the generalized assignment problem (GAP) as plain data:
// m agents, n jobs, a value c_ij and a resource use a_ij for giving job j to
// agent i, and a capacity b_i per agent. Every job goes to exactly one agent
// and no agent may use more than its capacity.
//
// In the pincer flow (file -> family model -> engine problem -> rounds ->
// result -> report) this package is the file and family-model end for GAP:
// it reads the public benchmark layouts ([ReadORLib], [ReadFile]), writes
// them back ([WriteORLib]), generates new instances by the published recipes
// ([Generate]), exports a mixed-integer model for outside solvers
// ([WriteMPS]), reads and writes assignment plans ([WritePlanCSV],
// [ReadPlanCSV]) and checks a plan by a separate, solver-free code path
// ([Verify]). The engine wiring that turns an [Instance] into a decomposed
// problem lives beside these files but does not depend on them for checking.
//
// Agents and jobs are 0-based in Go values (Cost[i][j], plan[j] = i) and
// 1-based wherever a person reads them (plan files, messages, MPS names), as
// in the literature.
package gap
