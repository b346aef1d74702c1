package chart

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// spikePanel is one very sure expert, Expert A (invented: Beta(300,
// 10000)), beside three ordinary ones and their equal-weight pool: the
// experts' Betas and the curves to draw.
func spikePanel(t *testing.T) ([]elicit.ScaledBeta, []Curve) {
	t.Helper()
	ds := []elicit.ScaledBeta{sbeta(300, 10000, 0, 1), sbeta(4, 60, 0, 1), sbeta(5, 70, 0, 1), sbeta(3, 50, 0, 1)}
	p, err := elicit.LinearPool(ds, []float64{1, 1, 1, 1})
	if err != nil {
		t.Fatal(err)
	}
	curves := []Curve{{Label: "Expert A", Role: RoleExpert, Dist: ds[0]}, {Label: "Expert B", Role: RoleExpert, Dist: ds[1]},
		{Label: "Expert C", Role: RoleExpert, Dist: ds[2]}, {Label: "Expert D", Role: RoleExpert, Dist: ds[3]},
		{Label: "Equal-weight pool", Role: RolePool, Dist: Pool{Pool: p}}}
	return ds, curves
}

// One very sure expert (invented: Beta(300, 10000), a spike near 0.029)
// beside three ordinary ones and their pool: the density axis stops at
// four times the experts' median top, though never below the pool's, so
// the others are not flattened into the baseline; the spike is cut there,
// drawn inside the plot, and the note names it. A panel without a spike
// keeps its tallest top.
func TestOneSpikeDoesNotFlattenThePanel(t *testing.T) {
	ds, curves := spikePanel(t)
	spike := smoothTop(ds[0])
	for _, lay := range layouts {
		g := newTwin(lay, "share", "", 0, 1, curves, nil, false)
		if !(g.DensityTop < spike/3) {
			t.Errorf("%s: axis top %v with a spike of %v", lay.Name, g.DensityTop, spike)
		}
		if other := smoothTop(ds[1]); other < 0.15*g.DensityTop {
			t.Errorf("%s: Expert B's top %v is under 15%% of the axis %v", lay.Name, other, g.DensityTop)
		}
		// The spike is cut and named (the pool, whose own spike is
		// A's quarter share, may be cut with it: its top is measured by
		// densityCap's spike rule).
		if len(g.ClippedBy) == 0 || g.ClippedBy[0] != "Expert A" || !strings.Contains(strings.Join(g.Notes, " "), "for Expert A") {
			t.Errorf("%s: cut %v, notes %v", lay.Name, g.ClippedBy, g.Notes)
		}
		// Every drawn point of every curve lies inside the density plot.
		for _, l := range g.Lines {
			for _, tok := range strings.FieldsFunc(l.Density, func(r rune) bool { return r == ' ' || r == 'M' || r == 'L' || r == 'C' || r == 'S' }) {
				xy := strings.Split(tok, ",")
				if len(xy) != 2 {
					continue
				}
				if y := parseCoord(t, xy[1]); y < g.dens.Top-0.5 || y > g.dens.bottom()+0.5 {
					t.Fatalf("%s: %s reaches row %v, outside [%v, %v]", lay.Name, l.Label, y, g.dens.Top, g.dens.bottom())
				}
			}
		}
	}
	// Without the spike (three ordinary experts and their own pool): the
	// tallest top, nothing cut.
	p3, err := elicit.LinearPool(ds[1:], []float64{1, 1, 1})
	if err != nil {
		t.Fatal(err)
	}
	plain := append(append([]Curve(nil), curves[1:4]...), Curve{Label: "Equal-weight pool", Role: RolePool, Dist: Pool{Pool: p3}})
	g := newTwin(wideLayout, "share", "", 0, 1, plain, nil, false)
	if len(g.ClippedBy) != 0 || g.DensityTop < smoothTop(ds[2]) {
		t.Errorf("ordinary panel: axis %v, cut %v", g.DensityTop, g.ClippedBy)
	}
}

func parseCoord(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("coordinate %q: %v", s, err)
	}
	return v
}

