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

// The uniform prior, the commonest quick prior, is worth 2 imagined
// trials: 1 success and 1 failure, in the singular.
func TestWorthWordsSingular(t *testing.T) {
	if got, want := Worth(Beta{1, 1}).String(), "worth about 2 imagined trials (1 success and 1 failure)"; got != want {
		t.Errorf("%q, want %q", got, want)
	}
	if got, want := Worth(Beta{0.5, 0.5}).String(), "worth about 1 imagined trial (0.5 successes and 0.5 failures)"; got != want {
		t.Errorf("%q, want %q", got, want)
	}
}
