package chart

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// panelOf is an invented panel: experts' Betas on [0, 1] and their
// equal-weight pool, drawn with or without the pool's components.
func panelOf(t testing.TB, withComponents bool, dists ...elicit.ScaledBeta) PanelView {
	t.Helper()
	v := PanelView{ID: "p", Quantity: "Failure share", Lower: 0, Upper: 1}
	for i, d := range dists {
		v.Curves = append(v.Curves, Curve{Label: fmt.Sprintf("Expert %d", i+1), Role: RoleExpert, Dist: d})
	}
	pool, err := elicit.LinearPool(dists, nil)
	if err != nil {
		t.Fatal(err)
	}
	// elicit.Pool is a Distribution with Quantiles; chart.Pool adds its
	// components (Mixture).
	c := Curve{Label: "Pool", Role: RolePool, Dist: pool}
	if withComponents {
		c.Dist = Pool{pool}
	}
	v.Curves = append(v.Curves, c)
	return v
}

// Sampling a pool as the weighted sum of its components' samples draws
// the same picture as evaluating the pool's own PDF and CDF at every
// point: the same paths to a hundredth of a pixel (a sum taken in another
// order may round the other way), the same legend.
func TestPoolFromComponentsDrawsThePool(t *testing.T) {
	for _, tt := range []struct {
		name  string
		dists []elicit.ScaledBeta
	}{
		{"three overlapping", []elicit.ScaledBeta{sbeta(2, 8, 0, 1), sbeta(3, 5, 0, 1), sbeta(5, 5, 0, 1)}},
		{"one narrow, one wide", []elicit.ScaledBeta{sbeta(40, 160, 0, 1), sbeta(1.5, 3, 0, 1)}},
		{"one expert", []elicit.ScaledBeta{sbeta(4, 12, 0, 1)}},
	} {
		direct := newPanelModel(panelOf(t, false, tt.dists...))
		summed := newPanelModel(panelOf(t, true, tt.dists...))
		if direct.Invalid != "" || len(direct.Drawings[0].Twin.Lines) != len(tt.dists)+1 {
			t.Fatalf("%s: panel not drawn: %q", tt.name, direct.Invalid)
		}
		for i := range direct.Drawings[0].Twin.Lines {
			d, s := direct.Drawings[0].Twin.Lines[i], summed.Drawings[0].Twin.Lines[i]
			if !samePath(d.Density, s.Density) || !samePath(d.Cumul, s.Cumul) {
				t.Errorf("%s: %s drawn differently from the components:\ndensity %.120s\n     vs %.120s", tt.name, d.Label, d.Density, s.Density)
			}
		}
		if !reflect.DeepEqual(direct.Legend, summed.Legend) || direct.Desc != summed.Desc {
			t.Errorf("%s: legend or description differ:\n%+v\n%+v", tt.name, direct.Legend, summed.Legend)
		}
	}
}

// samePath reports whether two SVG paths have the same commands and
// coordinates within 0.01 px.
func samePath(a, b string) bool {
	fa, fb := strings.FieldsFunc(a, pathSep), strings.FieldsFunc(b, pathSep)
	if len(fa) != len(fb) {
		return false
	}
	for i := range fa {
		if fa[i] == fb[i] {
			continue
		}
		x, errx := strconv.ParseFloat(strings.TrimLeft(fa[i], "MLZ"), 64)
		y, erry := strconv.ParseFloat(strings.TrimLeft(fb[i], "MLZ"), 64)
		if errx != nil || erry != nil || fa[i][0] != fb[i][0] || math.Abs(x-y) > 0.0101 {
			return false
		}
	}
	return true
}

func pathSep(r rune) bool { return r == ' ' || r == ',' }

