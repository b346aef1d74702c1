package elicit

import (
	"math"
	"strconv"
	"testing"
)

// poolBetaRow is one pool of testdata/scipy/pool_beta_reference.csv,
// written by testdata/scipy/pool_beta_reference.py with Debian's
// python3-scipy 1.10.1 (the version is on the file's first line).
type poolBetaRow struct {
	name                       string
	pool                       Pool
	alpha, beta, sse, maxErr   float64
	mean, sd, sdRatio, intRat  float64
	qdiff                      [3]float64
	farCDF, farSD, farInterval bool
}

func readPoolBetaReference(t *testing.T) []poolBetaRow {
	t.Helper()
	var rows []poolBetaRow
	for _, c := range referenceTable(t, "../testdata/scipy/pool_beta_reference.csv", "# scipy", 18) {
		num := func(i int) float64 { return referenceCell(t, c, i) }
		p := referencePool(t, c)
		rows = append(rows, poolBetaRow{
			name: c[0], pool: p,
			alpha: num(4), beta: num(5), sse: num(6), maxErr: num(7),
			mean: num(8), sd: num(9), sdRatio: num(10), intRat: num(11),
			qdiff:  [3]float64{num(12), num(13), num(14)},
			farCDF: c[15] == "1", farSD: c[16] == "1", farInterval: c[17] == "1",
		})
	}
	return rows
}

// TestBestBetaAgainstSciPy checks the single Beta that stands in for a
// linear pool, and the verdicts on it that the facilitator's panel and
// the study page show, against SciPy 1.10.1
// (testdata/scipy/pool_beta_reference.py): the pool's quantiles on the
// grid 0.01…0.99 by brentq on the mixture of scipy.stats.beta CDFs, the
// least-squares Beta by a lattice over the whole shape box and
// scipy.optimize.least_squares from its lowest points, the pool's mean
// and sd from scipy.stats.beta's moments (checked there by quadrature).
// The pools are invented. Tolerances: the objective within 1e-9 relative
// (the global minimum, as TestFitGlobalReference); the shapes within 1e-5
// relative (the objective is flat to second order at its minimum, so the
// shapes are settled to about the square root of its precision, and the
// ratios with them); the largest CDF distance, SciPy's taken over the
// whole of [0, 1] and refined at each peak, within 1e-6 in probability,
// the quantile differences within 1e-7 of the width; the pool's own mean
// and sd within 1e-12 and 1e-10 relative; the verdicts exactly (SciPy's
// values lie at least 1e-3 from every limit). Measured: shapes within
// 5e-7, objectives within 4e-11 relative.
func TestBestBetaAgainstSciPy(t *testing.T) {
	rows := readPoolBetaReference(t)
	if len(rows) < 8 {
		t.Fatalf("%d pools in the reference table", len(rows))
	}
	for _, r := range rows {
		rep, err := r.pool.BestBeta()
		if err != nil {
			t.Errorf("%s: %v", r.name, err)
			continue
		}
		width := r.pool.Upper - r.pool.Lower
		if rep.Dist.Lower != r.pool.Lower || rep.Dist.Upper != r.pool.Upper {
			t.Errorf("%s: the Beta is on [%v, %v], the pool on [%v, %v]", r.name, rep.Dist.Lower, rep.Dist.Upper, r.pool.Lower, r.pool.Upper)
		}
		if !(rep.SSE <= r.sse*(1+1e-9)) || !relClose(rep.SSE, r.sse, 1e-9) {
			t.Errorf("%s: objective %.12g, SciPy's global minimum %.12g", r.name, rep.SSE, r.sse)
		}
		if !relClose(rep.Dist.Alpha, r.alpha, 1e-5) || !relClose(rep.Dist.Beta.Beta, r.beta, 1e-5) {
			t.Errorf("%s: Beta(%.10g, %.10g), SciPy Beta(%.10g, %.10g)", r.name, rep.Dist.Alpha, rep.Dist.Beta.Beta, r.alpha, r.beta)
		}
		if math.Abs(rep.MaxCDFError-r.maxErr) > 1e-6 {
			t.Errorf("%s: largest CDF distance %.10g, SciPy %.10g", r.name, rep.MaxCDFError, r.maxErr)
		}
		if !relClose(r.pool.Mean(), r.mean, 1e-12) || !relClose(r.pool.SD(), r.sd, 1e-10) {
			t.Errorf("%s: pool mean %.15g sd %.15g, SciPy %.15g %.15g", r.name, r.pool.Mean(), r.pool.SD(), r.mean, r.sd)
		}
		if !relClose(rep.SDRatio, r.sdRatio, 1e-5) || !relClose(rep.IntervalRatio, r.intRat, 1e-5) {
			t.Errorf("%s: sd ratio %.10g, interval ratio %.10g; SciPy %.10g, %.10g", r.name, rep.SDRatio, rep.IntervalRatio, r.sdRatio, r.intRat)
		}
		for i, want := range r.qdiff {
			if got := rep.QuantileDiffs[i]; math.Abs(got-want) > 1e-7*width {
				t.Errorf("%s: quantile difference %d %.10g, SciPy %.10g", r.name, i, got, want)
			}
		}
		cdf, sd, interval := rep.Far()
		if cdf != r.farCDF || sd != r.farSD || interval != r.farInterval {
			t.Errorf("%s: far (cdf, sd, interval) = (%v, %v, %v), SciPy (%v, %v, %v)", r.name, cdf, sd, interval, r.farCDF, r.farSD, r.farInterval)
		}
		if far := r.farCDF || r.farSD || r.farInterval; far != (len(rep.Warnings) > 0) {
			t.Errorf("%s: warnings %q, SciPy's verdicts far = %v", r.name, rep.Warnings, far)
		}
	}
}

