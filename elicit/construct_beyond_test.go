package elicit

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// TestLogTinyQuantileAgainstR: where a Beta quantile is tiny but still a
// double (1e-300 to 1e-100), ln x from the leading term at 0 (DLMF 8.17.8)
// agrees with R 4.2.2's log(qbeta(p, α, β))
// (testdata/r/tiny_quantile_reference.R), so it can be trusted below the
// double range, where R's qbeta too gives 0.
func TestLogTinyQuantileAgainstR(t *testing.T) {
	rows := referenceTable(t, "../testdata/r/tiny_quantile_reference.csv", "# R version", 4)
	for _, c := range rows {
		var v [4]float64
		for i := range v {
			var err error
			if v[i], err = strconv.ParseFloat(c[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		d, p, want := Beta{Alpha: v[0], Beta: v[1]}, v[2], v[3]
		// 1e-9 relative, the envelope's quantile accuracy in log x.
		if got := logTinyQuantile(d, p); math.Abs(got-want) > 1e-9*math.Abs(want) {
			t.Errorf("Beta(%v, %v) at %v: ln x = %v, R %v", d.Alpha, d.Beta, p, got, want)
		}
	}
	if len(rows) < 20 {
		t.Fatalf("only %d rows", len(rows))
	}
}

// TestPercentilesBeyondDoubleAreSaid: mean 0.5 and sd 0.4999 make
// Beta(2.0006e-4, 2.0006e-4), whose 5% point is about 3.2e-4999 (log10
// −4998.5002 by DLMF 8.17.8's leading term, evaluated in R 4.2.2 as
// (log(0.05) + log(a) + lbeta(a, a))/a/log(10)) and its 95% point 1 minus
// that. A double holds them as 0 and 1; the construction says so, with
// the values. An ordinary U-shaped prior, Beta(0.117, 0.117), says
// nothing of the kind; nor does one on wider bounds whose points are
// held.
func TestPercentilesBeyondDoubleAreSaid(t *testing.T) {
	c, err := Construct(ConstructionInput{Method: MethodMeanSD, Mean: 0.5, SD: 0.4999, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if q := c.Dist.Quantile(0.05); q != 0 {
		t.Fatalf("5%% point %v: the case no longer underflows", q)
	}
	m := warningMessage(c.Warnings, WarnBeyondDouble)
	for _, want := range []string{"5% point is about 3.2e-4999", "95% point is about 1 − 3.2e-4999", "shown as its bound"} {
		if !strings.Contains(m, want) {
			t.Errorf("warning %q lacks %q", m, want)
		}
	}
	if strings.Contains(m, "50%") {
		t.Errorf("warning %q names the median, which is 0.5", m)
	}
	scaled, err := Construct(ConstructionInput{Method: MethodMeanSD, Mean: 50, SD: 49.99, Lower: 0, Upper: 100})
	if err != nil {
		t.Fatal(err)
	}
	// On [0, 100] each point lies 100 times further from its bound.
	if m := warningMessage(scaled.Warnings, WarnBeyondDouble); !strings.Contains(m, "5% point is about 3.2e-4997") ||
		!strings.Contains(m, "95% point lies about 3.2e-4997 below the upper bound, 100") {
		t.Errorf("scaled: warning %q", m)
	}
	plain, err := Construct(ConstructionInput{Method: MethodMeanSD, Mean: 0.5, SD: 0.45, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if m := warningMessage(plain.Warnings, WarnBeyondDouble); m != "" {
		t.Errorf("Beta(0.117, 0.117) warns %q", m)
	}
}

func warningMessage(ws []Warning, code WarningCode) string {
	for _, w := range ws {
		if w.Code == code {
			return w.Message
		}
	}
	return ""
}

// TestPointsHeldAsABoundAreSaid: on bounds other than [0, 1] the bound's
// own size sets how near a point may lie before its double is the bound.
// Beta(0.0668198, 0.292528) puts its 5% point 10·qbeta(0.05, 0.0668198,
// 0.292528) = 5.0098e-18 above its lower bound (R 4.2.2): on [10, 20] the
// point 10 + 5.0e-18 is held as 10, and the warning says so; on [0, 10]
// the same point, 5.0e-18, is held as itself, and nothing is said. The
// mirror image, Beta(0.292528, 0.0668198) on [10, 20], holds its 95%
// point as 20.
func TestPointsHeldAsABoundAreSaid(t *testing.T) {
	a, b := 0.0668198, 0.292528
	low := ScaledBeta{Beta: Beta{Alpha: a, Beta: b}, Lower: 10, Upper: 20}
	if low.Quantile(0.05) != 10 {
		t.Fatalf("5%% point %v: the case is no longer held as the bound", low.Quantile(0.05))
	}
	if m := warningMessage(PriorWarnings(low), WarnBeyondDouble); !strings.Contains(m, "The 5% point lies about 5.0e-18 above the lower bound, 10:") ||
		!strings.Contains(m, "shown as the bound itself") {
		t.Errorf("[10, 20]: warning %q", m)
	}
	held := ScaledBeta{Beta: Beta{Alpha: a, Beta: b}, Lower: 0, Upper: 10}
	if m := warningMessage(PriorWarnings(held), WarnBeyondDouble); m != "" {
		t.Errorf("[0, 10] holds the 5%% point (%v) but warns %q", held.Quantile(0.05), m)
	}
	high := ScaledBeta{Beta: Beta{Alpha: b, Beta: a}, Lower: 10, Upper: 20}
	if m := warningMessage(PriorWarnings(high), WarnBeyondDouble); !strings.Contains(m, "The 95% point lies about 5.0e-18 below the upper bound, 20:") {
		t.Errorf("mirror on [10, 20]: warning %q", m)
	}
}

// TestFitPointsBeyondDoubleAreSaid: a fit's percentiles and fitted values
// are what pages and commands write, so a fit whose point is held as a
// bound says so as a prior does. 0.4, 0.5 and 0.6 at 1e-10, 1.0001e-10
// and 0.9999999999 fit Beta(0.0067230, 0.0074396), whose 95% point lies
// qbeta(0.05, 0.00743956, 0.00672296) = 4.07e-132 below 1 (R 4.2.2): held
// as 1. On [10, 20], 0.4, 0.5 and 0.9 at 10.00001, 10.1 and 16 fit
// Beta(0.0668198, 0.292528), whose 5% point lies 5.0e-18 above 10
// (TestPointsHeldAsABoundAreSaid): held as 10.
func TestFitPointsBeyondDoubleAreSaid(t *testing.T) {
	f, err := FitQuantiles(Judgement{Probs: []float64{0.4, 0.5, 0.6}, Values: []float64{1e-10, 1.0001e-10, 0.9999999999}, Lower: 0, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.Dist.Alpha/0.00672296-1) > 1e-5 || math.Abs(f.Dist.Beta.Beta/0.00743956-1) > 1e-5 {
		t.Fatalf("fit %v: the case has moved", f.Dist)
	}
	if f.Percentiles[2] != 1 {
		t.Fatalf("95%% point %v: no longer held as 1", f.Percentiles[2])
	}
	m := warningMessage(f.Warnings, WarnBeyondDouble)
	if !strings.Contains(m, "The fitted 95% point is about 1 − 4.1e-132:") || strings.Contains(m, "fitted 5% point") {
		t.Errorf("[0, 1]: warning %q", m)
	}
	f, err = FitQuantiles(Judgement{Probs: []float64{0.4, 0.5, 0.9}, Values: []float64{10.00001, 10.1, 16}, Lower: 10, Upper: 20})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.Dist.Alpha/0.0668198-1) > 1e-5 || math.Abs(f.Dist.Beta.Beta/0.292528-1) > 1e-5 || f.Percentiles[0] != 10 {
		t.Fatalf("fit %v, 5%% point %v: the case has moved", f.Dist, f.Percentiles[0])
	}
	if m := warningMessage(f.Warnings, WarnBeyondDouble); !strings.Contains(m, "The fitted 5% point lies about 5.0e-18 above the lower bound, 10:") {
		t.Errorf("[10, 20]: warning %q", m)
	}
	if lo, hi := BoundsShown(f.Dist, f.Shown()); !lo || hi {
		t.Errorf("BoundsShown says lower %v, upper %v; want the lower bound only", lo, hi)
	}
	// An ordinary fit says nothing of the kind.
	f, err = FitQuantiles(Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.02, 0.05, 0.12}, Lower: 0, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if m := warningMessage(f.Warnings, WarnBeyondDouble); m != "" {
		t.Errorf("an ordinary fit warns %q", m)
	}
}

// TestSubnormalPointIsHeldAsItself: the warning goes with a point whose
// double is the bound, not with every point below the smallest normal
// double. Beta(0.01, 1) has I_x(0.01, 1) = x^0.01 (a closed form), so its
// quantile at p = 10^(−3.15) is p^100 = 1e-315, a subnormal double that
// is the value: written as such, and not warned of. (R 4.2.2's qbeta
// stops at 5.6e-309 here.)
func TestSubnormalPointIsHeldAsItself(t *testing.T) {
	d := ScaledBeta{Beta: Beta{Alpha: 0.01, Beta: 1}, Lower: 0, Upper: 1}
	p := math.Pow(10, -3.15)
	if x := d.Quantile(p); math.Abs(x/1e-315-1) > 1e-6 {
		t.Fatalf("quantile %v, want 1e-315", x)
	}
	if m, ok := beyondDouble(d, []ShownPoint{{P: p, X: d.Quantile(p)}}, "the "); ok {
		t.Errorf("a subnormal point that is its value is warned of: %q", m)
	}
}

// TestQuantileInTheGapBesideABound: a quantile between 0 and the smallest
// double, 5e-324, is 0 as a double (and said to be beyond the double
// range), not 5e-324 shown as a number; likewise 1 above the last double
// below 1 (found in review). Beta(1e-5, 1) has I_x = x^(1e-5) (a closed
// form), so its median is 0.5^(1e5) = e^−69314.7, about 10^−30103, and
// Beta(1, 1e-5) has 1 − I_x = (1 − x)^(1e-5), so its 5% point lies
// 0.95^(1e5), about 10^−2228, below 1. The quantile had been chosen
// between the gap's ends by the nearer CDF, which there is far from
// linear; and the fit's percentiles, solved from a stated value, had
// stopped a few subnormals above 0 (9.9e-324) when a sixteenth of the
// bracket rounded to 0.
func TestQuantileInTheGapBesideABound(t *testing.T) {
	if x := (Beta{Alpha: 1e-5, Beta: 1}).Quantile(0.5); x != 0 {
		t.Errorf("Beta(1e-5, 1) median %v, want 0", x)
	}
	if x := (Beta{Alpha: 1, Beta: 1e-5}).Quantile(0.05); x != 1 {
		t.Errorf("Beta(1, 1e-5) 5%% point %v, want 1", x)
	}
	d := ScaledBeta{Beta: Beta{Alpha: 1e-5, Beta: 1}, Lower: 0, Upper: 1}
	if m, ok := beyondDouble(d, []ShownPoint{{P: 0.5, X: d.Quantile(0.5)}}, "the "); !ok || !strings.Contains(m, "50% point") {
		t.Errorf("the median held as 0 is not said: %q", m)
	}
	// A fit whose median and 95% point lie far below the smallest double
	// (the review's case): every percentile 0, and said.
	f, err := FitQuantiles(Judgement{Probs: []float64{0.998, 0.999}, Values: []float64{1e-10, 0.5}, Lower: 0, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	if f.Percentiles != [3]float64{0, 0, 0} {
		t.Errorf("fit %v: percentiles %v, want 0, 0, 0", f.Dist, f.Percentiles)
	}
	if m := warningMessage(f.Warnings, WarnBeyondDouble); !strings.Contains(m, "50% point") || !strings.Contains(m, "95% point") {
		t.Errorf("fit: warning %q", m)
	}
}

// TestPoolQuantileBesideTheSmallestDouble: a pool's quantile bracketed
// from the smallest double split its bracket as √(lo·hi), which underflowed
// to 0, so the median of this pool came back as 5e-324, marked unique,
// and the single Beta was fitted to it (found in review). The median of
// ½ Beta(1e-5, 0.99999) + ½ Beta(2, 2) is 0.00427061388170488: R 4.2.2,
// uniroot(function(x) 0.5*pbeta(x,1e-5,0.99999)+0.5*pbeta(x,2,2)-0.5,
// c(1e-300,0.5), tol=1e-16). Its 25% point lies below the smallest double
// (0.5·I_x(1e-5, 0.99999) is still 0.496 at 5e-324): 0.
func TestPoolQuantileBesideTheSmallestDouble(t *testing.T) {
	p, err := LinearPool([]ScaledBeta{Unit(Beta{Alpha: 1e-5, Beta: 0.99999}), Unit(Beta{Alpha: 2, Beta: 2})}, nil)
	if err != nil {
		t.Fatal(err)
	}
	const median = 0.00427061388170488 // R 4.2.2 uniroot, above
	for _, probs := range [][]float64{{0.5}, {0.25, 0.5, 0.75}, {0.05, 0.5, 0.95}} {
		qs, err := p.QuantileSet(probs)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range qs {
			switch q.Prob {
			case 0.5:
				if math.Abs(q.Value/median-1) > 1e-9 || !q.Unique {
					t.Errorf("asked with %v: median %v (unique %v), want %v", probs, q.Value, q.Unique, median)
				}
			case 0.25:
				if q.Value != 0 {
					t.Errorf("asked with %v: 25%% point %v, want 0", probs, q.Value)
				}
			}
		}
	}
}
