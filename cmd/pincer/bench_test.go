package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/xml"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/instances"
)

// TestReadManifestErrors: every fault names the line, column and field
// of the manifest and what was expected there.
func TestReadManifestErrors(t *testing.T) {
	head := "name,format,file,index,sense,options,reference,kind\n"
	cases := []struct {
		name, text       string
		line, col, token int
		expected         string
	}{
		{"empty", "", 1, 0, 0, "a header line"},
		{"no rows", head, 2, 0, 0, "at least one instance row"},
		{"unknown column", "name,format,file,refrence\n", 1, 18, 4, "a column name"},
		{"duplicate column", "name,format,file,name\n", 1, 18, 4, "each column once"},
		{"missing file column", "name,format\na,gap-orlib\n", 1, 0, 0, "columns name, format, file"},
		{"field count", head + "a,gap-orlib,f.txt,1,min,,1\n", 2, 26, 0, "8 fields"},
		{"empty name", head + ",gap-orlib,f.txt,1,min,,,\n", 2, 1, 1, "a name for the row"},
		{"duplicate name", head + "a,gap-orlib,f.txt,1,min,,,\na,gap-orlib,g.txt,1,min,,,\n", 3, 1, 1, "a name used once"},
		{"empty format", head + "a,,f.txt,1,min,,,\n", 2, 3, 2, "a format"},
		{"empty file", head + "a,gap-orlib,,1,min,,,\n", 2, 13, 3, "a file"},
		{"bad index", head + "a,gap-orlib,f.txt,0,min,,,\n", 2, 19, 4, "an index of at least 1"},
		{"bad sense", head + "a,gap-orlib,f.txt,1,maximum,,,\n", 2, 21, 5, "sense min or max"},
		{"bad options", head + "a,gap-orlib,f.txt,1,min,relax,,\n", 2, 25, 6, "options as key=value"},
		{"index in options", head + "a,gap-orlib,f.txt,1,min,index=2,,\n", 2, 25, 6, "options as key=value"},
		{"bad reference", head + "a,gap-orlib,f.txt,1,min,,12x,optimal\n", 2, 26, 7, "a reference value"},
		{"infinite reference", head + "a,gap-orlib,f.txt,1,min,,inf,optimal\n", 2, 26, 7, "a reference value"},
		{"missing kind", head + "a,gap-orlib,f.txt,1,min,,12,\n", 2, 29, 8, "the kind of the reference"},
		{"kind without reference", head + "a,gap-orlib,f.txt,1,min,,,optimal\n", 2, 27, 8, "an empty kind"},
		{"bad quote", head + "a,gap-orlib,\"f.txt,1,min,,,\n", 2, 0, 0, "a well-formed CSV record"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := readManifest(strings.NewReader(c.text), "m.csv")
			var pe *instances.ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("want a ParseError, got %v", err)
			}
			if pe.File != "m.csv" || pe.Line != c.line || (c.col > 0 && pe.Column != c.col) || pe.Token != c.token || !strings.HasPrefix(pe.Expected, c.expected) {
				t.Errorf("got %q (line %d col %d token %d), want line %d col %d token %d expected %q...",
					err, pe.Line, pe.Column, pe.Token, c.line, c.col, c.token, c.expected)
			}
		})
	}
}

