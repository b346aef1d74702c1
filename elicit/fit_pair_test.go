package elicit

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestFitRecoversTheBetaFromItsTails fits judgements made of a Beta's own
// quantiles far in the tails (R 4.2.2's qbeta, testdata/r/tail_fit_reference.R:
// probabilities 1e-3 to 1e-12 beside the median or quartiles) and wants
// that Beta back, every stated probability matched to 1e-6 of its own
// tail, and no warning that the fit misses one. Before pairStarts the fit
// stopped short where a stated tail was 1e-8 or less (Beta(1.5, 1.5)'s
// quantiles at 1e-8, ½ and 1 − 1e-8 fitted as Beta(1.98, 1.98)), and two
// such pairs were refused as matched by no Beta.
func TestFitRecoversTheBetaFromItsTails(t *testing.T) {
	const path = "../testdata/r/tail_fit_reference.csv"
	nums := func(s string) []float64 {
		var out []float64
		for _, f := range strings.Split(s, ";") {
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatalf("%s: bad number %q", path, f)
			}
			out = append(out, v)
		}
		return out
	}
	rows := referenceTable(t, path, "# R version", 4)
	if len(rows) < 150 {
		t.Fatalf("only %d judgements", len(rows))
	}
	for _, c := range rows {
		want := Beta{nums(c[0])[0], nums(c[1])[0]}
		j := Judgement{Probs: nums(c[2]), Values: nums(c[3]), Lower: 0, Upper: 1}
		f, err := FitQuantiles(j)
		if err != nil {
			t.Errorf("Beta(%g, %g) at %v: %v", want.Alpha, want.Beta, j.Probs, err)
			continue
		}
		got := f.Dist.Beta
		if relErr(got.Alpha, want.Alpha) > 1e-6 || relErr(got.Beta, want.Beta) > 1e-6 {
			t.Errorf("Beta(%g, %g) at %v: fitted Beta(%.9g, %.9g)", want.Alpha, want.Beta, j.Probs, got.Alpha, got.Beta)
		}
		for i, p := range j.Probs {
			if e := math.Abs(f.ProbErrors[i]); e > 1e-6*math.Min(p, 1-p) {
				t.Errorf("Beta(%g, %g) at %v: misses p = %g by %.3g", want.Alpha, want.Beta, j.Probs, p, e)
			}
		}
		for _, w := range f.Warnings {
			if w.Code == WarnTailMisfit || w.Code == WarnPoorFit {
				t.Errorf("Beta(%g, %g) at %v: warning %s", want.Alpha, want.Beta, j.Probs, w.Code)
			}
		}
	}
}
