package answersheet

import (
	"slices"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Columns are named by the probabilities asked (the tertiles' q33 and
// q67 at two digits, as people write them).
func TestQuantileColumnNames(t *testing.T) {
	for _, c := range []struct {
		p    float64
		want string
	}{{0.05, "q05"}, {0.5, "q50"}, {0.95, "q95"}, {0.25, "q25"}, {0.975, "q975"}, {0.025, "q025"}, {1.0 / 3, "q33"}, {2.0 / 3, "q67"}, {0.1, "q10"}} {
		if got := quantileColumn(c.p); got != c.want {
			t.Errorf("QuantileColumn(%v) = %q, want %q", c.p, got, c.want)
		}
	}
}

// A question's columns are never named twice: two probabilities without
// a short decimal form that round to one two-digit name take more
// decimals.
func TestQuantileColumnsOfOneQuestionDiffer(t *testing.T) {
	q := workshop.Question{Format: workshop.FormatQuantiles, Probs: []float64{0.1, 1.0 / 3, 0.3343434343434343, 0.9}}
	got := Columns(q)
	want := []string{"q10", "q333", "q334", "q90"}
	if !slices.Equal(got, want) {
		t.Errorf("columns %q, want %q", got, want)
	}
	q.Probs = []float64{1.0 / 3, 0.5, 2.0 / 3}
	if got := Columns(q); !slices.Equal(got, []string{"q33", "q50", "q67"}) {
		t.Errorf("tertiles' columns %q", got)
	}
}