// TestResolveErrors: options are checked against the family of the row's
// format, with the field's position; a format this build does not read
// is kept for a per-row error instead.
func TestResolveErrors(t *testing.T) {
	head := "name,format,file,index,sense,options,reference,kind\n"
	cases := []struct {
		name, row string
		col       int
		expected  string
	}{
		{"unknown option", "a,gap-orlib,f.txt,1,min,single-source=true,,", 25, "options of format gap-orlib"},
		{"bad option value", "a,gap-orlib,f.txt,1,min,relax=site,,", 25, "a value of option relax (one of knapsack, choice)"},
		{"sense the family lacks", "a,lotsizing-ttm,f.dat,,max,,,", 24, "an empty field (format lotsizing-ttm takes no sense)"},
		{"index the family lacks", "a,lotsizing-ttm,f.dat,2,,,,", 23, "an empty field (format lotsizing-ttm takes no index)"},
		{"sense out of range", "a,cflp-orlib,f.txt,,max,,,", 21, "a value of option sense"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, err := readManifest(strings.NewReader(head+c.row+"\n"), "m.csv")
			if err != nil {
				t.Fatal(err)
			}
			_, err = m.resolve(m.rows[0], "/data")
			var pe *instances.ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("want a ParseError, got %v", err)
			}
			if pe.Line != 2 || pe.Column != c.col || !strings.HasPrefix(pe.Expected, c.expected) {
				t.Errorf("got %q (line %d col %d), want line 2 col %d expected %q", err, pe.Line, pe.Column, c.col, c.expected)
			}
		})
	}
	m, err := readManifest(strings.NewReader(head+"w,no-such-format,wt40.txt,3,,,913,optimal\nc,gap-orlib,/abs/c.txt,2,max,relax=choice,,\n"), "m.csv")
	if err != nil {
		t.Fatal(err)
	}
	rr, err := m.resolve(m.rows[0], "/data")
	if err != nil || rr.unknown == nil || !strings.Contains(rr.unknown.Error(), "format no-such-format is not known to this build") {
		t.Errorf("unknown format: err %v, unknown %v", err, rr.unknown)
	}
	if rr.path != filepath.Join("/data", "wt40.txt") {
		t.Errorf("relative file placed at %s", rr.path)
	}
	rr, err = m.resolve(m.rows[1], "/data")
	if err != nil || rr.path != "/abs/c.txt" || rr.values.Int("index") != 2 || rr.values.String("sense") != "max" || rr.values.String("relax") != "choice" {
		t.Errorf("resolved %+v, %v", rr.values, err)
	}
}

// TestShippedManifests: every manifest in testdata/bench parses and
// resolves, and every file it names exists in the shared benchmarks
// folder (when present).
func TestShippedManifests(t *testing.T) {
	files, err := filepath.Glob("../../testdata/bench/*.csv")
	if err != nil || len(files) < 5 {
		t.Fatalf("manifests: %v %v", files, err)
	}
	root := filepath.Join("..", "..", "..", "shared", "benchmarks")
	if env := os.Getenv("PINCER_BENCHMARKS"); env != "" {
		root = env
	}
	_, statErr := os.Stat(root)
	for _, file := range files {
		b, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		m, err := readManifest(bytes.NewReader(b), file)
		if err != nil {
			t.Errorf("%v", err)
			continue
		}
		for _, row := range m.rows {
			rr, err := m.resolve(row, root)
			if err != nil {
				t.Errorf("%v", err)
				continue
			}
			if !row.hasReference {
				t.Errorf("%s:%d: %s has no reference value", file, row.line, row.name)
			}
			if statErr == nil {
				if _, err := os.Stat(rr.path); err != nil {
					t.Errorf("%s:%d: %s: %v", file, row.line, row.name, err)
				}
			}
		}
	}
	if statErr != nil {
		t.Logf("benchmark folder %s absent: file existence not checked", root)
	}
}

// TestBenchmarksRoot: --benchmarks, then $PINCER_BENCHMARKS, then the
// nearest shared/benchmarks above the manifest.
func TestBenchmarksRoot(t *testing.T) {
	dir := t.TempDir()
	shared := filepath.Join(dir, "shared", "benchmarks")
	nested := filepath.Join(dir, "repo", "testdata", "bench")
	for _, d := range []string{shared, nested} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	t.Setenv("PINCER_BENCHMARKS", "")
	got, err := benchmarksRoot("", filepath.Join(nested, "m.csv"))
	if err != nil || got != shared {
		t.Errorf("walk up: %q, %v; want %q", got, err, shared)
	}
	t.Setenv("PINCER_BENCHMARKS", nested)
	if got, err := benchmarksRoot("", filepath.Join(nested, "m.csv")); err != nil || got != nested {
		t.Errorf("environment: %q, %v", got, err)
	}
	if got, err := benchmarksRoot(dir, filepath.Join(nested, "m.csv")); err != nil || got != dir {
		t.Errorf("flag: %q, %v", got, err)
	}
	if _, err := benchmarksRoot(filepath.Join(dir, "absent"), "m.csv"); err == nil {
		t.Error("an absent --benchmarks folder was accepted")
	}
}