// A bounded density that falls from its top, however steeply, is not a
// spike: Beta(1, β) has f(0) = β and Beta(α, 1) has f(1) = α (Johnson,
// Kotz & Balakrishnan 1995, ch. 25), and the posterior Beta(1, 21) of a
// uniform prior after 20 trials without a success was drawn cut at two
// thirds of its height with a note that it "rises above the top of the
// chart". The axis now reaches its top, nothing is cut, and every drawn
// point lies in the plot; a density that does rise without limit (α < 1)
// is still cut.
func TestABoundedDensityIsNotCut(t *testing.T) {
	for _, c := range []struct {
		d   elicit.ScaledBeta
		top float64 // the density's largest value, worked by hand
	}{
		{sbeta(1, 21, 0, 1), 21},
		{sbeta(1, 30, 0, 1), 30},
		{sbeta(30, 1, 0, 1), 30},
		{sbeta(1, 30, 0, 200), 30.0 / 200},
		{sbeta(1.000001, 50, 0, 1), 50}, // its mode, 2e-8, holds about 50
	} {
		curves := []Curve{{Label: "Posterior", Role: RolePosterior, Dist: c.d}}
		for _, lay := range layouts {
			g := newTwin(lay, "share", "", c.d.Lower, c.d.Upper, curves, nil, false)
			if len(g.ClippedBy) != 0 || strings.Contains(strings.Join(g.Notes, " "), "cut at") {
				t.Errorf("%v %s: cut %v, notes %v", c.d.Beta, lay.Name, g.ClippedBy, g.Notes)
			}
			if g.DensityTop < c.top*(1-1e-6) {
				t.Errorf("%v %s: axis top %v below the density's top %v", c.d.Beta, lay.Name, g.DensityTop, c.top)
			}
		}
	}
	curves := []Curve{{Label: "Posterior", Role: RolePosterior, Dist: sbeta(0.8, 30, 0, 1)}}
	if g := newTwin(wideLayout, "share", "", 0, 1, curves, nil, false); len(g.ClippedBy) == 0 {
		t.Error("Beta(0.8, 30), whose density rises without limit at 0, is not cut")
	}
}

// The polyline of a Beta whose mode falls between two grid points reaches
// the density's top: Beta(1.000001, 70) peaks at 1.4e-8 with f about 70
// (worked by hand: 70·(1.4e-8)^(1e-6) ≈ 70), and the first grid point
// after 0, 1.35 px on, holds only 63, where the line used to stop.
func TestThePolylineReachesAModeBetweenGridPoints(t *testing.T) {
	d := sbeta(1.000001, 70, 0, 1)
	m, _ := d.Mode()
	peak := d.PDF(m)
	for _, lay := range layouts {
		g := newTwin(lay, "share", "", 0, 1, []Curve{{Label: "Posterior", Role: RolePosterior, Dist: d}}, nil, false)
		minY := math.Inf(1)
		for _, tok := range strings.FieldsFunc(g.Lines[0].Density, func(r rune) bool { return r == ' ' || r == 'M' || r == 'L' }) {
			xy := strings.Split(tok, ",")
			if len(xy) != 2 {
				continue
			}
			y, err := strconv.ParseFloat(xy[1], 64)
			if err != nil {
				t.Fatalf("%s: token %q", lay.Name, tok)
			}
			minY = math.Min(minY, y)
		}
		want := lay.Top + lay.DensityH*(1-peak/g.DensityTop)
		if math.Abs(minY-want) > 0.5 {
			t.Errorf("%s: the line's top is at y = %.2f px, the density's top at %.2f px", lay.Name, minY, want)
		}
	}
}

// TestCutNoteNamesThePanelsCurvesInProse: the note under a picture whose
// curves are cut at the top names a pool as a sentence does, "for Expert
// A and the equal-weight pool", where it read "for Expert A and
// Equal-weight pool", as if the pool were a person. The panel of
// TestOneSpikeDoesNotFlattenThePanel, whose pool is cut with the spike
// (its top is measured on its own window, densityCap).
func TestCutNoteNamesThePanelsCurvesInProse(t *testing.T) {
	_, curves := spikePanel(t)
	for _, lay := range layouts {
		g := newTwin(lay, "share", "", 0, 1, curves, nil, false)
		if notes := strings.Join(g.Notes, " "); !strings.Contains(notes, "for Expert A and the equal-weight pool.") {
			t.Errorf("%s: notes %q", lay.Name, notes)
		}
	}
}
