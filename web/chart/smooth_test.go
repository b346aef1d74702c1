package chart

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// pathSamples evaluates an SVG path of absolute M, L, C and S commands:
// every end point, and n points along each cubic piece (the Bézier
// polynomial, SVG 1.1 §8.3.6; S reflects the previous second control
// point about the current point).
func pathSamples(t *testing.T, d string, n int) [][2]float64 {
	t.Helper()
	toks := pathNumber.FindAllString(d, -1)
	var out [][2]float64
	var cur, prevC2 [2]float64
	havePrev := false
	cmd := ""
	num := func(i int) float64 {
		v, err := strconv.ParseFloat(toks[i], 64)
		if err != nil {
			t.Fatalf("path %q: token %d %q is not a number", d, i, toks[i])
		}
		return v
	}
	cubic := func(p0, p1, p2, p3 [2]float64) {
		for k := 1; k <= n; k++ {
			s := float64(k) / float64(n)
			u := 1 - s
			var q [2]float64
			for j := range 2 {
				q[j] = u*u*u*p0[j] + 3*u*u*s*p1[j] + 3*u*s*s*p2[j] + s*s*s*p3[j]
			}
			out = append(out, q)
		}
	}
	for i := 0; i < len(toks); {
		if _, err := strconv.ParseFloat(toks[i], 64); err != nil {
			cmd = toks[i]
			i++
			continue
		}
		switch cmd {
		case "M", "L":
			cur = [2]float64{num(i), num(i + 1)}
			out = append(out, cur)
			havePrev = false
			i += 2
		case "C":
			p1, p2, p3 := [2]float64{num(i), num(i + 1)}, [2]float64{num(i + 2), num(i + 3)}, [2]float64{num(i + 4), num(i + 5)}
			cubic(cur, p1, p2, p3)
			cur, prevC2, havePrev = p3, p2, true
			i += 6
		case "S":
			p1 := cur
			if havePrev {
				p1 = [2]float64{2*cur[0] - prevC2[0], 2*cur[1] - prevC2[1]}
			}
			p2, p3 := [2]float64{num(i), num(i + 1)}, [2]float64{num(i + 2), num(i + 3)}
			cubic(cur, p1, p2, p3)
			cur, prevC2, havePrev = p3, p2, true
			i += 4
		default:
			t.Fatalf("path %q: command %q not understood", d, cmd)
		}
	}
	return out
}

var smoothCases = []elicit.ScaledBeta{
	sbeta(2.022, 40.59, 0, 1), // the benchmark's fit
	sbeta(2, 2, 0, 1),
	sbeta(2, 2000, 0, 1),
	sbeta(4.2, 17.9, 10, 500),
	sbeta(55, 3.5, -1, 1),
	sbeta(300, 2, 0, 1),
	sbeta(2000, 50000, 0, 1), // zoomed far in
	sbeta(2.5, 2.5, 0, 100),
	sbeta(1e5, 1e5, 0, 1),
}

