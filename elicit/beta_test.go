package elicit

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// refRow is one row of testdata/r/beta_reference.csv, written by
// testdata/r/beta_reference.R with R's pbeta, qbeta and optim (the R
// version is on the file's first line).
type refRow struct {
	kind, name   string
	alpha, beta  float64
	arg, value   float64
	probs, vals  []float64
	lower, upper float64
}

const refPath = "../testdata/r/beta_reference.csv"

func readReference(t *testing.T) []refRow {
	t.Helper()
	num := func(s string) float64 {
		if s == "" {
			return math.NaN()
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("bad number %q in %s: %v", s, refPath, err)
		}
		return v
	}
	list := func(s string) []float64 {
		if s == "" {
			return nil
		}
		var out []float64
		for _, x := range strings.Split(s, ";") {
			out = append(out, num(x))
		}
		return out
	}
	var rows []refRow
	for _, c := range referenceTable(t, refPath, "# R version", 10) {
		rows = append(rows, refRow{
			kind: c[0], name: c[1], alpha: num(c[2]), beta: num(c[3]),
			arg: num(c[4]), value: num(c[5]), probs: list(c[6]), vals: list(c[7]),
			lower: num(c[8]), upper: num(c[9]),
		})
	}
	return rows
}

// TestBetaAgainstR compares CDF and Quantile with R's pbeta and qbeta over
// a grid of shapes from 0.05 to 1e4 (source: R, see refRow). Quantiles
// must agree to 1e-9 relative; CDF values to 1e-9 relative, or 1e-15
// absolute where R's value is below 1e-6.
func TestBetaAgainstR(t *testing.T) {
	var nq, np, nd int
	for _, r := range readReference(t) {
		d, err := newBeta(r.alpha, r.beta)
		if err != nil {
			t.Fatalf("reference shape: %v", err)
		}
		switch r.kind {
		case "qbeta":
			nq++
			got := d.Quantile(r.arg)
			if rel := math.Abs(got-r.value) / r.value; !(rel <= 1e-9) {
				t.Errorf("Beta(%g, %g).Quantile(%g) = %.17g, R qbeta %.17g (rel %.1e)", r.alpha, r.beta, r.arg, got, r.value, rel)
			}
		case "dbeta":
			// R's dbeta against PDF (gonum's density) and Density (the
			// same formula with log B(α, β) computed once), on [0, 1] and
			// on [0, 4] (where x and u = x/4 are both exact), where the
			// density is R's divided by 4.
			nd++
			scaled := ScaledBeta{Beta: d, Lower: 0, Upper: 4}
			for name, got := range map[string]float64{
				"PDF":            d.PDF(r.arg),
				"Density":        Unit(d).Density()(r.arg),
				"scaled Density": 4 * scaled.Density()(4*r.arg),
			} {
				diff := math.Abs(got - r.value)
				if !(diff <= 1e-9*r.value || (r.value < 1e-290 && diff <= 1e-300)) {
					t.Errorf("Beta(%g, %g) %s(%g) = %.17g, R dbeta %.17g (diff %.1e)", r.alpha, r.beta, name, r.arg, got, r.value, diff)
				}
			}
		case "pbeta":
			np++
			got := d.CDF(r.arg)
			diff := math.Abs(got - r.value)
			if !(diff <= 1e-9*r.value || (r.value < 1e-6 && diff <= 1e-15)) {
				t.Errorf("Beta(%g, %g).CDF(%g) = %.17g, R pbeta %.17g (diff %.1e)", r.alpha, r.beta, r.arg, got, r.value, diff)
			}
		}
	}
	if nq < 500 || np < 500 || nd < 500 {
		t.Fatalf("reference table too small: %d qbeta, %d pbeta, %d dbeta rows", nq, np, nd)
	}
}

