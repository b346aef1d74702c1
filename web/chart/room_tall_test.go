package chart

import (
	"bytes"
	"context"
	"math"
	"regexp"
	"testing"
)

// TestRoomTallDrawing: on a 4:3 or 5:4 projector the room's picture is as
// tall as its column's width draws it, and the wide drawing left some
// 90 px blank under the notes at 1024×768 and some 200 px at 1280×1024. A
// room picture asked Tall carries its tall drawings after the wide and
// the compact ones, drawn wide at the wide one's width, each to its shape
// (roomTallShapes) and with the shape's class, which room.css's
// container queries name; their plots take the growth, shared as their
// heights are. Other pictures carry two.
func TestRoomTallDrawing(t *testing.T) {
	v := PanelView{ID: "p", Quantity: "first-year failure share", Units: "proportion of units", Lower: 0, Upper: 1, Curves: roomCurves(), Tall: true}
	if n := len(newPanelModel(v).Drawings); n != 2 {
		t.Errorf("a picture outside the room asked Tall carries %d drawings, want 2", n)
	}
	v.Room = true
	m := newPanelModel(v)
	if len(m.Drawings) != 2+len(roomTallShapes) {
		t.Fatalf("the room's picture asked Tall carries %d drawings, want %d", len(m.Drawings), 2+len(roomTallShapes))
	}
	wide := m.Drawings[0]
	wl := wide.Twin.Layout
	for i, s := range roomTallShapes {
		tall := m.Drawings[2+i]
		tl := tall.Twin.Layout
		if tall.Twin.Shape != s.Class || tl.Name != wideLayout.Name {
			t.Errorf("drawing %d is of shape %q drawn %q, want %q drawn wide", 2+i, tall.Twin.Shape, tl.Name, s.Class)
		}
		if tl.width() != wl.width() {
			t.Errorf("the %s drawing is %g units wide, the wide one %g", s.Class, tl.width(), wl.width())
		}
		// The shape, to within a unit of height (the plots' heights are
		// rounded to units).
		if want := tl.width() / s.Aspect; math.Abs(tall.Twin.Height-want) > 1 {
			t.Errorf("the %s drawing is %g units tall, want %g for its shape %g", s.Class, tall.Twin.Height, want, s.Aspect)
		}
		grow := tl.DensityH + tl.CDFH - wl.DensityH - wl.CDFH
		if d := tall.Twin.Height - wide.Twin.Height; math.Abs(d-grow) > 0.5 {
			t.Errorf("the %s drawing is %g units taller than the wide one, want its plots' %g", s.Class, d, grow)
		}
		if r := tl.DensityH / tl.CDFH; math.Abs(r-wl.DensityH/wl.CDFH) > 0.02 {
			t.Errorf("the %s drawing's plots stand %g to one, the wide one's %g", s.Class, r, wl.DensityH/wl.CDFH)
		}
	}
	var b bytes.Buffer
	if err := Panel(v).Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	var order []string
	for _, c := range regexp.MustCompile(`<svg class="chart-svg ([\w -]+)"`).FindAllStringSubmatch(b.String(), -1) {
		order = append(order, c[1])
	}
	want := []string{"chart-wide", "chart-compact", "chart-wide chart-tall", "chart-wide chart-taller"}
	if len(order) != len(want) {
		t.Fatalf("the room's picture draws %q, want %q", order, want)
	}
	for i := range want {
		if order[i] != want[i] {
			t.Errorf("the room's picture draws %q, want %q", order, want)
			break
		}
	}
	v.Tall = false
	if n := len(newPanelModel(v).Drawings); n != 2 {
		t.Errorf("the room's picture not asked Tall carries %d drawings, want 2", n)
	}
}
