package calibsheet

import (
	"math"
	"testing"
)

// TestQuantileColumnReadsBackAsItsProbability: the column a writer names
// with QuantileColumn is read as the probability itself, to the last bit,
// short decimals and long alike; a probability outside (0, 1) has no
// column.
func TestQuantileColumnReadsBackAsItsProbability(t *testing.T) {
	for _, c := range []struct {
		p    float64
		want string // common practice, no source: the sheet's own names
	}{
		{0.05, "q05"}, {0.5, "q50"}, {0.1, "q10"}, {0.975, "q975"}, {0.001, "q001"},
		{1.0 / 3, "q3333333333333333"}, {1e-7, "q0000001"}, {0.9999999, "q9999999"},
	} {
		name, err := QuantileColumn(c.p)
		if err != nil || name != c.want {
			t.Errorf("QuantileColumn(%v) = %q, %v; want %q", c.p, name, err, c.want)
			continue
		}
		_, probs, err := readHeader([]string{"expert", "question", "realization", name})
		if err != nil || len(probs) != 1 || probs[0] != c.p {
			t.Errorf("%s read as %v, %v; want %v", name, probs, err, c.p)
		}
	}
	for _, p := range []float64{0, 1, -0.5, 1.5, math.NaN()} {
		if name, err := QuantileColumn(p); err == nil {
			t.Errorf("QuantileColumn(%v) = %q, want an error", p, name)
		}
	}
}
