// Package cflp holds the capacitated facility location family: candidate
// sites with a capacity and a fixed opening cost, customers with a demand,
// and a cost for serving each customer's whole demand from each site.
//
// The model is
//
//	minimise   Σ_i f_i y_i + Σ_i Σ_j c_ij x_ij
//	subject to Σ_i x_ij = 1               for every customer j
//	           Σ_j d_j x_ij ≤ s_i y_i     for every site i
//	           x_ij ≤ y_i,  y_i ∈ {0,1}
//
// where x_ij ∈ [0,1] is the share of customer j's demand served by site i
// (split demand) or x_ij ∈ {0,1} (single source). A site may be forced open or
// forced closed, and a lane (site, customer) may be forbidden.
//
// In the pincer flow this package is the first two steps: it turns files into
// the family model [Instance] (OR-Library capacitated warehouse files with
// [ReadORLib], a folder of CSV files with [ReadScenario], or random data with
// [Generate]), and [NewProblem] wires it into the engine: one block per site
// (or one block over all sites that also keeps the aggregate capacity row),
// priced demand rows, and a repair that allocates exactly with the
// transportation solver and searches the set of open sites. After the
// rounds, the result is reported with [WritePlanCSV] and [WriteSitesCSV],
// and any plan, whoever produced it, can be checked by [Verify], which shares
// no code with the engine. [WriteMPS] exports the model for a general-purpose
// solver, which tests use as an oracle.
package cflp
