package main

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pincer/decomp"
)

// checkpointFlags are solve's --checkpoint, --checkpoint-every and --resume.
type checkpointFlags struct {
	path   string
	every  time.Duration
	resume string
}

func (c *checkpointFlags) register(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.StringVar(&c.path, "checkpoint", "", "save the run's state to this file (atomically) as it goes and when it stops early, so that --resume can continue it")
	fl.DurationVar(&c.every, "checkpoint-every", 30*time.Second, "wall time between checkpoints (more than 0)")
	fl.StringVar(&c.resume, "resume", "", "continue the run saved in this checkpoint file (same instance and settings)")
}

func (c *checkpointFlags) check() error {
	if c.every <= 0 {
		return badInput(fmt.Errorf("--checkpoint-every %v: want a duration more than 0", c.every))
	}
	if c.path == stdoutPath {
		return badInput(errors.New("--checkpoint -: a checkpoint must go to a file, not standard output"))
	}
	if c.resume != "" {
		if _, err := os.Stat(c.resume); err != nil {
			return badInput(fmt.Errorf("--resume %s: %w", c.resume, err))
		}
	}
	return checkWritable("--checkpoint", c.path)
}

// instanceHash is the SHA-256 of the input: the file's bytes, or for a
// folder the names and bytes of its regular files in name order.
func instanceHash(path string) (string, error) {
	h := sha256.New()
	st, err := os.Stat(path)
	if err != nil {
		return "", err
	}
	files := []string{path}
	if st.IsDir() {
		entries, err := os.ReadDir(path)
		if err != nil {
			return "", err
		}
		files = files[:0]
		for _, e := range entries {
			if e.Type().IsRegular() {
				files = append(files, filepath.Join(path, e.Name()))
			}
		}
		sort.Strings(files)
	}
	for _, name := range files {
		f, err := os.Open(name)
		if err != nil {
			return "", err
		}
		fmt.Fprintf(h, "%s\x00", filepath.Base(name))
		_, err = io.Copy(h, f)
		f.Close()
		if err != nil {
			return "", err
		}
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// runFingerprint lists the settings that shape a run's outcome: the format,
// every model option and the engine's limits other than time (a time limit
// ends a run but does not change what its rounds compute; the worker count
// never does).
func runFingerprint(f *runFlags) string {
	var parts []string
	parts = append(parts, "format="+f.format)
	vals := f.opts.values()
	names := make([]string, 0, len(vals))
	for n := range vals {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		parts = append(parts, fmt.Sprintf("%s=%v", n, vals[n]))
	}
	parts = append(parts,
		fmt.Sprintf("rounds=%d", f.rounds), fmt.Sprintf("gap=%v", f.gap), fmt.Sprintf("seed=%d", f.seed),
		fmt.Sprintf("repair-every=%d", f.repairEvery), stallSetting(f))
	rule := f.ruleUsed // the rule the run uses, given or chosen
	if rule == "" {
		rule = f.rule
	}
	if rule != "" && rule != decomp.Rules()[0] {
		// The engine's default rule is left out, so checkpoints written
		// before rules could be chosen still match.
		parts = append(parts, "rule="+rule)
	}
	return strings.Join(parts, " ")
}

// stallSetting names the stall rule in force: the rounds asked for, or
// "budget" when --stall was not given (a time limit is then a budget and a
// stall changes what the run does instead of ending it; see decomp's stall
// rule). Without the distinction a resume could switch between the two.
func stallSetting(f *runFlags) string {
	if !f.stallGiven {
		return "stall=budget"
	}
	return fmt.Sprintf("stall=%d", f.stall)
}

// prepareCheckpoints wires --checkpoint into the settings and reads the
// state to resume from, if any (nil otherwise). A checkpoint of another
// instance or other settings is refused (exit 2).
func prepareCheckpoints(f *runFlags, file string, p *decomp.Problem, s *decomp.Settings) (*decomp.State, error) {
	c := f.checkpoints
	if c.path == "" && c.resume == "" {
		return nil, nil
	}
	hash, err := instanceHash(file)
	if err != nil {
		return nil, badInput(fmt.Errorf("hashing the input %s: %w", file, err))
	}
	fp := runFingerprint(f)
	var state *decomp.State
	if c.resume != "" {
		ck, err := decomp.ReadCheckpointFile(c.resume, p.Plans)
		if err != nil {
			return nil, badInput(err)
		}
		if err := ck.Match(hash, fp); err != nil {
			var me *decomp.MismatchError
			if errors.As(err, &me) && me.What == "instance" {
				return nil, badInput(fmt.Errorf("--resume %s: the checkpoint was made from another input than %s", c.resume, file))
			}
			return nil, badInput(fmt.Errorf("--resume %s: the checkpoint was made with other settings: %w", c.resume, err))
		}
		state = ck.State
	}
	if c.path != "" {
		path := c.path
		s.CheckpointInterval = c.every
		s.Checkpoint = func(st *decomp.State) error {
			return decomp.WriteCheckpointFile(path, &decomp.Checkpoint{InstanceHash: hash, Settings: fp, State: st}, p.Plans)
		}
	}
	return state, nil
}