// TestParseCBC reads outputs captured from cbc 2.10.8 (testdata/cbc, see
// its README); the expected values are the ones printed in each file.
func TestParseCBC(t *testing.T) {
	cases := []struct {
		file          string
		status        string
		obj, bound    float64 // NaN: none
		resultPrinted bool
	}{
		{"optimal-min.txt", "optimal", 571, 571, true},
		{"optimal-max.txt", "optimal", -1208, -1208, true},
		{"optimal-fractional.txt", "optimal", 1040444.375, 1040444.375, true},
		{"time-limit.txt", "time-limit", 2838, 2799.432, true},
		{"time-limit-no-plan.txt", "time-limit", math.NaN(), 12419.959, true},
		{"infeasible-preprocessing.txt", "infeasible", math.NaN(), math.NaN(), false},
		{"guard-after-root.txt", "stopped", 2838, 2799.4316, false},
		{"guard-before-root.txt", "no-answer", math.NaN(), math.NaN(), false},
	}
	for _, c := range cases {
		b, err := os.ReadFile(filepath.Join("testdata", "cbc", c.file))
		if err != nil {
			t.Fatal(err)
		}
		p := parseCBC(string(b))
		same := func(got float64, has bool, want float64) bool {
			if math.IsNaN(want) {
				return !has
			}
			return has && got == want
		}
		if p.status != c.status || !same(p.objective, p.hasObjective, c.obj) || !same(p.bound, p.hasBound, c.bound) || (p.statusLine != "") != c.resultPrinted {
			t.Errorf("%s: got %+v, want status %s objective %v bound %v", c.file, p, c.status, c.obj, c.bound)
		}
	}
}

// benchManifest writes a manifest over the repository's testdata files.
func benchManifest(t *testing.T, rows ...string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "m.csv")
	text := "name,format,file,index,sense,options,reference,kind,source\n" + strings.Join(rows, "\n") + "\n"
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func readBenchCSV(t *testing.T, path string) []map[string]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("CSV not written: %v", err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, rec := range recs[1:] {
		m := map[string]string{}
		for k, h := range recs[0] {
			m[h] = rec[k]
		}
		out = append(out, m)
	}
	return out
}

