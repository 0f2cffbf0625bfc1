package main

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"syscall"
	"testing"
	"time"
)

var killCampaign = flag.Int("killcampaign", 0, "also run this many interrupted and resumed runs (alternating a GAP and a facility instance, one to three SIGKILLs each; every third run SIGINTs instead)")

// killCase is a run the harness interrupts: the solve arguments (the
// input last) and how long its rounds take, roughly, on one core (kills
// fall inside that window).
type killCase struct {
	name   string
	args   []string
	rounds time.Duration
}

// buildPincer compiles the command into dir and returns the binary.
func buildPincer(t *testing.T, dir string) string {
	t.Helper()
	if testing.Short() {
		t.Skip("builds the binary and runs it several times")
	}
	bin := filepath.Join(dir, "pincer")
	out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput()
	if err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

func killCases(t *testing.T, bin, dir string) []killCase {
	t.Helper()
	scen := filepath.Join(dir, "sites80")
	if out, err := exec.Command(bin, "gen", "cflp", "--sites", "80", "--customers", "200", "--seed", "3", "-o", scen).CombinedOutput(); err != nil {
		t.Fatalf("gen cflp: %v\n%s", err, out)
	}
	// --time 0: no clock in the outcome, so that the last repair is the
	// same in every run; the round limit decides the end.
	common := []string{"--quiet", "--gap", "0", "--time", "0", "--workers", "2", "--seed", "5"}
	return []killCase{
		{"gap", append([]string{"solve", "--format", "gap-orlib", "--rounds", "4000"}, append(common, testdata("gap-c-5x30.txt"))...), 1200 * time.Millisecond},
		{"cflp", append([]string{"solve", "--format", "cflp-csv", "--rounds", "300"}, append(common, scen)...), 1500 * time.Millisecond},
	}
}

// outcome is what must not depend on interruptions: everything in the
// report but timings, history and the file names.
func outcome(t *testing.T, path string) map[string]any {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("report not written: %v", err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("report %s is not JSON: %v", path, err)
	}
	for _, k := range []string{"seconds", "history", "file", "workers"} {
		delete(m, k)
	}
	return m
}

func runBin(bin string, args ...string) (int, string, error) {
	cmd := exec.Command(bin, args...)
	out, err := cmd.CombinedOutput()
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		return ee.ExitCode(), string(out), nil
	}
	return 0, string(out), err
}

// killedRun runs a case with checkpoints, stopping it kills times with
// sig at random moments inside its rounds and resuming it from the
// checkpoint each time (from scratch if none was written yet); it
// returns the final report's outcome and a line on what happened.
func killedRun(t *testing.T, bin, dir string, c killCase, kills int, sig syscall.Signal, rng *rand.Rand) (map[string]any, string) {
	t.Helper()
	ck := filepath.Join(dir, "run.ckpt")
	rep := filepath.Join(dir, "run.json")
	os.Remove(ck)
	os.Remove(rep)
	base, in := c.args[:len(c.args)-1], c.args[len(c.args)-1]
	log := ""
	for k := 0; ; k++ {
		args := append(append([]string(nil), base...), "--checkpoint", ck, "--checkpoint-every", "20ms", "--report", rep)
		resumed := false
		if _, err := os.Stat(ck); err == nil {
			args = append(args, "--resume", ck)
			resumed = true
		}
		args = append(args, in)
		if k == kills {
			code, out, err := runBin(bin, args...)
			if err != nil || code != exitOK {
				t.Fatalf("%s: last run: exit %d, %v\n%s", c.name, code, err, out)
			}
			return outcome(t, rep), log + fmt.Sprintf(" then ran to the end (resumed %v)", resumed)
		}
		cmd := exec.Command(bin, args...)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		// The random moment counts from the first checkpoint (on a busy
		// machine the start alone may take longer than the window).
		for waited := 0; waited < 2000; waited++ {
			if _, err := os.Stat(ck); err == nil {
				break
			}
			time.Sleep(5 * time.Millisecond)
		}
		delay := time.Duration(rng.Int64N(int64(c.rounds)))
		var err error
		select {
		case err = <-done:
		case <-time.After(delay):
			if err := cmd.Process.Signal(sig); err != nil && !errors.Is(err, os.ErrProcessDone) {
				t.Fatal(err)
			}
			err = <-done
		}
		var ee *exec.ExitError
		switch {
		case err == nil:
			log += fmt.Sprintf(" run %d ended before the %v at %v after its first checkpoint;", k+1, sig, delay.Round(time.Millisecond))
		case errors.As(err, &ee):
			if sig == syscall.SIGKILL {
				saved := "a checkpoint to resume"
				if _, err := os.Stat(ck); err != nil {
					saved = "no checkpoint yet: starts afresh"
				}
				log += fmt.Sprintf(" %v %v after the first checkpoint (%s);", sig, delay.Round(time.Millisecond), saved)
				break
			}
			// SIGINT/SIGTERM: exit 130 with the report and a last checkpoint.
			if ee.ExitCode() != exitInterrupted {
				t.Fatalf("%s: %v gave exit %d, want %d", c.name, sig, ee.ExitCode(), exitInterrupted)
			}
			if _, err := os.Stat(ck); err != nil {
				t.Fatalf("%s: %v left no checkpoint: %v", c.name, sig, err)
			}
			if r := outcome(t, rep); r["stop"] != "interrupted" {
				t.Fatalf("%s: report after %v says stop %v", c.name, sig, r["stop"])
			}
			log += fmt.Sprintf(" %v %v after the first checkpoint (exit 130, report and checkpoint written);", sig, delay.Round(time.Millisecond))
		default:
			t.Fatal(err)
		}
		os.Remove(rep)
	}
}

