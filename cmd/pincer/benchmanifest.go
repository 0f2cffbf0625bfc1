package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"pincer/instances"
)

// A bench manifest is a CSV file, one instance per row, with a header
// naming the columns (any order; lines starting with # are comments):
//
//	name       unique label of the row (required)
//	format     a --format value (required)
//	file       the instance file or folder, relative to the benchmarks
//	           root unless absolute (required)
//	index      the family's index option (empty: the family's default)
//	sense      min or max (empty: the family's default)
//	options    other family options, key=value;key=value
//	reference  a published or otherwise known value (empty: none)
//	kind       what the reference is: optimal, best-known or bound
//	           (required with a reference)
//	source     where the reference comes from (free text, not read)
//
// The reader checks only what the manifest itself says; resolve checks a
// row against the family of its format.

// manifestColumns are the columns a manifest may have, the required first.
func manifestColumns() []string {
	return []string{"name", "format", "file", "index", "sense", "options", "reference", "kind", "source"}
}

const requiredColumns = 3

// referenceKinds are the allowed values of the kind column.
func referenceKinds() []string { return []string{"optimal", "best-known", "bound"} }

// fieldPos is where a field of the manifest sits.
type fieldPos struct {
	line, column, token int
}

// manifestOption is one key=value of the options column.
type manifestOption struct {
	key, value string
}

// manifestRow is one instance of a manifest, as written there.
type manifestRow struct {
	line         int
	name         string
	format       string
	file         string
	index        string
	sense        string
	options      []manifestOption
	reference    float64
	hasReference bool
	kind         string
	pos          map[string]fieldPos
}

// manifest is a read manifest.
type manifest struct {
	file string
	rows []manifestRow
}

// readManifest reads a manifest; every fault is an *instances.ParseError
// naming the file, line, column and what was expected.
func readManifest(r io.Reader, file string) (*manifest, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1 // checked here, with a clearer message
	fail := func(line, col, token int, expected string, err error) error {
		return &instances.ParseError{File: file, Line: line, Column: col, Token: token, Expected: expected, Err: err}
	}
	csvFail := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return fail(pe.Line, pe.Column, 0, "a well-formed CSV record", pe.Err)
		}
		return fail(0, 0, 0, "a readable CSV file", err)
	}
	header, err := cr.Read()
	if err == io.EOF {
		return nil, fail(1, 0, 0, "a header line naming the columns ("+strings.Join(manifestColumns(), ",")+")", errors.New("the file is empty"))
	}
	if err != nil {
		return nil, csvFail(err)
	}
	hline, _ := cr.FieldPos(0)
	at := map[string]int{}
	for k, h := range header {
		name := strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		_, col := cr.FieldPos(k)
		if !slices.Contains(manifestColumns(), name) {
			return nil, fail(hline, col, k+1, "a column name, one of "+strings.Join(manifestColumns(), ", "), fmt.Errorf("got %q", h))
		}
		if prev, dup := at[name]; dup {
			return nil, fail(hline, col, k+1, "each column once", fmt.Errorf("%s is also column %d", name, prev+1))
		}
		at[name] = k
	}
	for _, req := range manifestColumns()[:requiredColumns] {
		if _, ok := at[req]; !ok {
			return nil, fail(hline, 0, 0, "columns "+strings.Join(manifestColumns()[:requiredColumns], ", ")+" in the header", fmt.Errorf("no %s column", req))
		}
	}
	m := &manifest{file: file}
	names := map[string]int{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvFail(err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(header) {
			col := 0
			if len(rec) > 0 {
				_, col = cr.FieldPos(len(rec) - 1)
			}
			return nil, fail(line, col, 0, fmt.Sprintf("%d fields, as in the header", len(header)), fmt.Errorf("got %d", len(rec)))
		}
		row := manifestRow{line: line, pos: map[string]fieldPos{}}
		get := func(col string) (string, fieldPos) {
			k, ok := at[col]
			if !ok {
				return "", fieldPos{line: line}
			}
			l, c := cr.FieldPos(k)
			p := fieldPos{line: l, column: c, token: k + 1}
			row.pos[col] = p
			return strings.TrimSpace(rec[k]), p
		}
		bad := func(p fieldPos, expected string, err error) error {
			return fail(p.line, p.column, p.token, expected, err)
		}
		var p fieldPos
		row.name, p = get("name")
		if row.name == "" {
			return nil, bad(p, "a name for the row", errors.New("the field is empty"))
		}
		if first, dup := names[row.name]; dup {
			return nil, bad(p, "a name used once", fmt.Errorf("%q is also the name on line %d", row.name, first))
		}
		names[row.name] = line
		if row.format, p = get("format"); row.format == "" {
			return nil, bad(p, "a format (one of "+strings.Join(formatNames(), ", ")+")", errors.New("the field is empty"))
		}
		if row.file, p = get("file"); row.file == "" {
			return nil, bad(p, "a file, relative to the benchmarks folder", errors.New("the field is empty"))
		}
		if row.index, p = get("index"); row.index != "" {
			if n, err := strconv.Atoi(row.index); err != nil || n < 1 {
				return nil, bad(p, "an index of at least 1, or an empty field", fmt.Errorf("got %q", row.index))
			}
		}
		if row.sense, p = get("sense"); row.sense != "" && row.sense != "min" && row.sense != "max" {
			return nil, bad(p, "sense min or max, or an empty field", fmt.Errorf("got %q", row.sense))
		}
		var opts string
		if opts, p = get("options"); opts != "" {
			if row.options, err = parseManifestOptions(opts); err != nil {
				return nil, bad(p, "options as key=value;key=value", err)
			}
		}
		var ref string
		if ref, p = get("reference"); ref != "" {
			v, err := strconv.ParseFloat(ref, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, bad(p, "a reference value (a finite number) or an empty field", fmt.Errorf("got %q", ref))
			}
			row.reference, row.hasReference = v, true
		}
		row.kind, p = get("kind")
		switch {
		case row.hasReference && !slices.Contains(referenceKinds(), row.kind):
			return nil, bad(p, "the kind of the reference, one of "+strings.Join(referenceKinds(), ", "), fmt.Errorf("got %q", row.kind))
		case !row.hasReference && row.kind != "":
			return nil, bad(p, "an empty kind (the row has no reference value)", fmt.Errorf("got %q", row.kind))
		}
		m.rows = append(m.rows, row)
	}
	if len(m.rows) == 0 {
		return nil, fail(hline+1, 0, 0, "at least one instance row after the header", errors.New("none found"))
	}
	return m, nil
}

