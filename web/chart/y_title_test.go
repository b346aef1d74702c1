package chart

import (
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// titlePanels are panels whose density axes carry narrow and wide labels.
var titlePanels = []struct {
	name         string
	lower, upper float64
	ds           []elicit.ScaledBeta
}{
	{"hours on [0, 10000]", 0, 10000, []elicit.ScaledBeta{sbeta(3, 5, 0, 10000), sbeta(4, 4, 0, 10000), sbeta(1.2, 5, 0, 10000), sbeta(400, 600, 0, 10000)}},
	{"a rare event", 0, 1, []elicit.ScaledBeta{sbeta(3, 30000, 0, 1), sbeta(2.5, 20000, 0, 1), sbeta(4, 25000, 0, 1), sbeta(6, 60000, 0, 1)}},
	{"a proportion", 0, 1, []elicit.ScaledBeta{sbeta(4, 60, 0, 1), sbeta(5, 70, 0, 1)}},
}

// titlePanelTwins are the twins of titlePanels in every layout, as a
// panel of all its curves and as one expert's fit.
func titlePanelTwins() (names []string, twins []twinGeom) {
	for _, pn := range titlePanels {
		var curves []Curve
		for i, d := range pn.ds {
			curves = append(curves, Curve{Label: "Expert " + string(rune('A'+i)), Role: RoleExpert, Dist: d})
		}
		for _, lay := range layouts {
			names = append(names, pn.name+", panel, "+lay.Name)
			twins = append(twins, newTwin(lay, "quantity", "", pn.lower, pn.upper, curves, nil, false))
			names = append(names, pn.name+", one fit, "+lay.Name)
			twins = append(twins, newTwin(lay, "quantity", "", pn.lower, pn.upper, curves[:1], nil, true))
		}
	}
	return names, twins
}

// checkTitleClear checks that a's upright title lies inside the picture
// and that none of its tick labels runs into it, and returns how many
// ticks are labelled. Each label is measured as DejaVu Sans draws it at
// the largest size a stylesheet sets (the room's 15px, a phone's 14px),
// the title as the bold face at 15px.
func checkTitleClear(t *testing.T, name string, a axesGeom, layout string) int {
	t.Helper()
	tx, ty := parseCoord(t, a.YTitleX), parseCoord(t, a.YTitleY)
	tickPx, titlePx := 15.0, 15.0
	if layout == compactLayout.Name {
		tickPx = 14
	}
	// The upright title's box: its ascent to the left of its baseline,
	// its descent to the right; its length about ty.
	half := labelEm(a.YTitle, true) * titlePx / 2
	tLeft, tRight, tTop, tBottom := tx-0.76*titlePx, tx+0.24*titlePx, ty-half, ty+half
	if tLeft < 0 {
		t.Errorf("%s: the title %q starts at %.1f, left of the picture", name, a.YTitle, tLeft)
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
			t.Errorf("%s: the tick label %q (%.0f to %.0f across, %.0f to %.0f down) runs into the title %q (%.0f to %.0f, %.0f to %.0f)",
				name, tk.Label, left, right, top, bottom, a.YTitle, tLeft, tRight, tTop, tBottom)
		}
	}
	return labelled
}

// The density axis's title, written upright beside its tick labels, is
// not run into by them when they are wide: on a question of hours on
// [0, 10000] a density reads 0.0010, and on a rare event 15000, labels
// the room view drew over the word "density" on the projector (and the
// panel at a desk). The top tick keeps its label, so the axis still gives
// its scale.
func TestDensityLabelsStayClearOfTheTitle(t *testing.T) {
	names, twins := titlePanelTwins()
	for i, g := range twins {
		if labelled := checkTitleClear(t, names[i], g.Density, g.Layout.Name); labelled < 2 {
			t.Errorf("%s: the density axis labels %d ticks of %v; its scale is lost", names[i], labelled, g.Density.YTicks)
		}
	}
}

// The two plots' upright titles stand one above the other, at one x, and
// clear of their labels: when the density's labels were wide (0.00005
// per hour on [0, 10000]) the picture made them room by narrowing the
// plots, and the lower title moved right with the plots (25.1 against
// the upper's 13 on the desk's picture of one fit), while on a phone the
// lower title stood left of the upper (11.1 against 15), its first
// letter over the picture's edge, to clear "100%".
func TestUprightTitlesLineUp(t *testing.T) {
	names, twins := titlePanelTwins()
	for i, g := range twins {
		if g.Density.YTitleX != g.Cumul.YTitleX {
			t.Errorf("%s: the upper title stands at x = %s, the lower at %s", names[i], g.Density.YTitleX, g.Cumul.YTitleX)
		}
		checkTitleClear(t, names[i], g.Cumul, g.Layout.Name)
	}
}
