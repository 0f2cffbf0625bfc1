package scheduling

import (
	"bytes"
	"io"
	"path/filepath"
	"testing"
)

// go test -bench 'CSV|Gantt|Verify' ./instances/scheduling

func BenchmarkReadCSVFolder5000(b *testing.B) {
	dir := filepath.Join(b.TempDir(), "big")
	if err := WriteCSVFolder(dir, Generate(Benchmark5000(1))); err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for range b.N {
		if _, err := ReadCSVFolder(dir); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkGantt5000(b *testing.B) {
	in := Generate(Benchmark5000(1))
	s := ioListSchedule(in)
	b.ResetTimer()
	for range b.N {
		if err := WriteGanttSVG(io.Discard, in, s, GanttOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkVerify5000(b *testing.B) {
	in := Generate(Benchmark5000(1))
	var buf bytes.Buffer
	if err := WriteScheduleCSV(&buf, in, ioListSchedule(in)); err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for range b.N {
		if v, err := VerifyFile(in, bytes.NewReader(buf.Bytes()), "schedule.csv"); err != nil || !v.Feasible {
			b.Fatal(v, err)
		}
	}
}