// parseManifestOptions splits key=value;key=value. The index and sense
// options have columns of their own.
func parseManifestOptions(s string) ([]manifestOption, error) {
	var out []manifestOption
	for _, part := range strings.Split(s, ";") {
		part = strings.TrimSpace(part)
		if part == "" {
			continue
		}
		k, v, ok := strings.Cut(part, "=")
		k, v = strings.TrimSpace(k), strings.TrimSpace(v)
		switch {
		case !ok || k == "":
			return nil, fmt.Errorf("got %q", part)
		case k == "index" || k == "sense":
			return nil, fmt.Errorf("%s has a column of its own", k)
		case slices.ContainsFunc(out, func(o manifestOption) bool { return o.key == k }):
			return nil, fmt.Errorf("%s is given twice", k)
		}
		out = append(out, manifestOption{k, v})
	}
	return out, nil
}

// errUnknownFormat marks a row whose format this build does not read; the
// bench reports the row and runs the others.
var errUnknownFormat = errors.New("format not known")

// resolvedRow is a manifest row checked against its family.
type resolvedRow struct {
	manifestRow
	entry  formatEntry
	values instances.Values
	path   string
	// unknown, when set, says why the row cannot run in this build.
	unknown error
}

// resolve checks a row's options against the family of its format and
// places its file under root. A format this build does not know is not a
// fault of the manifest: the row is kept, marked with unknown.
func (m *manifest) resolve(row manifestRow, root string) (resolvedRow, error) {
	out := resolvedRow{manifestRow: row}
	path := row.file
	if !filepath.IsAbs(path) {
		path = filepath.Join(root, filepath.FromSlash(path))
	}
	out.path = path
	e, err := findFormat(row.format)
	if err != nil {
		out.unknown = fmt.Errorf("format %s is not known to this build (known: %s): %w", row.format, strings.Join(formatNames(), ", "), errUnknownFormat)
		return out, nil
	}
	out.entry = e
	opts := e.fam.Options()
	v, err := instances.Defaults(opts)
	if err != nil {
		return out, fmt.Errorf("format %s: %w", row.format, err)
	}
	fail := func(col, expected string, err error) error {
		p := row.pos[col]
		return &instances.ParseError{File: m.file, Line: p.line, Column: p.column, Token: p.token, Expected: expected, Err: err}
	}
	set := func(col, key, value string) error {
		k := slices.IndexFunc(opts, func(o instances.Option) bool { return o.Name == key })
		if k < 0 {
			var names []string
			for _, o := range opts {
				if o.Name != "index" && o.Name != "sense" {
					names = append(names, o.Name)
				}
			}
			if col != "options" {
				return fail(col, "an empty field (format "+row.format+" takes no "+key+")", fmt.Errorf("got %q", value))
			}
			return fail(col, "options of format "+row.format+" ("+strings.Join(names, ", ")+")", fmt.Errorf("unknown option %q", key))
		}
		x, err := opts[k].Parse(value)
		if err != nil {
			return fail(col, "a value of option "+key+" ("+opts[k].Range()+")", fmt.Errorf("got %q", value))
		}
		v[key] = x
		return nil
	}
	if row.index != "" {
		if err := set("index", "index", row.index); err != nil {
			return out, err
		}
	}
	if row.sense != "" {
		if err := set("sense", "sense", row.sense); err != nil {
			return out, err
		}
	}
	for _, o := range row.options {
		if err := set("options", o.key, o.value); err != nil {
			return out, err
		}
	}
	out.values = v
	return out, nil
}

// benchmarksRoot finds the folder that manifest paths are relative to:
// flag, else $PINCER_BENCHMARKS, else the nearest shared/benchmarks found
// walking up from the manifest's folder. It returns "" when none is found.
func benchmarksRoot(flag, manifestPath string) (string, error) {
	check := func(what, dir string) (string, error) {
		st, err := os.Stat(dir)
		if err != nil {
			return "", badInput(fmt.Errorf("%s %s: %w", what, dir, err))
		}
		if !st.IsDir() {
			return "", badInput(fmt.Errorf("%s %s: is not a folder", what, dir))
		}
		return dir, nil
	}
	if flag != "" {
		return check("--benchmarks", flag)
	}
	if env := os.Getenv("PINCER_BENCHMARKS"); env != "" {
		return check("$PINCER_BENCHMARKS", env)
	}
	dir, err := filepath.Abs(filepath.Dir(manifestPath))
	if err != nil {
		return "", badInput(err)
	}
	for {
		cand := filepath.Join(dir, "shared", "benchmarks")
		if st, err := os.Stat(cand); err == nil && st.IsDir() {
			return cand, nil
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "", nil
		}
		dir = parent
	}
}
