package elicit

import (
	"strconv"
	"strings"
	"testing"
)

// PredictiveQuantile at exact ties, where P(X ≤ x) = p for some x, against
// testdata/scipy/predictive_quantile_reference.csv: scipy.stats.betabinom's
// ppf (Debian's python3-scipy 1.10.1; the script checks each tie with exact
// fractions). The uniform prior's predictive of 3 trials is uniform on
// 0…3, so its median is 1, not 2.
func TestPredictiveQuantileAtTiesAgainstSciPy(t *testing.T) {
	rows := 0
	for _, c := range referenceTable(t, "../testdata/scipy/predictive_quantile_reference.csv", "# scipy", 5) {
		line := strings.Join(c, ",")
		a, err1 := strconv.ParseFloat(c[0], 64)
		b, err2 := strconv.ParseFloat(c[1], 64)
		n, err3 := strconv.Atoi(c[2])
		p, err4 := strconv.ParseFloat(c[3], 64)
		want, err5 := strconv.Atoi(c[4])
		for _, err := range []error{err1, err2, err3, err4, err5} {
			if err != nil {
				t.Fatalf("row %q: %v", line, err)
			}
		}
		pmf, err := PriorPredictive(Beta{a, b}, n)
		if err != nil {
			t.Fatal(err)
		}
		if got := PredictiveQuantile(pmf, p); got != want {
			t.Errorf("Beta(%v, %v), %d trials, p = %v: %d, SciPy %d", a, b, n, p, got, want)
		}
		rows++
	}
	if rows < 8 {
		t.Fatalf("%d rows read", rows)
	}
}

// shapeWritten writes α or β as the pages do (web/chart.FormatShape, which
// elicit may not import; this mirrors its rule): four significant
// figures, more to stay on its own side of 1 (ShapeDigits), as the
// shortest plain decimal of the rounded value, so 19997.4 is "20000",
// not %g's "2e+04". The pages write an exponent only below 1e-4 and from
// 1e7 up, which no shape in these tests reaches.
func shapeWritten(x float64) string {
	r, err := strconv.ParseFloat(strconv.FormatFloat(x, 'e', ShapeDigits(x, 4)-1, 64), 64)
	if err != nil {
		panic(err)
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// The uniform prior, the commonest quick prior, is worth 2 observed
// trials: 1 success and 1 failure, in the singular. A shape just short
// of 1 is not "1 success": written to its own side of 1, it is plural.
func TestWorthWordsSingular(t *testing.T) {
	for _, c := range []struct {
		d    Beta
		want string
	}{
		{Beta{1, 1}, "worth about 2 observed trials (1 success and 1 failure)"},
		{Beta{0.5, 0.5}, "worth about 1 observed trial (0.5 successes and 0.5 failures)"},
		{Beta{0.99997, 5}, "worth about 6 observed trials (0.99997 successes and 5 failures)"},
		{Beta{7, 1.000001}, "worth about 8 observed trials (7 successes and 1.000001 failures)"},
	} {
		if got := Worth(c.d).Words(shapeWritten); got != c.want {
			t.Errorf("%v: %q, want %q", c.d, got, c.want)
		}
	}
}

// The successes and failures are the Beta's α and β as the caller writes
// them beside the line, not counts of their own figures: Beta(3, 19997.4)
// written to four figures, as the pages write it, is Beta(3, 20000), and
// its worth splits into 3 and 20000 failures, not the whole count 19997.
func TestWorthSplitsAsTheShapesAreWritten(t *testing.T) {
	if s := shapeWritten(19997.4); s != "20000" {
		t.Fatalf("the pages write β = 19997.4 as 20000, the test's writer as %s", s)
	}
	got := Worth(Beta{3, 19997.4}).Words(shapeWritten)
	if want := "worth about 20000 observed trials (3 successes and 20000 failures)"; got != want {
		t.Errorf("%q, want %q", got, want)
	}
	// The split is the caller's writing, not a count of its own: a writer
	// that keeps every figure gives β itself.
	every := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	if got := Worth(Beta{3, 19997.4}).Words(every); !strings.Contains(got, "(3 successes and 19997.4 failures)") {
		t.Errorf("with every figure: %q", got)
	}
}

// A prior's worth is said in one phrase with one rule for its figures:
// four significant figures, as the pages write α and β, so that
// Beta(3.456, 55.05) reads as worth their sum; whole from 1000 up, so
// that a near-certainty warning's count is not rounded to tens.
// Common practice, no source: the figures are Parley's own choice.
func TestWorthInTrialsFigures(t *testing.T) {
	for _, c := range []struct {
		ess  float64
		want string
	}{
		{3.456 + 55.05, "worth about 58.51 observed trials"},
		{0.205072, "worth about 0.2051 observed trials"},
		{1, "worth about 1 observed trial"},
		{240, "worth about 240 observed trials"},
		{999.94, "worth about 999.9 observed trials"},
		{15366.4, "worth about 15366 observed trials"},
		{1e6, "worth about 1000000 observed trials"},
		// Exponents as the pages write them (chart.FormatValue).
		{2e-6, "worth about 2e-6 observed trials"},
		{1.5e9, "worth about 1.5e9 observed trials"},
	} {
		if got := WorthInTrials(c.ess); got != c.want {
			t.Errorf("WorthInTrials(%v) = %q, want %q", c.ess, got, c.want)
		}
	}
	// The near-certainty warning on a proportion says it in these words.
	f, err := FitQuantiles(Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.099, 0.1, 0.101}, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	want := "is " + WorthInTrials(f.Dist.Alpha+f.Dist.Beta.Beta) + " (α + β above 1000)"
	found := false
	for _, w := range f.Warnings {
		found = found || (w.Code == WarnNearCertainty && strings.Contains(w.Message, want))
	}
	if !found {
		t.Errorf("no near-certainty warning says %q: %v", want, f.Warnings)
	}
}