// TestSmoothCurvesFollowTheBeta checks the cubic pieces against the
// curve itself: at 32 points along every piece of both layouts' density
// and CDF paths, the drawn point lies within 0.25 px of the Beta's own
// density and CDF (measured square to the curve's tangent at the drawn x),
// which elicit computes (and beta_test.go checks against R's dbeta and
// pbeta). Control points are rounded to a hundredth of a pixel, which the
// margin covers. Narrow experts are also drawn in a panel whose window a
// wide expert sets, where their whole curve spans a few pixels.
func TestSmoothCurvesFollowTheBeta(t *testing.T) {
	type drawing struct {
		d      elicit.ScaledBeta
		others []elicit.ScaledBeta // drawn in the same picture
	}
	var cases []drawing
	for _, d := range smoothCases {
		cases = append(cases, drawing{d: d})
	}
	// A narrow expert in a panel whose window a wide one sets: the spike
	// is a few hundredths of the window, and must not fall between knots.
	cases = append(cases,
		drawing{sbeta(2000, 50000, 0, 1), []elicit.ScaledBeta{sbeta(2, 5, 0, 1)}},
		drawing{sbeta(5000, 5000, 0, 1), []elicit.ScaledBeta{sbeta(2, 2, 0, 1)}},
		drawing{sbeta(3, 60, 0, 1), []elicit.ScaledBeta{sbeta(0.5, 0.5, 0, 1)}}, // beside a U shape
	)
	for _, c := range cases {
		d := c.d
		if !smoothShape(d) {
			t.Fatalf("%v is not drawn smooth", d)
		}
		curves := []Curve{{Label: "x", Dist: d}}
		for _, o := range c.others {
			curves = append(curves, Curve{Label: "other", Dist: o})
		}
		for _, lay := range layouts {
			remembered.reset()
			g := newTwin(lay, "q", "", d.Lower, d.Upper, curves, nil, true)
			l := g.Lines[0]
			if !strings.Contains(l.Density, "C") || !strings.Contains(l.Cumul, "C") || strings.Contains(l.Cumul, "L") {
				t.Fatalf("%v %s: not drawn by cubic pieces: %.80s", d, lay.Name, l.Cumul)
			}
			dataX := func(px float64) float64 { return g.dens.X0 + (px-g.dens.Left)/g.dens.Width*(g.dens.X1-g.dens.X0) }
			worst := 0.0
			// The curve's value is elicit's PDF or CDF (checked against R's
			// dbeta and pbeta in beta_test.go); its slope, which only turns
			// a vertical offset into a distance square to the curve, is
			// the unit Beta's scaled to the quantity.
			f, w := d.Beta.CurveFunc(), d.Upper-d.Lower
			for _, c := range []struct {
				path string
				fr   frame
				// val is the curve and its slope, in data units.
				val func(float64) (float64, float64)
			}{
				{l.Density, g.dens, func(x float64) (float64, float64) { _, _, s := f((x - d.Lower) / w); return d.PDF(x), s / w / w }},
				{l.Cumul, g.cumul, func(x float64) (float64, float64) { _, p, _ := f((x - d.Lower) / w); return d.CDF(x), p / w }},
			} {
				pts := pathSamples(t, c.path, 32)
				// Pixels per data unit, across and up.
				kx, ky := c.fr.Width/(c.fr.X1-c.fr.X0), c.fr.Height/(c.fr.Y1-c.fr.Y0)
				for k, p := range pts {
					if k > 0 && p[0] < pts[k-1][0]-1e-9 {
						t.Fatalf("%v %s: the path turns back at x = %v px", d, lay.Name, p[0])
					}
					y, slope := c.val(dataX(p[0]))
					// The distance to the curve's tangent at the drawn x:
					// where the curve is steep, a hundredth of a pixel
					// across (the coordinates' rounding) is much more up.
					sp := slope * ky / kx
					off := math.Abs(p[1]-c.fr.py(y)) / math.Sqrt(1+sp*sp)
					worst = math.Max(worst, off)
				}
			}
			if worst > 0.25 {
				t.Errorf("%v %s: a drawn point strays %.3f px from the curve", d, lay.Name, worst)
			}
			t.Logf("%v %s: at most %.3f px off", d.Beta, lay.Name, worst)
		}
	}
}

// TestSmoothTopIsTheMode checks the density axis's top for smooth shapes
// against the rule the polyline used: the largest of 201 samples over the
// curve's own window, never capped as a spike (densityCap). The mode's
// density is the true maximum, so it is at least the largest sample and
// within 0.5% of it.
func TestSmoothTopIsTheMode(t *testing.T) {
	for _, d := range append(smoothCases, sbeta(2, 1e6, 0, 1), sbeta(1e6, 2, 0, 1), sbeta(2, 3, 0, 1)) {
		s := smoothSpan(d, d.Lower, d.Upper, nil)
		own := frame{X0: s.ownX0, X1: s.ownX1}
		f := d.Density()
		var ys []float64
		for _, x := range own.grid(gridPoints) {
			ys = append(ys, f(x))
		}
		top, capped := densityCap(ys)
		if capped {
			t.Errorf("%v: the sampled rule would cap its density", d)
		}
		if s.top < top*(1-1e-12) || s.top > top*1.005 {
			t.Errorf("%v: top %v, largest sample %v", d, s.top, top)
		}
	}
}

// TestSmoothSpanMatchesQuantiles checks that the starting points change
// nothing: the smooth span's tails and percentiles are elicit's
// quantiles (checked against R's qbeta in beta_test.go).
func TestSmoothSpanMatchesQuantiles(t *testing.T) {
	for _, d := range smoothCases {
		s := smoothSpan(d, d.Lower, d.Upper, nil)
		for i, pair := range [][2]float64{{s.lo, tailLow}, {s.hi, tailHigh}, {s.percentile[0], 0.05}, {s.percentile[1], 0.5}, {s.percentile[2], 0.95}} {
			if want := d.Quantile(pair[1]); math.Abs(pair[0]-want) > 1e-12*math.Max(1, math.Abs(want)) {
				t.Errorf("%v: value %d (p = %v) %v, Quantile %v", d, i, pair[1], pair[0], want)
			}
		}
	}
}