// TestBenchEndToEnd runs a tiny manifest over testdata/gap-c-5x30.txt in
// both senses beside a row of an unknown format. The reference values
// 571 (min) and 1208 (max) were proved optimal by cbc 2.10.8 here
// (testdata/cbc/optimal-min.txt and optimal-max.txt).
func TestBenchEndToEnd(t *testing.T) {
	manifest := benchManifest(t,
		"c530-min,gap-orlib,gap-c-5x30.txt,1,min,,571,optimal,cbc 2.10.8",
		"c530-max,gap-orlib,gap-c-5x30.txt,1,max,relax=choice,1208,optimal,cbc 2.10.8",
		"wt-1,wt-orlib-future,wt40.txt,1,,,913,optimal,not in this build",
	)
	dir := t.TempDir()
	csvPath, chart := filepath.Join(dir, "out.csv"), filepath.Join(dir, "out.svg")
	args := []string{"bench", manifest, "--benchmarks", "../../testdata", "--time", "1s", "--workers", "2", "--csv", csvPath, "--chart", chart}
	_, cbcErr := exec.LookPath("cbc")
	if cbcErr == nil {
		args = append(args, "--peer", "cbc")
	}
	code, out, errs := runCLI(t, context.Background(), args...)
	if code != exitBadInput || !strings.Contains(errs, "1 of 3 runs could not start") {
		t.Fatalf("exit %d (want 2 for the unknown format), stderr %s", code, errs)
	}
	if !strings.Contains(out, "format wt-orlib-future is not known to this build") || !strings.Contains(out, "c530-max") {
		t.Errorf("table:\n%s", out)
	}
	if got := strings.Count(errs, "bench "); got < 3 {
		t.Errorf("want one progress line per row off a terminal, got:\n%s", errs)
	}
	rows := readBenchCSV(t, csvPath)
	if len(rows) != 3 {
		t.Fatalf("%d CSV rows", len(rows))
	}
	for k, want := range []struct {
		ref   float64
		sense string
	}{{571, "min"}, {1208, "max"}} {
		r := rows[k]
		plan, err1 := strconv.ParseFloat(r["plan"], 64)
		bound, err2 := strconv.ParseFloat(r["bound"], 64)
		if err1 != nil || err2 != nil || r["status"] != "done" || r["sense"] != want.sense || r["threads"] != "2" {
			t.Fatalf("row %d: %v", k, r)
		}
		// The plan can be no better than the optimum, the bound no tighter.
		if want.sense == "min" && (plan < want.ref || bound > want.ref+1e-6) || want.sense == "max" && (plan > want.ref || bound < want.ref-1e-6) {
			t.Errorf("row %d: plan %v bound %v against optimum %v", k, plan, bound, want.ref)
		}
		dev, _ := strconv.ParseFloat(r["deviation"], 64)
		wantDev := (plan - want.ref) / want.ref
		if want.sense == "max" {
			wantDev = -wantDev
		}
		if math.Abs(dev-wantDev) > 1e-5 || dev < 0 || r["conflicts"] != "" {
			t.Errorf("row %d: deviation %v, want %v; conflicts %q", k, dev, wantDev, r["conflicts"])
		}
		if cbcErr == nil {
			// cbc proves these small instances well within the limit on a
			// quiet machine; on a loaded one it may stop at the limit, and
			// then only its bound's side is checked.
			if r["cbc_threads"] != "2" {
				t.Errorf("row %d: cbc columns %v", k, r)
			}
			switch r["cbc_status"] {
			case "optimal":
				if r["cbc_plan"] != instances.FormatNumber(want.ref) || r["cbc_deviation"] != "0" {
					t.Errorf("row %d: cbc proved optimal but its columns say %v", k, r)
				}
			default:
				if cb, err := strconv.ParseFloat(r["cbc_bound"], 64); err == nil &&
					(want.sense == "min" && cb > want.ref+1e-6 || want.sense == "max" && cb < want.ref-1e-6) {
					t.Errorf("row %d: cbc bound %v passes the optimum %v", k, cb, want.ref)
				}
			}
		}
	}
	if rows[2]["status"] != "error" || !strings.Contains(rows[2]["note"], "not known to this build") {
		t.Errorf("unknown format row: %v", rows[2])
	}
	if cbcErr != nil {
		t.Logf("cbc not installed: the peer columns were not checked (%v)", cbcErr)
	}
	checkBenchSVG(t, chart, "c530-min", "c530-max")
}

// checkBenchSVG parses the chart as XML and looks for the instance names.
func checkBenchSVG(t *testing.T, path string, names ...string) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("chart not written: %v", err)
	}
	d := xml.NewDecoder(bytes.NewReader(b))
	var texts []string
	for {
		tok, err := d.Token()
		if err != nil {
			if err.Error() != "EOF" {
				t.Fatalf("chart is not XML: %v", err)
			}
			break
		}
		if cd, ok := tok.(xml.CharData); ok {
			texts = append(texts, string(cd))
		}
	}
	all := strings.Join(texts, " ")
	for _, n := range names {
		if !strings.Contains(all, n) {
			t.Errorf("chart has no label %s", n)
		}
	}
}

