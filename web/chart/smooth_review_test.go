package chart

// Tests from a review with fresh eyes of the smooth drawing and the
// remembered frames: each failed on the code it reviewed, or fails when
// the code is broken in the way its comment says.

import (
	"context"
	"fmt"
	"math"
	"strings"
	"sync"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// A rare-event expert (Beta(2, 5000), median 3.4e-4) beside a J-shaped
// or a broad one: the narrow curve is a few pixels wide and its density's
// slope at 0 is 1/B(2, β), about 2.5e7. Knots seeded on the picture's
// window alone left it unresolved and its control points far outside the
// plot (a review found the line up to 2384 px above it); seeded on its
// own window it stays inside, and a curve still too narrow is drawn as
// the clipped polyline.
func TestNarrowSmoothBetaInAPanelStaysInThePicture(t *testing.T) {
	for _, pair := range [][2]elicit.ScaledBeta{
		{sbeta(0.8, 5, 0, 1), sbeta(2, 5000, 0, 1)},
		{sbeta(2, 20, 0, 1), sbeta(2, 2e4, 0, 1)},
		{sbeta(3, 3, 0, 1), sbeta(2, 1e4, 0, 1)},
		{sbeta(3, 3, 0, 1), sbeta(2, 1e5, 0, 1)},
		{sbeta(2, 2, 0, 1), sbeta(3e6, 7e6, 0, 1)},
	} {
		remembered.reset()
		html := render(t, Panel(PanelView{ID: "p", Quantity: "q", Lower: 0, Upper: 1, Curves: []Curve{
			{Label: "Expert 1", Role: RoleExpert, Dist: pair[0]},
			{Label: "Expert 2", Role: RoleExpert, Dist: pair[1]},
		}}))
		t.Run(fmt.Sprint(pair[1].Beta), func(t *testing.T) { checkFinite(t, html) })
		g := newTwin(wideLayout, "q", "", 0, 1, []Curve{{Label: "a", Dist: pair[0]}, {Label: "b", Dist: pair[1]}}, nil, false)
		for _, p := range pathSamples(t, g.Lines[1].Density, 32) {
			if p[1] < g.dens.Top-0.5 || p[1] > g.dens.bottom()+0.5 {
				t.Errorf("%v beside %v: the density is drawn at y = %.1f px, outside the plot [%v, %v]", pair[1].Beta, pair[0].Beta, p[1], g.dens.Top, g.dens.bottom())
				break
			}
		}
	}
}

// Bounds that elicit.CheckBounds accepts: on [0, 1e-200] the density's
// slope in the quantity's units overflows (f′/w², w² underflows to 0), and
// on [−1e300, 1e300] w² overflows; drawn from knots on the unit scale,
// the curve stays within a quarter pixel of the Beta's density and CDF
// (elicit's PDF and CDF, checked against R's dbeta and pbeta in
// elicit/beta_test.go).
func TestSmoothCurveOnExtremeBounds(t *testing.T) {
	for _, d := range []elicit.ScaledBeta{sbeta(3, 4, 0, 1e-200), sbeta(3, 4, -1e300, 1e300), sbeta(3, 4, 0, 1e160)} {
		if err := elicit.CheckBounds(d.Lower, d.Upper); err != nil {
			t.Fatalf("%v: %v", d, err)
		}
		remembered.reset()
		g := newTwin(wideLayout, "q", "", d.Lower, d.Upper, []Curve{{Label: "x", Dist: d}}, nil, true)
		dataX := func(px float64) float64 { return g.dens.X0 + (px-g.dens.Left)/g.dens.Width*(g.dens.X1-g.dens.X0) }
		worst := 0.0
		for _, c := range []struct {
			path string
			f    frame
			val  func(float64) float64
		}{{g.Lines[0].Density, g.dens, d.PDF}, {g.Lines[0].Cumul, g.cumul, d.CDF}} {
			for _, p := range pathSamples(t, c.path, 32) {
				worst = math.Max(worst, math.Abs(p[1]-c.f.py(c.val(dataX(p[0])))))
			}
		}
		if worst > 0.25 {
			t.Errorf("%v: a drawn point strays %.2f px from the curve", d, worst)
		}
	}
}

// The span memo is keyed by the Beta and the bounds: a Fit drawn without
// its percentiles (FitView's zero value) or with stale ones must not leave
// every later Panel of the same Beta showing those numbers. A curve's
// known percentiles are starting points only.
func TestPanelPercentilesAreTheBetasOwn(t *testing.T) {
	remembered.reset()
	d := sbeta(4.2, 17.9, 0, 1)
	_ = render(t, Fit(FitView{ID: "f", Quantity: "q", Lower: 0, Upper: 1, Dist: d}))
	m := newPanelModel(PanelView{ID: "p", Quantity: "q", Lower: 0, Upper: 1, Curves: []Curve{{Label: "Expert 1", Dist: d}}})
	if got, want := m.Legend[0].P50, FormatValue(d.Quantile(0.5)); got != want {
		t.Errorf("panel median %s, want %s", got, want)
	}
}

// The fit table reuses the fit's fitted values and fitted probabilities,
// each in its own column and row.
func TestFitTableReusesTheFitsNumbers(t *testing.T) {
	j := elicit.Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.01, 0.04, 0.12}, Lower: 0, Upper: 1}
	f, err := elicit.FitQuantiles(j)
	if err != nil {
		t.Fatal(err)
	}
	v := FitView{ID: "f", Quantity: "q", Lower: 0, Upper: 1, Dist: f.Dist, Percentiles: f.Percentiles}
	for i, p := range f.Probs {
		v.Points = append(v.Points, Point{X: f.Stated[i], P: p})
		v.Fitted = append(v.Fitted, f.Fitted[i])
		v.FittedProbs = append(v.FittedProbs, p+f.ProbErrors[i])
	}
	m := newFitModel(v)
	for i, r := range m.Rows {
		// elicit's Quantile and CDF are checked against R's qbeta and pbeta in beta_test.go.
		if want := FormatValue(f.Dist.Quantile(f.Probs[i])); r.Fitted != want {
			t.Errorf("row %d: fitted value %s, want %s", i, r.Fitted, want)
		}
		if want := FormatPercent(f.Dist.CDF(f.Stated[i])); r.FittedChance != want {
			t.Errorf("row %d: fitted chance %s, want %s", i, r.FittedChance, want)
		}
	}
}

