package workshop

import (
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// Problems names every broken field of an answer at once, in form order;
// Fit refuses the first of them.
func TestProblemsListsEveryField(t *testing.T) {
	q := Question{Wording: "w", Quantity: "q", Lower: 0, Upper: 1, Format: FormatQuantiles, Probs: ProbsDefault}
	ps := q.Problems(Answer{Values: []float64{0.5, 0.3, 1.2}})
	var got []string
	for _, p := range ps {
		got = append(got, p.Field+":"+string(p.Rule))
	}
	want := "values[2]:" + string(elicit.RuleValueInBounds) + ",values[1]:" + string(elicit.RuleValueIncreasing)
	if strings.Join(got, ",") != want {
		t.Fatalf("problems %v, want %s", got, want)
	}
	if _, err := q.Fit(Answer{Values: []float64{0.5, 0.3, 1.2}}); err != ps[0] && err.Error() != ps[0].Error() {
		t.Fatalf("Fit refuses %v, want the first problem %v", err, ps[0])
	}
	iv := Question{Wording: "w", Quantity: "q", Lower: 0, Upper: 1, Format: FormatInterval}
	got = nil
	for _, p := range iv.Problems(Answer{Lowest: 0.6, Best: 0.2, Highest: 0.1, Confidence: 1.5}) {
		got = append(got, p.Field)
	}
	if strings.Join(got, ",") != "best,highest,confidence" {
		t.Fatalf("interval problems %v", got)
	}
	ch := Question{Wording: "w", Quantity: "q", Lower: 0, Upper: 1, Format: FormatChips, BinEdges: []float64{0, 0.25, 0.5, 0.75, 1}, Chips: 10}
	for _, c := range []struct {
		counts []int
		rule   elicit.Rule
	}{
		{[]int{4, 4, 4, 0}, RuleChipsExceeded},
		{[]int{0, 0, 0, 0}, elicit.RuleCountsNotAllZero},
		{[]int{5, 5, 0, 0}, elicit.RuleChipsSpread},
	} {
		ps := ch.Problems(Answer{Counts: c.counts})
		if len(ps) != 1 || ps[0].Rule != c.rule || ps[0].Field != "counts" {
			t.Errorf("chips %v: %v, want %s", c.counts, ps, c.rule)
		}
	}
	if ps := ch.Problems(Answer{Counts: []int{3, 4, 3, 0}}); len(ps) != 0 {
		t.Errorf("a good chips answer has problems %v", ps)
	}
}