// TestBenchInterruptKeepsRows: Ctrl-C during the second row stops it with
// its best plan and bound; the table, CSV and chart hold the two rows
// run, the third is not started, and the exit code is 130.
func TestBenchInterruptKeepsRows(t *testing.T) {
	manifest := benchManifest(t,
		"c530,gap-orlib,gap-c-5x30.txt,1,min,,571,optimal,cbc 2.10.8",
		"d10200,gap-orlib,gap-d-10x200.txt,1,min,,,,",
		"c530-again,gap-orlib,gap-c-5x30.txt,1,max,,,,",
	)
	dir := t.TempDir()
	csvPath, chart := filepath.Join(dir, "out.csv"), filepath.Join(dir, "out.svg")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	// A time limit is a budget: the first row runs its whole limit, so the
	// limit is short; the second is interrupted 0.3 s after it starts.
	f := benchFlags{time: 3 * time.Second, workers: 1, rule: []string{"subgradient"}, gap: 0, seed: 1, csv: csvPath, chart: chart, benchmarks: "../../testdata"}
	f.onRow = func(k int) {
		if k == 1 {
			time.AfterFunc(300*time.Millisecond, cancel)
		}
	}
	var out, errs bytes.Buffer
	start := time.Now()
	err := runBench(ctx, &out, &errs, &f, manifest)
	var ee *exitError
	if !errors.As(err, &ee) || ee.code != exitInterrupted {
		t.Fatalf("want exit 130, got %v\n%s", err, errs.String())
	}
	if el := time.Since(start); el > 15*time.Second {
		t.Errorf("the interrupted row ran on for %v", el)
	}
	rows := readBenchCSV(t, csvPath)
	if len(rows) != 2 || rows[0]["status"] != "done" || rows[1]["status"] != "interrupted" || rows[1]["stop"] != "interrupted" {
		t.Fatalf("CSV rows: %v", rows)
	}
	if rows[1]["plan"] == "" || rows[1]["bound"] == "" {
		t.Errorf("the interrupted row lost its best plan or bound: %v", rows[1])
	}
	if !strings.Contains(out.String(), "Interrupted: 2 of 3 runs done") || strings.Contains(out.String(), "c530-again") {
		t.Errorf("table:\n%s", out.String())
	}
	checkBenchSVG(t, chart, "c530", "d10200")
}

// TestBenchFlags: bad flag values exit 2 before anything runs, and so do
// a manifest that does not parse and a relative file with no benchmarks
// folder.
func TestBenchFlags(t *testing.T) {
	manifest := benchManifest(t, "c530,gap-orlib,gap-c-5x30.txt,1,min,,571,optimal,")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--time", "0s"}, "--time 0s: want more than 0"},
		{[]string{"--peer", "other"}, "--peer other: want cbc"},
		{[]string{"--workers", "0"}, "--workers 0: want at least 1"},
		{[]string{"--rule", "fastest"}, "--rule fastest: want one of"},
		{[]string{"--rule", "volume,volume"}, "--rule volume: the rule is given twice"},
		{[]string{"--marks", "1s,x"}, `--marks 1s,x: "x" is not a duration`},
		{[]string{"--marks", "0s"}, "want a duration more than 0"},
		{[]string{"--marks", "20s"}, "20s is past --time 10s"},
		{[]string{"--chart", "-"}, "--chart -: the chart must go to a file"},
		{[]string{"--csv", t.TempDir()}, "is a folder"},
	} {
		code, _, errs := runCLI(t, context.Background(), append([]string{"bench", manifest, "--benchmarks", "../../testdata"}, c.args...)...)
		if code != exitBadInput || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q", c.args, code, errs)
		}
	}
	bad := filepath.Join(t.TempDir(), "bad.csv")
	os.WriteFile(bad, []byte("name,format,file\nx,gap-orlib,\n"), 0o644)
	if code, _, errs := runCLI(t, context.Background(), "bench", bad, "--benchmarks", "."); code != exitBadInput || !strings.Contains(errs, "bad.csv:2:13: token 3: expected a file") {
		t.Errorf("bad manifest: exit %d, %q", code, errs)
	}
	lone := filepath.Join(t.TempDir(), "lone.csv")
	os.WriteFile(lone, []byte("name,format,file\nx,gap-orlib,gap-c-5x30.txt\n"), 0o644)
	t.Setenv("PINCER_BENCHMARKS", "")
	if code, _, errs := runCLI(t, context.Background(), "bench", lone); code != exitBadInput || !strings.Contains(errs, "no benchmarks folder was found") {
		t.Errorf("no root: exit %d, %q", code, errs)
	}
}

