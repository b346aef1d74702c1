package chart

import (
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// The density axis's title, written upright beside its tick labels, is
// not run into by them when they are wide: on a question of hours on
// [0, 10000] a density reads 0.0010, and on a rare event 15000, labels
// the room view drew over the word "density" on the projector (and the
// panel at a desk). Each label is measured as DejaVu Sans draws it at the
// largest size a stylesheet sets (the room's 15px, a phone's 14px), the
// title as the bold face at 15px; the top tick keeps its label, so the
// axis still gives its scale.
func TestDensityLabelsStayClearOfTheTitle(t *testing.T) {
	panels := []struct {
		name         string
		lower, upper float64
		ds           []elicit.ScaledBeta
	}{
		{"hours on [0, 10000]", 0, 10000, []elicit.ScaledBeta{sbeta(3, 5, 0, 10000), sbeta(4, 4, 0, 10000), sbeta(1.2, 5, 0, 10000), sbeta(400, 600, 0, 10000)}},
		{"a rare event", 0, 1, []elicit.ScaledBeta{sbeta(3, 30000, 0, 1), sbeta(2.5, 20000, 0, 1), sbeta(4, 25000, 0, 1), sbeta(6, 60000, 0, 1)}},
		{"a proportion", 0, 1, []elicit.ScaledBeta{sbeta(4, 60, 0, 1), sbeta(5, 70, 0, 1)}},
	}
	for _, pn := range panels {
		var curves []Curve
		for i, d := range pn.ds {
			curves = append(curves, Curve{Label: "Expert " + string(rune('A'+i)), Role: RoleExpert, Dist: d})
		}
		for _, lay := range layouts {
			g := newTwin(lay, "quantity", "", pn.lower, pn.upper, curves, nil, false)
			a := g.Density
			tx, ty := parseCoord(t, a.YTitleX), parseCoord(t, a.YTitleY)
			tickPx, titlePx := 15.0, 15.0
			if lay.Name == compactLayout.Name {
				tickPx = 14
			}
			// The upright title's box: its ascent to the left of its
			// baseline, its descent to the right; its length about ty.
			half := labelEm(a.YTitle, true) * titlePx / 2
			tLeft, tRight, tTop, tBottom := tx-0.76*titlePx, tx+0.24*titlePx, ty-half, ty+half
			if tLeft < 0 {
				t.Errorf("%s, %s: the title starts at %.1f, left of the picture", pn.name, lay.Name, tLeft)
			}
			axisX := parseCoord(t, a.X)
			labelled := 0
			for _, tk := range a.YTicks {
				if tk.Label == "" {
					continue
				}
				labelled++
				y := parseCoord(t, tk.Pos) + 4
				right := axisX - 6
				left := right - labelEm(tk.Label, false)*tickPx
				top, bottom := y-0.76*tickPx, y+0.24*tickPx
				if left < tRight && right > tLeft && top < tBottom && bottom > tTop {
					t.Errorf("%s, %s: the tick label %q (%.0f to %.0f across, %.0f to %.0f down) runs into the title %q (%.0f to %.0f, %.0f to %.0f)",
						pn.name, lay.Name, tk.Label, left, right, top, bottom, a.YTitle, tLeft, tRight, tTop, tBottom)
				}
			}
			if labelled < 2 {
				t.Errorf("%s, %s: the density axis labels %d ticks of %v; its scale is lost", pn.name, lay.Name, labelled, a.YTicks)
			}
		}
	}
}
