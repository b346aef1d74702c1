package chart

import (
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// Curves that are one distribution are drawn as one line, the last over
// the others, and the caption says so: a pool that gives one expert all
// the weight is that expert's curve, and the legend named a curve the
// picture seemed not to draw. Two experts who gave the same judgement
// are said together too; a pool of two experts with weight is not.
func TestPanelSaysWhichCurvesAreTheSame(t *testing.T) {
	ines := elicit.Unit(elicit.Beta{Alpha: 3, Beta: 40})
	tomas := elicit.Unit(elicit.Beta{Alpha: 6, Beta: 30})
	pool := func(w ...float64) Curve {
		p, err := elicit.LinearPool([]elicit.ScaledBeta{ines, tomas}, w)
		if err != nil {
			t.Fatal(err)
		}
		return Curve{Label: "Performance-weight pool", Role: RolePool, Dist: Pool{Pool: p}}
	}
	caption := func(cs ...Curve) string {
		v := PanelView{ID: "p", Quantity: "failure share", Lower: 0, Upper: 1, Curves: cs}
		return newPanelModel(v).Desc
	}
	expert := func(name string, d elicit.ScaledBeta) Curve { return Curve{Label: name, Role: RoleExpert, Dist: d} }

	got := caption(expert("Ines Duarte", ines), expert("Tomas Lindqvist", tomas), pool(1, 0))
	if want := "Ines Duarte and the performance-weight pool are the same curve, drawn as one line."; !strings.Contains(got, want) {
		t.Errorf("a pool with all the weight on Ines: caption lacks %q:\n%s", want, got)
	}
	got = caption(expert("Expert A", ines), expert("Expert B", ines), expert("Expert C", tomas))
	if want := "Expert A and Expert B are the same curve, drawn as one line."; !strings.Contains(got, want) {
		t.Errorf("two experts with one Beta: caption lacks %q:\n%s", want, got)
	}
	for _, got := range []string{caption(expert("Ines Duarte", ines), expert("Tomas Lindqvist", tomas), pool(1, 1)),
		caption(expert("Ines Duarte", ines), expert("Tomas Lindqvist", tomas))} {
		if strings.Contains(got, "same curve") {
			t.Errorf("different curves said to be the same:\n%s", got)
		}
	}
}
