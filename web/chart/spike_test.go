package chart

import (
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// One very sure expert (invented: Beta(300, 10000), a spike near 0.029)
// beside three ordinary ones and their pool: the density axis stops at
// four times the experts' median top, though never below the pool's, so
// the others are not flattened into the baseline; the spike is cut there,
// drawn inside the plot, and the note names it. A panel without a spike
// keeps its tallest top.
func TestOneSpikeDoesNotFlattenThePanel(t *testing.T) {
	ds := []elicit.ScaledBeta{sbeta(300, 10000, 0, 1), sbeta(4, 60, 0, 1), sbeta(5, 70, 0, 1), sbeta(3, 50, 0, 1)}
	p, err := elicit.LinearPool(ds, []float64{1, 1, 1, 1})
	if err != nil {
		t.Fatal(err)
	}
	curves := []Curve{{Label: "Expert A", Role: RoleExpert, Dist: ds[0]}, {Label: "Expert B", Role: RoleExpert, Dist: ds[1]},
		{Label: "Expert C", Role: RoleExpert, Dist: ds[2]}, {Label: "Expert D", Role: RoleExpert, Dist: ds[3]},
		{Label: "Equal-weight pool", Role: RolePool, Dist: Pool{Pool: p}}}
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
