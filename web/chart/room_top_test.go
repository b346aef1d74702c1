package chart

import (
	"strconv"
	"strings"
	"testing"
)

// The room's picture stood under a blank band, some 40 px on a phone and
// 30 px on a 1920×1080 projector: the layouts' room above the plots (44
// units compact, 34 wide) keeps room for a revealed true value's label,
// and the room had none to draw there. The room's drawings now start
// roomTopMargin above the plots, the top tick label whole inside them,
// unless a true value's label stands above them; pictures outside the
// room keep their top. The compact drawing starts lower; the wide one
// (whose width sets its size on a projector, so that a picture started
// lower left the band empty under it) gives the band to its plots: it
// keeps the width its legend beside the plots gives it, and its foot.
// Drawn after the room's, the picture with a true value is laid out
// anew, not from the remembered frame of the other layout.
func TestRoomPictureHasNoBandAboveIt(t *testing.T) {
	box := func(html, lay string) (vbTop, vbW, vbBottom, plotTop, highest float64) {
		t.Helper()
		ns, w, h := drawing(t, html, lay)
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
		return vbTop, w, vbTop + h, plotTop, highest
	}
	v := PanelView{ID: "p", Quantity: "first-year failure share", Units: "proportion of units", Lower: 0, Upper: 1, Curves: roomCurves(), Room: true}
	withTruth := v
	withTruth.Truth = ptr(0.05)
	for _, lay := range []string{"wide", "compact"} {
		vbTop, w, bottom, plotTop, highest := box(renderLayout(t, Panel(v), lay), lay)
		if plotTop-vbTop > roomTopMargin+0.5 {
			t.Errorf("the room's %s picture keeps %.0f units above its plots, want at most %d", lay, plotTop-vbTop, roomTopMargin)
		}
		// A tick label's baseline stands about 5 units under its tick, its
		// top some 10 units above its baseline at 14 px, 11 at the room's
		// 15 (a legend's first row stands lower).
		if highest-11 < vbTop {
			t.Errorf("the room's %s picture starts at %.0f, cutting a label whose baseline is at %.0f", lay, vbTop, highest)
		}
		// The same picture with a true value keeps the top: its width and
		// foot are the picture's as laid out.
		_, tw, tbottom, _, _ := box(renderLayout(t, Panel(withTruth), lay), lay)
		if w != tw || bottom != tbottom {
			t.Errorf("the room's %s picture is %.2f wide and ends at %.2f, where as laid out it is %.2f wide and ends at %.2f", lay, w, bottom, tw, tbottom)
		}
	}
	for _, c := range []struct {
		name string
		v    PanelView
		lay  string
	}{
		{"a wide picture outside the room", PanelView{ID: "p", Quantity: "first-year failure share", Lower: 0, Upper: 1, Curves: roomCurves()}, "wide"},
		{"a compact picture outside the room", PanelView{ID: "p", Quantity: "first-year failure share", Lower: 0, Upper: 1, Curves: roomCurves()}, "compact"},
		{"the room's wide picture with a true value", withTruth, "wide"},
		{"the room's compact picture with a true value", withTruth, "compact"},
	} {
		vbTop, _, _, _, highest := box(renderLayout(t, Panel(c.v), c.lay), c.lay)
		if vbTop != 0 {
			t.Errorf("%s starts at %.0f, want 0", c.name, vbTop)
		}
		if c.v.Truth != nil && highest-12 < vbTop {
			t.Errorf("%s: its label at %.0f stands above the picture's top", c.name, highest)
		}
	}
}