// Drawing a panel again gives the same picture; a changed curve is drawn
// from its own parameters, not from what was remembered for another.
func TestRememberedCurvesAreNotReusedForOthers(t *testing.T) {
	// From an empty memory: a percentile remembered from another test's
	// picture of the same Beta, solved from another start, may differ
	// from a fresh solve in its last bits (5e-16 for Beta(5, 5)'s median),
	// which no drawn or written number shows but DeepEqual sees.
	remembered.reset()
	a := []elicit.ScaledBeta{sbeta(2, 8, 0, 1), sbeta(3, 5, 0, 1), sbeta(5, 5, 0, 1)}
	first := newPanelModel(panelOf(t, true, a...))
	again := newPanelModel(panelOf(t, true, a...))
	if !reflect.DeepEqual(first, again) {
		t.Error("the same panel drawn twice differs")
	}
	b := append([]elicit.ScaledBeta(nil), a...)
	b[1] = sbeta(3.5, 5, 0, 1) // one expert revises; the window barely moves
	changed := newPanelModel(panelOf(t, true, b...))
	remembered.reset()
	fresh := newPanelModel(panelOf(t, true, b...))
	if !reflect.DeepEqual(changed, fresh) {
		t.Error("a panel drawn with remembered curves differs from the same panel drawn afresh")
	}
	if changed.Drawings[0].Twin.Lines[1].Cumul == first.Drawings[0].Twin.Lines[1].Cumul {
		t.Error("the revised expert's curve is the one drawn before the revision")
	}
	pool := len(b) // the pool is drawn after the experts
	if changed.Drawings[0].Twin.Lines[pool].Cumul == first.Drawings[0].Twin.Lines[pool].Cumul || changed.Drawings[0].Twin.Lines[pool].Density == first.Drawings[0].Twin.Lines[pool].Density {
		t.Error("the pool of the revised panel is the pool remembered from before the revision")
	}
	if remembered.mixSpans.Len() == 0 || remembered.mixSamples.Len() == 0 {
		t.Error("the pool's span and samples were not remembered")
	}
}

// appendCoord's integer path writes what the general float formatting of
// the rounded hundredth writes.
func TestCoordMatchesFloatFormatting(t *testing.T) {
	ref := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return "0"
		}
		return strconv.FormatFloat(math.Round(v*100)/100, 'f', -1, 64)
	}
	vals := []float64{0, math.Copysign(0, -1), -0.001, 0.004, -0.004, 0.005, 0.015, 0.1, 0.25, 1, 69.995, 70, 610.12, -3.5, 1234.567,
		999999.999, 1e11 + 0.37, 1e13, 1e15 + 0.5, -1e16, math.NaN(), math.Inf(1), math.Inf(-1), math.MaxFloat64}
	rng := rand.New(rand.NewPCG(4, 2026))
	for range 20000 {
		vals = append(vals, (rng.Float64()-0.2)*800, rng.NormFloat64()*1e6)
	}
	for _, v := range vals {
		if got, want := coord(v), ref(v); got != want {
			t.Errorf("coord(%v) = %q, want %q", v, got, want)
		}
	}
}

// A pool's window is snapped to round steps: it only widens, stays in the
// bounds, and two experts whose own curves differ a little share it, so
// the pool is sampled once for both.
func TestPoolWindowIsShared(t *testing.T) {
	for _, w := range [][2]float64{{0.013, 0.41}, {0.2, 0.9}, {1e-5, 3e-4}} {
		s0, s1 := snapWindow(w[0], w[1], 0, 1)
		if s0 > w[0] || s1 < w[1] || s0 < 0 || s1 > 1 {
			t.Errorf("snapWindow(%v) = [%v, %v]: not a widening inside [0, 1]", w, s0, s1)
		}
		if grow := (s0 - w[0]) + (s1 - w[1]); math.Abs(grow) > 0.2*(w[1]-w[0]) {
			t.Errorf("snapWindow(%v) = [%v, %v] grows by more than a fifth", w, s0, s1)
		}
	}
	panel := []elicit.ScaledBeta{sbeta(2, 8, 0, 1), sbeta(3, 5, 0, 1), sbeta(5, 5, 0, 1)}
	pool, err := elicit.LinearPool(panel, nil)
	if err != nil {
		t.Fatal(err)
	}
	draw := func(own elicit.ScaledBeta) panelModel {
		return newPanelModel(PanelView{ID: "p", Quantity: "Failure share", Lower: 0, Upper: 1, Curves: []Curve{
			{Label: "You", Role: RoleExpert, Dist: own},
			{Label: "Pool", Role: RolePool, Dist: Pool{pool}},
		}})
	}
	remembered.mixSamples.Reset()
	a, b := draw(sbeta(2.1, 8, 0, 1)), draw(sbeta(2.2, 8.3, 0, 1))
	if a.Drawings[0].Twin.X0 != b.Drawings[0].Twin.X0 || a.Drawings[0].Twin.X1 != b.Drawings[0].Twin.X1 {
		t.Errorf("windows [%v, %v] and [%v, %v] differ for nearly equal own curves", a.Drawings[0].Twin.X0, a.Drawings[0].Twin.X1, b.Drawings[0].Twin.X0, b.Drawings[0].Twin.X1)
	}
	if n := remembered.mixSamples.Len(); n != 1 {
		t.Errorf("the pool was sampled for %d windows, want 1", n)
	}
}