// TestFrameIsRememberedAndSame checks the remembered frame: two drafts
// whose windows snap together share it, the picture's bytes are the same
// whether the frame comes rendered from memory or is drawn afresh, and
// a draft whose window moves gets a frame of its own.
func TestFrameIsRememberedAndSame(t *testing.T) {
	remembered.reset()
	d := sbeta(2.022, 40.59, 0, 1)
	v := fitViewOf(d, Point{0.01, 0.05}, Point{0.04, 0.5}, Point{0.12, 0.95})
	first := render(t, Fit(v))
	frames := remembered.frames.Len()
	if frames != len(layouts) {
		t.Fatalf("%d frames remembered, want one per layout", frames)
	}
	// A revised draft: α 1% larger moves the curve, not the axes.
	v.Dist.Alpha = d.Alpha * 1.01
	v.Percentiles = fitViewOf(v.Dist).Percentiles
	second := render(t, Fit(v))
	if remembered.frames.Len() != frames {
		t.Error("a draft whose window snaps to the same axes drew a new frame")
	}
	if first == second {
		t.Error("the second draft drew the same picture")
	}
	// Drawn afresh, without the rendered frame.
	m := newFitModel(v)
	for i := range m.Drawings {
		m.Drawings[i].Twin.AxesSVG, m.Drawings[i].Twin.NotesSVG = "", ""
	}
	if live := render(t, fitFigure(m)); live != second {
		t.Error("the frame rendered from memory differs from the frame drawn afresh")
	}
	v.Dist = sbeta(6, 30, 0, 1)
	_ = render(t, Fit(v))
	if remembered.frames.Len() != 2*frames {
		t.Errorf("%d frames after a draft with another window, want %d", remembered.frames.Len(), 2*frames)
	}
}

// TestWindowAndTopAreSnapped checks that a twin's window ends and its
// density axis's top are whole multiples of their round steps, or the
// question's bounds.
func TestWindowAndTopAreSnapped(t *testing.T) {
	for _, d := range smoothCases {
		g := newTwin(wideLayout, "q", "", d.Lower, d.Upper, []Curve{{Label: "x", Dist: d}}, nil, false)
		step := niceStep(g.X1-g.X0, 16)
		for _, x := range []float64{g.X0, g.X1} {
			if x != d.Lower && x != d.Upper && math.Abs(x/step-math.Round(x/step)) > 1e-6 {
				t.Errorf("%v: window end %v is not a multiple of about %v", d, x, step)
			}
		}
		ts := niceStep(g.DensityTop, 16)
		if r := g.DensityTop / ts; math.Abs(r-math.Round(r)) > 1e-9 {
			t.Errorf("%v: density top %v is not a multiple of %v", d, g.DensityTop, ts)
		}
		if g.DensityTop < 1.08*smoothTop(d) {
			t.Errorf("%v: density top %v below 1.08 times the mode's density %v", d, g.DensityTop, smoothTop(d))
		}
	}
}

// TestSmoothFallsBackToThePolyline: a smooth Beta whose knots cannot meet
// the tolerance within smoothDepth halvings is drawn as the clipped
// polyline. The span is remembered wrong on purpose (its own window far
// from the curve), so only the mode's knot is near the curve and its
// flanks fall in pieces 700 standard deviations long.
func TestSmoothFallsBackToThePolyline(t *testing.T) {
	remembered.reset()
	d := sbeta(3e6, 7e6, 0, 1) // all its mass within 0.001 of 0.3
	fake := smoothSpan(d, 0, 1, nil)
	fake.ownX0, fake.ownX1 = 0.5, 0.6
	fake.lo, fake.hi, fake.percentile = 0.5, 0.6, [3]float64{0.52, 0.55, 0.58}
	if _, ok := smoothKnots(d, 0, 1, fake); ok {
		t.Fatal("knots seeded away from the curve met the tolerance; the test needs them not to")
	}
	remembered.spans.Get(spanKey{d, 0, 1}, func() curveSpan { return fake })
	// Stated points near both bounds hold the window at [0, 1].
	g := newTwin(wideLayout, "q", "", 0, 1, []Curve{{Label: "x", Dist: d}}, []float64{0.01, 0.99}, false)
	if g.X0 != 0 || g.X1 != 1 {
		t.Fatalf("window [%v, %v], want [0, 1]", g.X0, g.X1)
	}
	l := g.Lines[0]
	if strings.Contains(l.Density, "C") || !strings.Contains(l.Density, "L") {
		t.Fatalf("not drawn as a polyline: %.80s", l.Density)
	}
	for _, p := range pathSamples(t, l.Density, 1) {
		if p[1] < g.dens.Top-1e-9 || p[1] > g.dens.bottom()+1e-9 {
			t.Fatalf("the polyline leaves the plot at y = %v", p[1])
		}
	}
}

