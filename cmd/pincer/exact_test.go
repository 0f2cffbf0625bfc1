package main

import (
	"context"
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
)

type exactKeys struct {
	PlanValue   *float64 `json:"plan_value"`
	Nodes       *int     `json:"nodes"`
	OpenNodes   *int     `json:"open_nodes"`
	GlobalBound *float64 `json:"global_bound"`
	Proved      *bool    `json:"proved"`
	Stop        string   `json:"stop"`
	Tree        *struct {
		Depth  *int `json:"depth"`
		CutOff *int `json:"cut_off"`
		Fixed  *int `json:"fixed_by_reduced_cost"`
	} `json:"tree"`
	Rows []json.RawMessage `json:"rows"`
}

// TestExactReport: solve --exact writes the search's keys; a proof has
// no open nodes and a global bound equal to the plan value, for one and
// two workers alike; a node limit of 1 claims no proof unless the root
// closed, and its global bound stays on the bound side of the plan.
func TestExactReport(t *testing.T) {
	file := testdata("gap-c-5x30.txt")
	for _, sense := range []string{"min", "max"} {
		var first exactKeys
		for _, w := range []string{"1", "2"} {
			code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--sense", sense, "--exact", "--quiet",
				"--workers", w, "--report", "-", file)
			if code != exitOK {
				t.Fatalf("%s, %s workers: exit %d: %s", sense, w, code, errs)
			}
			var k exactKeys
			if err := json.Unmarshal([]byte(out), &k); err != nil {
				t.Fatal(err)
			}
			if k.Nodes == nil || k.OpenNodes == nil || k.GlobalBound == nil || k.Proved == nil || k.Tree == nil || k.Tree.Depth == nil || k.Tree.Fixed == nil || k.PlanValue == nil || len(k.Rows) == 0 {
				t.Fatalf("%s: report lacks search keys: %s", sense, out)
			}
			if !*k.Proved || *k.OpenNodes != 0 || *k.GlobalBound != *k.PlanValue || k.Stop != "search-closed" {
				t.Fatalf("%s: proved %v, open %d, global bound %v, plan %v, stop %s", sense, *k.Proved, *k.OpenNodes, *k.GlobalBound, *k.PlanValue, k.Stop)
			}
			if w == "1" {
				first = k
			} else if *k.Nodes != *first.Nodes || *k.PlanValue != *first.PlanValue {
				t.Fatalf("%s: 2 workers %d nodes plan %v, 1 worker %d nodes plan %v", sense, *k.Nodes, *k.PlanValue, *first.Nodes, *first.PlanValue)
			}
		}
		code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--sense", sense, "--exact", "--quiet",
			"--nodes", "1", "--report", "-", testdata("gap-d-10x200.txt"))
		if code != exitOK && code != exitNoPlan {
			t.Fatalf("node limit: exit %d: %s", code, errs)
		}
		var k exactKeys
		if err := json.Unmarshal([]byte(out), &k); err != nil {
			t.Fatal(err)
		}
		if *k.Nodes != 1 || (*k.Proved && *k.OpenNodes != 0) {
			t.Fatalf("node limit 1: %d nodes, proved %v, open %d", *k.Nodes, *k.Proved, *k.OpenNodes)
		}
		if k.PlanValue != nil && ((sense == "min" && *k.GlobalBound > *k.PlanValue) || (sense == "max" && *k.GlobalBound < *k.PlanValue)) {
			t.Fatalf("node limit: global bound %v beyond the plan %v", *k.GlobalBound, *k.PlanValue)
		}
	}
}

