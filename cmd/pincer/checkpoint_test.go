package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A run stopped by its round limit leaves a checkpoint; resuming it with the
// same settings continues from the saved round (here: nothing left to do, so
// the same bound and round count), while another seed, another input or a
// damaged file is refused with exit 2 and the file named.
func TestCheckpointResumeAndRefusals(t *testing.T) {
	dir := t.TempDir()
	ck := filepath.Join(dir, "run.ckpt")
	rep1, rep2 := filepath.Join(dir, "a.json"), filepath.Join(dir, "b.json")
	in := testdata("gap-d-10x200.txt")
	args := []string{"solve", "--format", "gap-orlib", "--quiet", "--rounds", "30", "--gap", "0", "--workers", "1"}
	code, _, errs := runCLI(t, context.Background(), append(args, "--checkpoint", ck, "--report", rep1, in)...)
	if code != exitOK {
		t.Fatalf("first run: exit %d: %s", code, errs)
	}
	if st, err := os.Stat(ck); err != nil || st.Size() == 0 {
		t.Fatalf("no checkpoint written: %v", err)
	}
	code, _, errs = runCLI(t, context.Background(), append(args, "--resume", ck, "--report", rep2, in)...)
	if code != exitOK {
		t.Fatalf("resumed run: exit %d: %s", code, errs)
	}
	a, b := readReport(t, rep1), readReport(t, rep2)
	for _, k := range []string{"bound", "rounds"} {
		if a[k] != b[k] {
			t.Errorf("%s: first run %v, resumed %v", k, a[k], b[k])
		}
	}

	code, _, errs = runCLI(t, context.Background(), append(args, "--seed", "7", "--resume", ck, in)...)
	if code != exitBadInput || !strings.Contains(errs, ck) || !strings.Contains(errs, "other settings") {
		t.Errorf("other seed: exit %d, stderr %q", code, errs)
	}
	code, _, errs = runCLI(t, context.Background(), append(args, "--resume", ck, testdata("gap-c-5x30.txt"))...)
	if code != exitBadInput || !strings.Contains(errs, "another input") {
		t.Errorf("other input: exit %d, stderr %q", code, errs)
	}
	data, err := os.ReadFile(ck)
	if err != nil {
		t.Fatal(err)
	}
	bad := filepath.Join(dir, "bad.ckpt")
	for name, d := range map[string][]byte{"truncated": data[:len(data)/2], "foreign": []byte("site,customer\n1,2\n")} {
		if err := os.WriteFile(bad, d, 0o644); err != nil {
			t.Fatal(err)
		}
		code, _, errs = runCLI(t, context.Background(), append(args, "--resume", bad, in)...)
		if code != exitBadInput || !strings.Contains(errs, bad) {
			t.Errorf("%s checkpoint: exit %d, stderr %q", name, code, errs)
		}
	}
	code, _, errs = runCLI(t, context.Background(), append(args, "--checkpoint-every", "0s", in)...)
	if code != exitBadInput || !strings.Contains(errs, "checkpoint-every") {
		t.Errorf("--checkpoint-every 0s: exit %d, stderr %q", code, errs)
	}
}
