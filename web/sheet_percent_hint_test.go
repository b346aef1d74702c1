package web

import (
	"errors"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/answersheet"
)

// Values typed as percentages without their sign, as a paper form gives
// them (5, 15, 35), on a proportion: refused, and the refusal says how
// to write them; it said only that 5 is not inside (0, 1). Values above
// 100, a row that has a % sign, and one value of three above 1 (a slip)
// are not taken for percentages.
func TestSheetPercentsWithoutTheirSign(t *testing.T) {
	g := newSheetRig(t)
	const hint = "if the row's values are percentages, write each with its sign, such as 5%"
	for _, c := range []struct {
		sheet, field string
		hint         bool
	}{
		{"expert,question,q05,q50,q95\nAda Quell,Q1,2,6,15\n", "row 2, column q05", true},
		{"expert,question,lowest,highest,best,confidence\nAda Quell,Q2,5,30,12,80\n", "row 2, column lowest", true},
		{"expert,question,q05,q50,q95\nAda Quell,Q1,0.5,2,8\n", "row 2, column q50", true},
		{"expert,question,q05,q50,q95\nAda Quell,Q1,0.02,0.06,15\n", "row 2, column q95", false},
		{"expert,question,q05,q50,q95\nAda Quell,Q1,20,60,150\n", "row 2, column q05", false},
		{"expert,question,q05,q50,q95\nAda Quell,Q1,2%,6,15\n", "row 2, column q50", false},
	} {
		_, err := answersheet.Read(strings.NewReader(c.sheet), g.qs, g.experts)
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Field != c.field || ie.Rule != elicit.RuleValueInBounds || strings.Contains(ie.Detail, hint) != c.hint {
			t.Errorf("%q: %v (want the hint: %v)", c.sheet, err, c.hint)
		}
	}
}