// TestBetaClosedForms checks closed forms, each with its source.
func TestBetaClosedForms(t *testing.T) {
	const tol = 1e-12
	// Beta(1,1) is the uniform distribution on [0,1]: f = 1, F(x) = x,
	// Q(p) = p, mean 1/2, variance 1/12 (Johnson, Kotz & Balakrishnan 1995,
	// vol. 2, ch. 25, §2).
	u := Beta{1, 1}
	for _, x := range []float64{1e-9, 0.1, 0.25, 0.5, 0.9, 1 - 1e-9} {
		if got := u.CDF(x); math.Abs(got-x) > tol {
			t.Errorf("Beta(1,1).CDF(%g) = %g, want %g", x, got, x)
		}
		if got := u.Quantile(x); math.Abs(got-x) > tol {
			t.Errorf("Beta(1,1).Quantile(%g) = %g, want %g", x, got, x)
		}
		if got := u.PDF(x); math.Abs(got-1) > tol {
			t.Errorf("Beta(1,1).PDF(%g) = %g, want 1", x, got)
		}
	}
	if math.Abs(u.Mean()-0.5) > tol || math.Abs(u.Variance()-1.0/12) > tol {
		t.Errorf("Beta(1,1) mean %g variance %g, want 1/2 and 1/12", u.Mean(), u.Variance())
	}
	// Beta(a,1) has F(x) = x^a, so Q(p) = p^(1/a) (same source, ch. 25 §2:
	// the power-function distribution).
	for _, a := range []float64{0.05, 0.3, 1, 2.5, 40, 1000} {
		d := Beta{a, 1}
		for _, p := range []float64{0.001, 0.05, 0.5, 0.95, 0.999} {
			want := math.Pow(p, 1/a)
			if got := d.Quantile(p); math.Abs(got-want) > 1e-10*want {
				t.Errorf("Beta(%g,1).Quantile(%g) = %.15g, want p^(1/a) = %.15g", a, p, got, want)
			}
			x := want
			if got := d.CDF(x); math.Abs(got-p) > 1e-10 {
				t.Errorf("Beta(%g,1).CDF(%g) = %.15g, want x^a = %g", a, x, got, p)
			}
		}
	}
	// Mean α/(α+β), variance αβ/((α+β)²(α+β+1)), mode (α−1)/(α+β−2)
	// (same source, ch. 25 §2); checked against worked values by hand:
	// Beta(2,3): mean 0.4, variance 6/(25·6) = 0.04, mode 1/3.
	d := Beta{2, 3}
	if math.Abs(d.Mean()-0.4) > tol || math.Abs(d.Variance()-0.04) > tol || math.Abs(d.SD()-0.2) > tol {
		t.Errorf("Beta(2,3): mean %g var %g sd %g, want 0.4, 0.04, 0.2", d.Mean(), d.Variance(), d.SD())
	}
	if m, ok := d.Mode(); !ok || math.Abs(m-1.0/3) > tol {
		t.Errorf("Beta(2,3).Mode() = %g, %v; want 1/3, true", m, ok)
	}
	if d.ESS() != 5 {
		t.Errorf("Beta(2,3).ESS() = %g, want 5", d.ESS())
	}
	// Scaled Beta: X = L + (U−L)Y, so F_X(x) = F_Y((x−L)/(U−L)),
	// Q_X(p) = L + (U−L)Q_Y(p), E X = L + (U−L)E Y, Var X = (U−L)² Var Y,
	// f_X(x) = f_Y((x−L)/(U−L))/(U−L) (change of variables; same source,
	// ch. 25 §1, the four-parameter form).
	s := ScaledBeta{Beta: Beta{2, 3}, Lower: -10, Upper: 10}
	for _, y := range []float64{0.05, 0.3, 0.7} {
		x := -10 + 20*y
		if got, want := s.CDF(x), d.CDF(y); math.Abs(got-want) > tol {
			t.Errorf("scaled CDF(%g) = %g, want %g", x, got, want)
		}
		if got, want := s.PDF(x), d.PDF(y)/20; math.Abs(got-want) > tol {
			t.Errorf("scaled PDF(%g) = %g, want %g", x, got, want)
		}
		if got, want := s.Quantile(y), -10+20*d.Quantile(y); math.Abs(got-want) > tol {
			t.Errorf("scaled Quantile(%g) = %g, want %g", y, got, want)
		}
	}
	if math.Abs(s.Mean()-(-2)) > tol || math.Abs(s.Variance()-16) > tol || math.Abs(s.SD()-4) > tol {
		t.Errorf("scaled Beta(2,3) on [-10,10]: mean %g var %g, want -2 and 16", s.Mean(), s.Variance())
	}
	if m, ok := s.Mode(); !ok || math.Abs(m-(-10+20.0/3)) > tol {
		t.Errorf("scaled mode %g, %v", m, ok)
	}
}

