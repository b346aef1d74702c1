package chart

import (
	"bytes"
	"context"
	"math"
	"regexp"
	"testing"
)

// TestRoomTallDrawing: on a 4:3 projector the room's picture is as tall
// as its column's width draws it, and the wide drawing left some 90 px
// blank under the notes at 1024×768. A room picture asked Tall carries a
// third drawing, after the wide and the compact ones and drawn wide (the
// order room.css's selectors rely on), whose plots are roomTallPlots
// times as tall at the same width; other pictures carry two.
func TestRoomTallDrawing(t *testing.T) {
	v := PanelView{ID: "p", Quantity: "first-year failure share", Units: "proportion of units", Lower: 0, Upper: 1, Curves: roomCurves(), Tall: true}
	if n := len(newPanelModel(v).Drawings); n != 2 {
		t.Errorf("a picture outside the room asked Tall carries %d drawings, want 2", n)
	}
	v.Room = true
	m := newPanelModel(v)
	if len(m.Drawings) != 3 {
		t.Fatalf("the room's picture asked Tall carries %d drawings, want 3", len(m.Drawings))
	}
	wide, tall := m.Drawings[0], m.Drawings[2]
	if tall.ID != "p-tall" || tall.Twin.Layout.Name != wideLayout.Name {
		t.Errorf("the third drawing is %q drawn %q, want p-tall drawn wide", tall.ID, tall.Twin.Layout.Name)
	}
	wl, tl := wide.Twin.Layout, tall.Twin.Layout
	if tl.width() != wl.width() {
		t.Errorf("the tall drawing is %g units wide, the wide one %g", tl.width(), wl.width())
	}
	for _, p := range []struct {
		name       string
		wide, tall float64
	}{{"density plot", wl.DensityH, tl.DensityH}, {"cumulative plot", wl.CDFH, tl.CDFH}} {
		if math.Abs(p.tall-roomTallPlots*p.wide) > 1 {
			t.Errorf("the tall drawing's %s is %g units tall, the wide one's %g: want %g times", p.name, p.tall, p.wide, roomTallPlots)
		}
	}
	grow := tl.DensityH + tl.CDFH - wl.DensityH - wl.CDFH
	if d := tall.Twin.Height - wide.Twin.Height; math.Abs(d-grow) > 0.5 {
		t.Errorf("the tall drawing is %g units taller than the wide one, want its plots' %g", d, grow)
	}
	var b bytes.Buffer
	if err := Panel(v).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	var order []string
	for _, c := range regexp.MustCompile(`<svg class="chart-svg chart-(\w+)"`).FindAllStringSubmatch(b.String(), -1) {
		order = append(order, c[1])
	}
	if len(order) != 3 || order[0] != "wide" || order[1] != "compact" || order[2] != "wide" {
		t.Errorf("the room's picture draws %v, want [wide compact wide]", order)
	}
	v.Tall = false
	if n := len(newPanelModel(v).Drawings); n != 2 {
		t.Errorf("the room's picture not asked Tall carries %d drawings, want 2", n)
	}
}