// TestKnotsCDFFromTheDensity checks the CDF that smoothKnots gives its
// knots, summed from the density (cumulate) rather than evaluated, against
// elicit's CDF (checked against R's pbeta in beta_test.go): within the
// tolerance, a tenth of a wide-layout pixel, at every knot of every smooth
// case, and exact at the anchors (the span's quantiles).
func TestKnotsCDFFromTheDensity(t *testing.T) {
	tol := smoothTolerance / wideLayout.CDFH
	for _, d := range smoothCases {
		s := smoothSpan(d, d.Lower, d.Upper, nil)
		x0, x1 := window(d.Lower, d.Upper, [][2]float64{{s.lo, s.hi}}, nil)
		ks, ok := smoothKnots(d, x0, x1, s)
		if !ok {
			t.Fatalf("%v: no knots", d)
		}
		w := d.Upper - d.Lower
		worst := 0.0
		for _, k := range ks {
			if off := math.Abs(k.cdf - d.CDF(d.Lower+w*k.u)); !(off <= worst) {
				worst = off // NaN, a knot without its CDF, stays and fails
			}
		}
		if !(worst <= tol) {
			t.Errorf("%v: a knot's CDF is %.2g off, beyond %.2g", d.Beta, worst, tol)
		}
		t.Logf("%v: %d knots, CDF at most %.1e off", d.Beta, len(ks), worst)
	}
	// The CDF never falls from knot to knot, also where a narrow curve's
	// far tails are drawn in long pieces across a panel's whole window.
	for _, d := range append(smoothCases, sbeta(3, 60, 0, 1), sbeta(2, 2000, 0, 1), sbeta(2000, 50000, 0, 1)) {
		s := smoothSpan(d, d.Lower, d.Upper, nil)
		ks, ok := smoothKnots(d, d.Lower, d.Upper, s)
		if !ok {
			continue // drawn as the polyline
		}
		for i := 1; i < len(ks); i++ {
			if !(ks[i].cdf >= ks[i-1].cdf) {
				t.Errorf("%v on its whole range: the CDF falls from %v at %v to %v at %v", d.Beta, ks[i-1].cdf, ks[i-1].u, ks[i].cdf, ks[i].u)
			}
		}
	}
}

// TestCumulateEvaluatesWhereTheSumsMiss: between anchors too far apart for
// the corrected trapezoid (four knots across the whole of Beta(2.022,
// 40.59), which puts most of its mass in one piece), the sums miss the
// known rise by more than the tolerance, so the knots' CDF is evaluated
// instead of scaled from them.
func TestCumulateEvaluatesWhereTheSumsMiss(t *testing.T) {
	d := elicit.Beta{Alpha: 2.022, Beta: 40.59}
	f := d.DensitySlopeFunc()
	var ks []knot
	for _, u := range []float64{0, 0.02, 0.15, 0.4} {
		p, s := f(u)
		ks = append(ks, knot{u: u, cdf: math.NaN(), pdf: p, slope: s})
	}
	tol := smoothTolerance / wideLayout.CDFH
	sum := 0.0
	for i := 1; i < len(ks); i++ {
		sum += trapezoid(ks[i-1], ks[i])
	}
	if miss := math.Abs(sum - d.CDF(0.4)); miss <= tol {
		t.Fatalf("the sums miss by %.2g only; the test needs more than %.2g", miss, tol)
	}
	cumulate(d, ks, nil, tol)
	for _, k := range ks {
		if want := d.CDF(k.u); !(math.Abs(k.cdf-want) <= 1e-12) {
			t.Errorf("at %v: CDF %v, want %v evaluated", k.u, k.cdf, want)
		}
	}
}