// TestBetaValidate checks the parameter rules through NewBeta and
// NewScaledBeta.
func TestBetaValidate(t *testing.T) {
	cases := []struct {
		a, b, lo, hi float64
		field        string
		rule         Rule
	}{
		{0, 1, 0, 1, "alpha", RulePositive},
		{1, -2, 0, 1, "beta", RulePositive},
		{math.NaN(), 1, 0, 1, "alpha", RuleFinite},
		{1, math.Inf(1), 0, 1, "beta", RuleFinite},
		{1, 1, math.Inf(-1), 1, "lower", RuleFinite},
		{1, 1, 0, math.NaN(), "upper", RuleFinite},
		{1, 1, 2, 1, "lower", RuleBoundsOrder},
		{1, 1, 1, 1, "lower", RuleBoundsOrder},
	}
	for _, c := range cases {
		_, err := newScaledBeta(c.a, c.b, c.lo, c.hi)
		checkRule(t, err, c.field, c.rule)
	}
	if _, err := newScaledBeta(2, 3, -1, 1); err != nil {
		t.Errorf("valid scaled Beta rejected: %v", err)
	}
}

// MaxDensity is the bounded density's top: the closed forms f(0) = β of
// Beta(1, β), f(1) = α of Beta(α, 1) and 1 of the uniform (Johnson, Kotz
// & Balakrishnan 1995, vol. 2, ch. 25), divided by the width; the density
// at the mode (α − 1)/(α + β − 2) otherwise, which no other point exceeds;
// none where a shape below 1 makes the density unbounded.
func TestMaxDensity(t *testing.T) {
	for _, c := range []struct {
		d    ScaledBeta
		want float64
	}{
		{Unit(Beta{1, 21}), 21},
		{Unit(Beta{30, 1}), 30},
		{Unit(Beta{1, 1}), 1},
		{ScaledBeta{Beta{1, 30}, 0, 200}, 30.0 / 200},
		{Unit(Beta{2, 2}), 1.5}, // 6x(1 − x) at 1/2
	} {
		got, ok := c.d.MaxDensity()
		if !ok || math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("%v: MaxDensity %v, %v; want %v", c.d, got, ok, c.want)
		}
	}
	d := Unit(Beta{1.000001, 70})
	top, ok := d.MaxDensity()
	for x := 1e-12; x < 1; x *= 1.5 {
		if !ok || d.PDF(x) > top*(1+1e-12) {
			t.Fatalf("%v: density %v at %v above its top %v", d, d.PDF(x), x, top)
		}
	}
	for _, b := range []Beta{{0.5, 3}, {3, 0.9}, {0.5, 0.5}} {
		if _, ok := Unit(b).MaxDensity(); ok {
			t.Errorf("%v: unbounded density given a top", b)
		}
	}
}

// TestBetaModeNearOne: the mode (α−1)/(α+β−2) of shapes just above 1 is
// the ratio of their excesses over 1 (the published formula; the
// expected values follow from it by hand). α+β−2 lost those excesses
// to the rounding of α+β: Beta(1+2⁻⁵², 1+2⁻⁵¹) gave 0.25 or 0.5 where
// the mode is 1/3.
func TestBetaModeNearOne(t *testing.T) {
	e := math.Pow(2, -52)
	for _, c := range []struct {
		d    Beta
		want float64
	}{
		{Beta{1 + e, 1 + 2*e}, 1.0 / 3},
		{Beta{1 + 3*e, 1 + e}, 0.75},
		{Beta{1 + e, 1 + e}, 0.5},
		{Beta{1 + 1e-9, 1 + 3e-9}, 0.25},
	} {
		m, ok := c.d.Mode()
		if !ok || math.Abs(m-c.want) > 1e-6*c.want {
			t.Errorf("Beta(1%+g, 1%+g).Mode() = %v, %v; want %v", c.d.Alpha-1, c.d.Beta-1, m, ok, c.want)
		}
	}
}