// TestExactNodeMemory: a node store of 64 KiB (about 30 open nodes of a
// 10 x 200 assignment instance) fills: nodes are dropped, no proof is
// claimed, the global bound stays on the bound side of the plan, the
// store's estimate stays within its bound, and the report says so.
func TestExactNodeMemory(t *testing.T) {
	code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--exact", "--quiet",
		"--nodes", "120", "--node-memory", "64KiB", "--report", "-", testdata("gap-d-10x200.txt"))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var k struct {
		exactKeys
		NodeMemory *int64 `json:"node_memory"`
		Tree       struct {
			Dropped   int   `json:"dropped"`
			OpenBytes int64 `json:"open_bytes"`
			PeakBytes int64 `json:"peak_bytes"`
		} `json:"tree"`
	}
	if err := json.Unmarshal([]byte(out), &k); err != nil {
		t.Fatal(err)
	}
	if k.NodeMemory == nil || *k.NodeMemory != 64<<10 {
		t.Fatalf("node_memory %v, want %d", k.NodeMemory, 64<<10)
	}
	if k.Tree.Dropped == 0 || *k.Proved || k.Tree.OpenBytes > 64<<10 || k.Tree.PeakBytes == 0 {
		t.Fatalf("dropped %d, proved %v, open bytes %d, peak %d", k.Tree.Dropped, *k.Proved, k.Tree.OpenBytes, k.Tree.PeakBytes)
	}
	if *k.GlobalBound > *k.PlanValue {
		t.Fatalf("global bound %v beyond the plan %v", *k.GlobalBound, *k.PlanValue)
	}
}

// TestExactRules: --rule reaches the node ascents: on a generated 3 x 10
// assignment instance every rule proves the same optimum and the report
// names the rule; boxstep on an instance with 200 coupling rows is
// refused (exit 2).
func TestExactRules(t *testing.T) {
	file := filepath.Join(t.TempDir(), "c3x10.txt")
	if code, _, errs := runCLI(t, context.Background(), "gen", "gap", "--type", "c", "--agents", "3", "--jobs", "10", "--seed", "5", "-o", file); code != exitOK {
		t.Fatalf("gen: exit %d: %s", code, errs)
	}
	var want *float64
	for _, rule := range []string{"subgradient", "deflected", "volume", "boxstep"} {
		code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--exact", "--quiet", "--rule", rule, "--report", "-", file)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", rule, code, errs)
		}
		var k struct {
			exactKeys
			NodeRule string `json:"node_rule"`
		}
		if err := json.Unmarshal([]byte(out), &k); err != nil {
			t.Fatal(err)
		}
		if !*k.Proved || k.NodeRule != rule || *k.GlobalBound != *k.PlanValue {
			t.Fatalf("%s: proved %v, node_rule %q, global bound %v, plan %v", rule, *k.Proved, k.NodeRule, *k.GlobalBound, *k.PlanValue)
		}
		if want == nil {
			want = k.PlanValue
		} else if *k.PlanValue != *want {
			t.Fatalf("%s: proved %v, subgradient proved %v", rule, *k.PlanValue, *want)
		}
	}
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--exact", "--quiet",
		"--rule", "boxstep", testdata("gap-d-10x200.txt"))
	if code != exitBadInput || !strings.Contains(errs, "--rule boxstep") {
		t.Fatalf("boxstep on 200 rows: exit %d, stderr %q", code, errs)
	}
}

// TestExactRefusals: --exact with a checkpoint, with a plot, or with bad
// limits is refused with exit 2 and the flag named.
func TestExactRefusals(t *testing.T) {
	file, err := filepath.Abs(testdata("gap-c-5x30.txt"))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--checkpoint", "x.ckpt"}, "--exact cannot be checkpointed"},
		{[]string{"--plot", "x.svg"}, "--plot"},
		{[]string{"--nodes", "-1"}, "--nodes -1"},
		{[]string{"--open-limit", "1"}, "--open-limit 1"},
		{[]string{"--batch", "0"}, "--batch 0"},
		{[]string{"--node-memory", "10KiB"}, `--node-memory "10KiB"`},
		{[]string{"--node-memory", "lots"}, `--node-memory "lots"`},
		{[]string{"--node-memory", "1.5GiB"}, `--node-memory "1.5GiB"`},
	} {
		t.Chdir(t.TempDir())
		args := append([]string{"solve", "--format", "gap-orlib", "--exact", "--quiet"}, c.args...)
		code, _, errs := runCLI(t, context.Background(), append(args, file)...)
		if code != exitBadInput || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d naming %q", c.args, code, errs, exitBadInput, c.want)
		}
	}
}
