package instances

import (
	"math"
	"testing"
)

func TestOptionParseRanges(t *testing.T) {
	f := Option{Name: "ratio", Kind: Float, Min: 1, Max: 4, HasMin: true, HasMax: true}
	for _, s := range []string{"0.99", "4.01", "NaN", "Inf", "x", ""} {
		if _, err := f.Parse(s); err == nil {
			t.Errorf("ratio %q accepted", s)
		}
	}
	for _, s := range []string{"1", "2.5", "4"} {
		if _, err := f.Parse(s); err != nil {
			t.Errorf("ratio %q: %v", s, err)
		}
	}
	b := Option{Name: "single-source", Kind: Bool}
	if v, err := b.Parse("true"); err != nil || v != true {
		t.Errorf("bool: %v %v", v, err)
	}
	if _, err := b.Parse("maybe"); err == nil {
		t.Error("bool maybe accepted")
	}
	d, err := Defaults([]Option{{Name: "index", Kind: Int, Default: "1"}, {Name: "x", Kind: Float, Default: "0.5"}})
	if err != nil || d.Int("index") != 1 || d.Float("x") != 0.5 || d.String("missing") != "" {
		t.Errorf("defaults %v %v", d, err)
	}
	if _, err := Defaults([]Option{{Name: "index", Kind: Int, Default: "0", Min: 1, HasMin: true}}); err == nil {
		t.Error("out-of-range default accepted")
	}
}

// TestFormatNumberReadsBack: the shortened text stays within 1e-9
// relative of the value for values across many magnitudes.
func TestFormatNumberReadsBack(t *testing.T) {
	for _, v := range []float64{8.237499999999999, 1862.9699999999998, 30.355250393865756, 1e-7, 123456789.123, -5.5, 1e15} {
		r := RoundNumber(v)
		if math.Abs(r-v) > 1e-9*math.Abs(v) {
			t.Errorf("%v rounds to %v", v, r)
		}
	}
}
