package lotsizing

import (
	"errors"
	"strings"
	"testing"
)

// The published files end with a free-text trailer (see SOURCES.md of the
// shared lot-sizing folder), which the reader skips; numbers after the
// demands are another layout and are refused with their place.
func TestTTMTrailer(t *testing.T) {
	body := "1 2\n1\n100\n1 1 10 50\n5 7\n"
	if _, err := ReadTTM(strings.NewReader(body+"Built by hand\n"), "small.dat"); err != nil {
		t.Fatalf("text trailer refused: %v", err)
	}
	_, err := ReadTTM(strings.NewReader(body+"8 9\n"), "small.dat")
	var pe *ParseError
	if err == nil || !errors.As(err, &pe) || pe.Line != 6 || !strings.Contains(err.Error(), "end of the file") {
		t.Fatalf("trailing numbers: got %v", err)
	}
}
