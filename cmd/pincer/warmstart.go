package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"

	"github.com/spf13/cobra"

	"pincer/decomp"
	"pincer/instances"
)

// warmFlags is solve's --warm-start.
type warmFlags struct {
	path string
}

func (w *warmFlags) register(cmd *cobra.Command) {
	cmd.Flags().StringVar(&w.path, "warm-start", "", "start from the prices of an earlier JSON report of the same instance (rows matched by name; rows it lacks start at zero)")
}

func (w *warmFlags) check(resume string) error {
	if w.path == "" {
		return nil
	}
	if resume != "" {
		return badInput(errors.New("--warm-start and --resume: a resumed run keeps its own prices; give one of them"))
	}
	if _, err := os.Stat(w.path); err != nil {
		return badInput(fmt.Errorf("--warm-start %s: %w", w.path, err))
	}
	return nil
}

// warmJSON is what the report says about a warm start.
type warmJSON struct {
	File        string `json:"file"`
	RowsMatched int    `json:"rows_matched"`
	// RowsMissing are rows of this run the earlier report lacks (they
	// start at zero); RowsUnknown are rows of the report this run lacks.
	RowsMissing int `json:"rows_missing"`
	RowsUnknown int `json:"rows_unknown"`
}

// priorReport is the part of a report a warm start reads.
type priorReport struct {
	Format   string `json:"format"`
	Instance string `json:"instance"`
	Rows     []struct {
		Name  string   `json:"name"`
		Price *float64 `json:"price"`
	} `json:"rows"`
}

// applyWarmStart sets p.Prices from the report at path, matching rows by
// name. A report of another instance (by name) or format is refused.
func applyWarmStart(path, format string, m instances.Model, p *decomp.Problem) (*warmJSON, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, badInput(fmt.Errorf("--warm-start %s: %w", path, err))
	}
	var rep priorReport
	if err := json.Unmarshal(data, &rep); err != nil {
		return nil, badInput(fmt.Errorf("--warm-start %s: not a pincer JSON report: %w", path, err))
	}
	switch {
	case rep.Instance == "" || rep.Rows == nil:
		return nil, badInput(fmt.Errorf("--warm-start %s: not a pincer JSON report (no instance name or no rows)", path))
	case rep.Instance != m.Name():
		return nil, badInput(fmt.Errorf("--warm-start %s: the report is of instance %q, this run of %q", path, rep.Instance, m.Name()))
	case rep.Format != format:
		return nil, badInput(fmt.Errorf("--warm-start %s: the report is of format %s, this run of %s", path, rep.Format, format))
	}
	index := make(map[string]int, len(p.Rows))
	for r, row := range p.Rows {
		index[row.Name] = r
	}
	prices := make([]float64, len(p.Rows))
	seen := make([]bool, len(p.Rows))
	info := &warmJSON{File: path}
	for k, row := range rep.Rows {
		r, ok := index[row.Name]
		if !ok {
			info.RowsUnknown++
			continue
		}
		if seen[r] {
			return nil, badInput(fmt.Errorf("--warm-start %s: row %q appears twice (rows entry %d)", path, row.Name, k+1))
		}
		seen[r] = true
		if row.Price == nil || math.IsNaN(*row.Price) || math.IsInf(*row.Price, 0) {
			return nil, badInput(fmt.Errorf("--warm-start %s: row %q (rows entry %d) has no finite price", path, row.Name, k+1))
		}
		prices[r] = *row.Price
		info.RowsMatched++
	}
	info.RowsMissing = len(p.Rows) - info.RowsMatched
	if info.RowsMatched == 0 {
		return nil, badInput(fmt.Errorf("--warm-start %s: no row of the report is a row of this run", path))
	}
	// Prices of the wrong sign (another sense, say) are projected by the
	// engine; the bound stays valid whatever the start.
	p.Prices = prices
	return info, nil
}