// TestBenchProgressBar: on a terminal the bar shows rows done of the
// total; the test renders it into a buffer.
func TestBenchProgressBar(t *testing.T) {
	var b bytes.Buffer
	p := &benchProgress{w: &b, total: 2, bar: newBenchBar(&b, 2)}
	for _, name := range []string{"c530", "d10200"} {
		p.start(name)
		p.finish(&benchResult{row: resolvedRow{manifestRow: manifestRow{name: name}}, status: "done"})
	}
	p.done()
	if s := b.String(); !strings.Contains(s, "2/2") || !strings.Contains(s, "d10200") || !strings.Contains(s, "100%") {
		t.Errorf("bar output %q", s)
	}
}

// TestBenchChartDeterministic: the same rows give the same SVG.
func TestBenchChartDeterministic(t *testing.T) {
	rows := []*benchResult{
		{row: resolvedRow{manifestRow: manifestRow{name: "a", reference: 100, hasReference: true, kind: "optimal"}}, status: "done", plan: 101, hasPlan: true,
			peer: &peerOutcome{status: "time-limit", plan: 103, hasPlan: true}},
		{row: resolvedRow{manifestRow: manifestRow{name: "b"}}, status: "error", note: "no file"},
	}
	var x, y bytes.Buffer
	if err := writeBenchChart(&x, "m.csv", true, false, rows); err != nil {
		t.Fatal(err)
	}
	if err := writeBenchChart(&y, "m.csv", true, false, rows); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(x.Bytes(), y.Bytes()) || !strings.Contains(x.String(), ">a<") {
		t.Error("the chart differs between two writes of the same rows, or lacks a label")
	}
}

// TestConflicts: a bound past an optimal value and a plan below it are
// both reported, in the row's sense.
func TestConflicts(t *testing.T) {
	row := func(kind string, ref float64) resolvedRow {
		return resolvedRow{manifestRow: manifestRow{name: "x", reference: ref, hasReference: true, kind: kind}}
	}
	r := &benchResult{row: row("optimal", 100), status: "done", plan: 99, hasPlan: true, bound: 100.5, hasBound: true}
	if c := conflicts(r); len(c) != 2 {
		t.Errorf("min: %v", c)
	}
	r.sense = decomp.Maximise //: plan 99 below, bound 100.5 above the optimum 100 is fine
	if c := conflicts(r); len(c) != 0 {
		t.Errorf("max: %v", c)
	}
	r = &benchResult{row: row("best-known", 100), status: "done", plan: 98, hasPlan: true, bound: 97, hasBound: true}
	if c := conflicts(r); len(c) != 0 {
		t.Errorf("a plan better than a best-known value is news, not a conflict: %v", c)
	}
}

// FuzzReadManifest: the manifest reader and the row check never panic,
// and every fault they report is a ParseError with a position.
func FuzzReadManifest(f *testing.F) {
	f.Add([]byte("name,format,file,index,sense,options,reference,kind\nc,gap-orlib,gap/c.txt,1,min,relax=choice,571,optimal\n"))
	f.Add([]byte("# comment\nname,format,file\nw,wt-orlib,wt40.txt\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		m, err := readManifest(bytes.NewReader(b), "fuzz.csv")
		if err != nil {
			var pe *instances.ParseError
			if !errors.As(err, &pe) || pe.File != "fuzz.csv" {
				t.Fatalf("not a ParseError: %v", err)
			}
			return
		}
		for _, row := range m.rows {
			if _, err := m.resolve(row, "/data"); err != nil {
				var pe *instances.ParseError
				if !errors.As(err, &pe) || pe.Line < 1 {
					t.Fatalf("not a ParseError with a line: %v", err)
				}
			}
		}
	})
}

// fakeCBC writes a shell script that prints text and then sleeps, standing
// in for cbc where the test is about the bench's handling of its output.
func fakeCBC(t *testing.T, text string, sleep int) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "cbc")
	script := "#!/bin/sh\ncat <<'END'\n" + text + "\nEND\n"
	if sleep > 0 {
		script += "exec sleep " + strconv.Itoa(sleep) + "\n"
	}
	if err := os.WriteFile(path, []byte(script), 0o755); err != nil {
		t.Fatal(err)
	}
	return path
}

