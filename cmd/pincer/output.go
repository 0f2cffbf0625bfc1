package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// stdoutPath is the output path that means standard output.
const stdoutPath = "-"

// checkWritable reports whether path can be written, without changing an
// existing file; a file it had to create to find out is removed again.
// "-" and "" are always fine.
func checkWritable(flag, path string) error {
	if path == "" || path == stdoutPath {
		return nil
	}
	st, err := os.Stat(path)
	switch {
	case err == nil && st.IsDir():
		return badInput(fmt.Errorf("%s %s: is a folder, want a file", flag, path))
	case err == nil:
		f, err := os.OpenFile(path, os.O_WRONLY, 0)
		if err != nil {
			return badInput(fmt.Errorf("%s %s: cannot be written: %w", flag, path, err))
		}
		return f.Close()
	case errors.Is(err, fs.ErrNotExist):
		f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666)
		if err != nil {
			return badInput(fmt.Errorf("%s %s: cannot be written: %w", flag, path, err))
		}
		f.Close()
		return os.Remove(path)
	default:
		return badInput(fmt.Errorf("%s %s: %w", flag, path, err))
	}
}

// nopCloser keeps standard output open.
type nopCloser struct{ io.Writer }

func (nopCloser) Close() error { return nil }

// createOutput opens path for writing; "-" is stdout.
func createOutput(path string, stdout io.Writer) (io.WriteCloser, error) {
	if path == stdoutPath {
		return nopCloser{stdout}, nil
	}
	return os.Create(path)
}

// tablePath names an extra table that goes with a plan file
// (plan.csv, "sites" -> plan-sites.csv).
func tablePath(plan, suffix string) string {
	ext := filepath.Ext(plan)
	return strings.TrimSuffix(plan, ext) + "-" + suffix + ext
}

// sideTables creates a plan's extra tables beside the plan file.
type sideTables struct{ plan string }

func (t sideTables) Create(suffix string) (io.WriteCloser, error) {
	return os.Create(tablePath(t.plan, suffix))
}

// folderSink writes a generator's files into a folder.
type folderSink struct{ dir string }

func (s folderSink) Create(name string) (io.WriteCloser, error) {
	return os.Create(filepath.Join(s.dir, name))
}

// fileSink writes a one-file generator's output to a file or stdout.
type fileSink struct {
	path   string
	stdout io.Writer
}

func (s fileSink) Create(string) (io.WriteCloser, error) {
	if s.path == "" {
		return nopCloser{s.stdout}, nil
	}
	return createOutput(s.path, s.stdout)
}

// prepareFolder checks that dir may receive files: it must be absent, empty,
// or force must be set (files other than names are then left alone).
func prepareFolder(dir string, names []string, force bool) error {
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
	case err != nil:
		return badInput(fmt.Errorf("-o %s: %w", dir, err))
	case len(entries) > 0 && !force:
		return badInput(fmt.Errorf("-o %s: folder is not empty (%d entries); pass --force to overwrite %s there",
			dir, len(entries), strings.Join(names, ", ")))
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return badInput(fmt.Errorf("-o %s: %w", dir, err))
	}
	for _, n := range names {
		if err := checkWritable("-o", filepath.Join(dir, n)); err != nil {
			return err
		}
	}
	return nil
}