// TestLogPoolAgainstSciPy checks the logarithmic pool against SciPy 1.10.1
// (testdata/scipy/log_pool_reference.py), which integrates the weighted
// geometric mean of the experts' densities numerically (scipy.integrate.quad
// of exp(Σ wᵢ log fᵢ), normalised) and reads the pool's mean, sd, CDF and
// quantiles from it, without assuming that the pool is again a Beta; the
// pools are invented. Tolerance: 1e-10 relative, for probabilities down
// to 1e-20 too (the quadrature asks for 1e-12; measured, every value
// agrees within 4e-13).
func TestLogPoolAgainstSciPy(t *testing.T) {
	type key struct{ name, comps string }
	pools := map[key]ScaledBeta{}
	n := 0
	for _, c := range referenceTable(t, "../testdata/scipy/log_pool_reference.csv", "# scipy", 7) {
		num := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("%s: %q: %v", c[0], s, err)
			}
			return v
		}
		k := key{c[0], c[3]}
		lp, ok := pools[k]
		if !ok {
			ds, ws := parseComponents(t, c[3])
			for i := range ds {
				ds[i].Lower, ds[i].Upper = num(c[1]), num(c[2])
			}
			var err error
			if lp, err = LogPool(ds, ws); err != nil {
				t.Fatalf("%s: %v", c[0], err)
			}
			pools[k] = lp
		}
		want := num(c[6])
		var got float64
		switch c[4] {
		case "mean":
			got = lp.Mean()
		case "sd":
			got = lp.SD()
		case "cdf":
			if got = lp.CDF(num(c[5])); !relClose(got, want, 1e-10) {
				t.Errorf("%s: P(X ≤ %s) = %.15g, SciPy %.15g", c[0], c[5], got, want)
			}
			n++
			continue
		case "quantile":
			got = lp.Quantile(num(c[5]))
		default:
			t.Fatalf("%s: unknown kind %q", c[0], c[4])
		}
		if math.Abs(got-want) > 1e-10*math.Abs(want)+1e-13*(lp.Upper-lp.Lower) {
			t.Errorf("%s: %s %s = %.15g, SciPy %.15g", c[0], c[4], c[5], got, want)
		}
		n++
	}
	if len(pools) < 8 || n < 100 {
		t.Fatalf("%d pools, %d values in the reference table", len(pools), n)
	}
}

// referenceCell is column i of a reference table's row c as a number.
func referenceCell(t *testing.T, c []string, i int) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(c[i], 64)
	if err != nil {
		t.Fatalf("%s: column %d: %v", c[0], i, err)
	}
	return v
}

// referencePool is the linear pool of a reference table's row c: its
// bounds in columns 1 and 2, its components in column 3 (the layout of
// pool_beta_reference.csv and pool_gap_reference.csv).
func referencePool(t *testing.T, c []string) Pool {
	t.Helper()
	ds, ws := parseComponents(t, c[3])
	for i := range ds {
		ds[i].Lower, ds[i].Upper = referenceCell(t, c, 1), referenceCell(t, c, 2)
	}
	p, err := LinearPool(ds, ws)
	if err != nil {
		t.Fatalf("%s: %v", c[0], err)
	}
	return p
}