func loadGapTestdata(t *testing.T, sense string) instances.Model {
	t.Helper()
	e, err := findFormat("gap-orlib")
	if err != nil {
		t.Fatal(err)
	}
	v, err := instances.Defaults(e.fam.Options())
	if err != nil {
		t.Fatal(err)
	}
	v["sense"] = sense
	m, err := e.fam.Load("gap-orlib", "../../testdata/gap-c-5x30.txt", v)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestRunCBCSenseAndGuard: a maximisation model's values come back with
// the sign turned (the MPS minimises the negated profit), and a peer that
// overruns its limit is stopped by the guard with what it printed kept.
func TestRunCBCSenseAndGuard(t *testing.T) {
	if _, err := exec.LookPath("sh"); err != nil {
		t.Skip("no shell for the stand-in solver")
	}
	optimal := "Result - Optimal solution found\n\nObjective value:                -1208.00000000\n"
	o := runCBC(context.Background(), fakeCBC(t, optimal, 0), loadGapTestdata(t, "max"), time.Second, time.Second, 2)
	if o.status != "optimal" || o.plan != 1208 || o.bound != 1208 || o.threads != 2 {
		t.Errorf("max: %+v", o)
	}
	progress := "Cbc0010I After 0 nodes, 1 on tree, 2838 best solution, best possible 2799.4316 (3.14 seconds)"
	start := time.Now()
	o = runCBC(context.Background(), fakeCBC(t, progress, 60), loadGapTestdata(t, "min"), 500*time.Millisecond, time.Second, 1)
	if el := time.Since(start); el > 10*time.Second {
		t.Errorf("the guard took %v", el)
	}
	if o.status != "guard" || o.plan != 2838 || o.bound != 2799.4316 || o.seconds < 1.4 {
		t.Errorf("guard: %+v", o)
	}
}

// TestPct: deviations print signed, and rounding noise prints as zero.
func TestPct(t *testing.T) {
	for v, want := range map[float64]string{1e-12: "0.000 %", -1e-12: "0.000 %", 0.00123: "+0.123 %", -0.5: "-50.000 %", math.NaN(): "-"} {
		if got := pct(v); got != want {
			t.Errorf("pct(%v) = %q, want %q", v, got, want)
		}
	}
}

// TestRunCBCInterrupted: Ctrl-C while the peer runs stops it promptly and
// keeps what it printed.
func TestRunCBCInterrupted(t *testing.T) {
	if _, err := exec.LookPath("sh"); err != nil {
		t.Skip("no shell for the stand-in solver")
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	time.AfterFunc(time.Second, cancel)
	progress := "Cbc0012I Integer solution of 2838 found by feasibility pump after 0 iterations and 0 nodes (2.29 seconds)"
	start := time.Now()
	o := runCBC(ctx, fakeCBC(t, progress, 60), loadGapTestdata(t, "min"), 30*time.Second, time.Second, 1)
	if el := time.Since(start); el > 10*time.Second {
		t.Errorf("the interrupted peer ran on for %v", el)
	}
	if o.status != "stopped" || o.note != "interrupted" || o.plan != 2838 || o.hasBound {
		t.Errorf("interrupted: %+v", o)
	}
}

// TestBenchRuleTooLarge: a price rule a row's problem is too large for is
// that row's error, not the whole bench's.
func TestBenchRuleTooLarge(t *testing.T) {
	manifest := benchManifest(t, "d10200,gap-orlib,gap-d-10x200.txt,1,min,,,,")
	code, out, _ := runCLI(t, context.Background(), "bench", manifest, "--benchmarks", "../../testdata", "--time", "1s", "--rule", "boxstep")
	if code != exitBadInput || !strings.Contains(out, "--rule boxstep: ") || !strings.Contains(out, "coupling rows") {
		t.Errorf("exit %d, table:\n%s", code, out)
	}
}