// Two questions on the same bounds and window must not share an x title
// through the remembered frame, and two drafts on one window whose density
// tops differ must not share density ticks.
func TestFrameKeyCoversTitleAndTop(t *testing.T) {
	remembered.reset()
	d := sbeta(4.2, 17.9, 0, 1)
	a := newTwin(wideLayout, "Failure rate", "per demand", 0, 1, []Curve{{Label: "x", Dist: d}}, nil, false)
	b := newTwin(wideLayout, "Response rate", "", 0, 1, []Curve{{Label: "x", Dist: d}}, nil, false)
	if a.X0 != b.X0 || a.X1 != b.X1 {
		t.Fatal("the two windows differ; the check needs them equal")
	}
	if !strings.Contains(a.AxesSVG, "Failure rate") || !strings.Contains(b.AxesSVG, "Response rate") {
		t.Error("a question's picture carries another question's x title")
	}
	// Same window, taller density: Beta(4.2, 17.9) against a narrower Beta
	// whose tails stay inside the same snapped window.
	n := sbeta(8.4, 35.8, 0, 1)
	c := newTwin(wideLayout, "Failure rate", "per demand", 0, 1, []Curve{{Label: "x", Dist: d}, {Label: "y", Dist: n}}, nil, false)
	if c.X0 != a.X0 || c.X1 != a.X1 || c.DensityTop == a.DensityTop {
		t.Skipf("windows [%v,%v] vs [%v,%v], tops %v vs %v: pick another pair", c.X0, c.X1, a.X0, a.X1, c.DensityTop, a.DensityTop)
	}
	// The density axis's labels are drawn from the frame: the taller
	// axis must carry a tick at or above its taller curve's top.
	if a.AxesSVG == c.AxesSVG {
		t.Errorf("twins with density tops %v and %v share one frame", a.DensityTop, c.DensityTop)
	}
}

// Pictures of three questions drawn at once by eight goroutines share
// windows, so their frames come from the one memo: each picture carries
// its own question's title and no other's (run under -race in CI).
func TestConcurrentPicturesKeepTheirOwnFrames(t *testing.T) {
	remembered.reset()
	var wg sync.WaitGroup
	for w := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range 30 {
				d := sbeta(2.022+0.001*float64(i%5), 40.59, 0, 1)
				v := fitViewOf(d, Point{0.01, 0.05}, Point{0.04, 0.5}, Point{0.12, 0.95})
				v.Quantity = fmt.Sprintf("quantity-%d", w%3)
				var b strings.Builder
				if err := Fit(v).Render(context.Background(), &b); err != nil {
					t.Error(err)
					return
				}
				if html := b.String(); !strings.Contains(html, v.Quantity) || strings.Count(html, "quantity-") != strings.Count(html, v.Quantity) {
					t.Errorf("worker %d: a picture carries another question's title", w)
					return
				}
				pv := PanelView{ID: "p", Quantity: v.Quantity, Lower: 0, Upper: 1, Curves: []Curve{{Label: "E1", Dist: d}, {Label: "E2", Dist: sbeta(0.5, 3, 0, 1)}}}
				b.Reset()
				if err := Panel(pv).Render(context.Background(), &b); err != nil {
					t.Error(err)
					return
				}
				if html := b.String(); strings.Count(html, "quantity-") != strings.Count(html, v.Quantity) {
					t.Errorf("worker %d: a panel carries another question's title", w)
					return
				}
			}
		}()
	}
	wg.Wait()
}