func compareOutcomes(t *testing.T, name string, ref, got map[string]any) bool {
	t.Helper()
	ok := true
	for k, v := range ref {
		if !reflect.DeepEqual(v, got[k]) {
			if k == "rows" {
				t.Errorf("%s: row reports (prices, use) differ from the uninterrupted run", name)
			} else {
				t.Errorf("%s: %s = %v, uninterrupted run %v", name, k, got[k], v)
			}
			ok = false
		}
	}
	return ok
}

// TestKillAndResume: a run with checkpoints is killed (SIGKILL) at a random
// moment and resumed from its checkpoint; its final report must equal the
// uninterrupted run's (timings aside; rounds count the whole run): plan
// value, bound, rounds, stop and every row's price and use. SIGTERM must
// exit 130 with a report and a last checkpoint, and that checkpoint
// resumes to the same end. With -killcampaign N it then runs N more
// runs with one to three kills each (every third with SIGINT).
func TestKillAndResume(t *testing.T) {
	dir := t.TempDir()
	bin := buildPincer(t, dir)
	cases := killCases(t, bin, dir)
	seed := uint64(time.Now().UnixNano())
	t.Logf("kill moments from seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 1))
	refs := map[string]map[string]any{}
	for _, c := range cases {
		rep := filepath.Join(dir, c.name+"-ref.json")
		code, out, err := runBin(bin, append(append([]string(nil), c.args[:len(c.args)-1]...), "--report", rep, c.args[len(c.args)-1])...)
		if err != nil || code != exitOK {
			t.Fatalf("%s reference: exit %d, %v\n%s", c.name, code, err, out)
		}
		refs[c.name] = outcome(t, rep)
		t.Logf("%s reference: plan %v bound %v rounds %v stop %v", c.name, refs[c.name]["plan_value"], refs[c.name]["bound"], refs[c.name]["rounds"], refs[c.name]["stop"])
	}
	for _, c := range cases {
		got, log := killedRun(t, bin, dir, c, 1, syscall.SIGKILL, rng)
		compareOutcomes(t, c.name+" killed", refs[c.name], got)
		t.Logf("%s:%s", c.name, log)
	}
	got, log := killedRun(t, bin, dir, cases[1], 1, syscall.SIGTERM, rng)
	compareOutcomes(t, "cflp after SIGTERM", refs["cflp"], got)
	t.Logf("cflp:%s", log)

	same := 0
	for i := 0; i < *killCampaign; i++ {
		c := cases[i%len(cases)]
		sig := syscall.SIGKILL
		if i%3 == 2 {
			sig = syscall.SIGINT // every third run (both families): Ctrl-C, then resume
		}
		got, log := killedRun(t, bin, dir, c, 1+rng.IntN(3), sig, rng)
		if compareOutcomes(t, fmt.Sprintf("campaign run %d (%s)", i+1, c.name), refs[c.name], got) {
			same++
		}
		t.Logf("campaign run %d, %s:%s", i+1, c.name, log)
	}
	if *killCampaign > 0 {
		t.Logf("campaign: %d of %d killed runs ended as the uninterrupted run", same, *killCampaign)
	}
}
