package web

import (
	"io"
	"log/slog"
	"math"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// TestScoringRefusalsInPlainWords: the calibration page's rare refusals
// from Cooke's classical model were the model's own rules, in the words of
// `parley calibrate`'s file and flags: "the question's range, widened by
// the overshoot, must strictly contain every quantile and the
// realisation", "must lie within [lower, upper]" with no word of what
// must. The facilitator reads of the true value and of the range widened
// by 10% of its width on each side, what the model does
// (elicit.intrinsicRange with elicit.DefaultOvershoot). The refusals come
// from the model itself, placed by workshop.ScoringError, on the invented
// valve-wear panel.
func TestScoringRefusalsInPlainWords(t *testing.T) {
	s := &Server{log: slog.New(slog.NewTextHandler(io.Discard, nil))}
	refusal := func(change func(*workshop.Snapshot)) string {
		t.Helper()
		src := workshoptest.ValveWear(true)
		change(&src)
		set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, false)
		_, err := workshop.ScorePerformance(set, nil)
		if err == nil {
			t.Fatal("the model scored the panel")
		}
		return s.scoringProblem(err, workshopData{Workshop: src.Workshop, Questions: src.Questions, Experts: src.Experts, Revisions: src.Revisions})
	}
	// Every answer and the true value of seed 1 within three steps of 1:
	// the range widened by 10% rounds back onto them.
	u := math.Nextafter(1, 2) - 1
	collapsed := refusal(func(src *workshop.Snapshot) {
		for i, rv := range src.Revisions {
			if rv.QuestionID == 102 {
				src.Revisions[i].Answer.Values = []float64{1 - 4*u, 1 - 3*u, 1 - 2*u}
			}
		}
		for i, q := range src.Questions {
			if q.ID == 102 {
				x := 1 - 3*u
				src.Questions[i].TrueValue = &x
			}
		}
	})
	// A true value outside the question's bounds (a record can hold what
	// the forms refuse).
	outside := refusal(func(src *workshop.Snapshot) {
		for i, q := range src.Questions {
			if q.ID == 102 {
				x := 1.5
				src.Questions[i].TrueValue = &x
			}
		}
	})
	overflow := s.scoringProblem(&elicit.InputError{Field: "overshoot", Rule: elicit.RuleRangeOverflow}, workshopData{})
	for _, c := range []struct{ name, got, want string }{
		{"a range that collapses", collapsed, "calibration question Q2 s1: the experts' answers and the true value lie so close together that the span from the lowest of them to the highest, widened by 10% of its width on each side, rounds back onto them"},
		{"a true value outside the bounds", outside, "calibration question Q2 s1: its true value must lie within the question's bounds"},
		{"a range that overflows", overflow, "widened by 10% of its width on each side, goes past the largest number the computer holds"},
	} {
		if !strings.Contains(c.got, c.want) {
			t.Errorf("%s reads %q, want %q", c.name, c.got, c.want)
		}
		for _, internal := range []string{"realisation", "overshoot", "[lower, upper]"} {
			if strings.Contains(c.got, internal) {
				t.Errorf("%s reads the model's word %q: %q", c.name, internal, c.got)
			}
		}
	}
}
