package chart

import (
	"strconv"
	"strings"
	"testing"
)

// On a phone the room's picture (its compact drawing) stood under a blank
// band of some 40 px: the layout's 44 units above the plots keep room for
// a revealed true value's label, and the room had none to draw there. The
// room's compact drawing now starts roomTopMargin above the plots, the top
// tick label whole inside it, unless a true value's label stands above
// them; the wide drawing and pictures outside the room keep their top.
func TestRoomPhonePictureHasNoBandAboveIt(t *testing.T) {
	top := func(html, lay string) (vbTop, plotTop, highest float64) {
		t.Helper()
		ns, _, _ := drawing(t, html, lay)
		vb := strings.Fields(find(ns, "svg", "chart-"+lay)[0].Attr["viewBox"])
		vbTop, _ = strconv.ParseFloat(vb[1], 64)
		plotTop = 1e9
		for _, r := range find(ns, "rect", "") {
			if y, err := strconv.ParseFloat(r.Attr["y"], 64); err == nil && r.Attr["height"] != "" {
				plotTop = min(plotTop, y)
			}
		}
		highest = 1e9
		for _, n := range find(ns, "text", "") {
			if n.hasClass("axis-title-y") {
				continue // rotated, centred on its plot
			}
			if y, err := strconv.ParseFloat(n.Attr["y"], 64); err == nil {
				highest = min(highest, y)
			}
		}
		return vbTop, plotTop, highest
	}
	v := PanelView{ID: "p", Quantity: "first-year failure share", Units: "proportion of units", Lower: 0, Upper: 1, Curves: roomCurves(), Room: true}
	vbTop, plotTop, highest := top(renderLayout(t, Panel(v), "compact"), "compact")
	if plotTop-vbTop > roomTopMargin+0.5 {
		t.Errorf("the room's compact picture keeps %.0f units above its plots, want at most %d", plotTop-vbTop, roomTopMargin)
	}
	// A tick label's baseline stands about 5 units under its tick, its
	// top some 10 units above its baseline at 14 px.
	if highest-10 < vbTop {
		t.Errorf("the room's compact picture starts at %.0f, cutting a label whose baseline is at %.0f", vbTop, highest)
	}
	for _, c := range []struct {
		name string
		v    PanelView
		lay  string
	}{
		{"the room's wide picture", v, "wide"},
		{"a compact picture outside the room", PanelView{ID: "p", Quantity: "first-year failure share", Lower: 0, Upper: 1, Curves: roomCurves()}, "compact"},
		{"the room's compact picture with a true value", PanelView{ID: "p", Quantity: "first-year failure share", Lower: 0, Upper: 1, Curves: roomCurves(), Room: true, Truth: ptr(0.05)}, "compact"},
	} {
		vbTop, _, highest := top(renderLayout(t, Panel(c.v), c.lay), c.lay)
		if vbTop != 0 {
			t.Errorf("%s starts at %.0f, want 0", c.name, vbTop)
		}
		if c.v.Truth != nil && highest-12 < vbTop {
			t.Errorf("%s: its label at %.0f stands above the picture's top", c.name, highest)
		}
	}
}
