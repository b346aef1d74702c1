package chart

import (
	"bytes"
	"context"
	"fmt"
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
	for i, aspect := range roomTallShapes {
		tall := m.Drawings[2+i]
		tl := tall.Twin.Layout
		class := fmt.Sprintf("chart-tall-%d", i+1)
		if tall.Twin.Shape != class || tl.Name != wideLayout.Name {
			t.Errorf("drawing %d is of shape %q drawn %q, want %q drawn wide", 2+i, tall.Twin.Shape, tl.Name, class)
		}
		if tl.width() != wl.width() {
			t.Errorf("the %s drawing is %g units wide, the wide one %g", class, tl.width(), wl.width())
		}
		// The shape, to within a unit of height (the plots' heights are
		// rounded to units).
		if want := tl.width() / aspect; math.Abs(tall.Twin.Height-want) > 1 {
			t.Errorf("the %s drawing is %g units tall, want %g for its shape %g", class, tall.Twin.Height, want, aspect)
		}
		grow := tl.DensityH + tl.CDFH - wl.DensityH - wl.CDFH
		if d := tall.Twin.Height - wide.Twin.Height; math.Abs(d-grow) > 0.5 {
			t.Errorf("the %s drawing is %g units taller than the wide one, want its plots' %g", class, d, grow)
		}
		if r := tl.DensityH / tl.CDFH; math.Abs(r-wl.DensityH/wl.CDFH) > 0.02 {
			t.Errorf("the %s drawing's plots stand %g to one, the wide one's %g", class, r, wl.DensityH/wl.CDFH)
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
	want := []string{"chart-wide", "chart-compact"}
	for i := range roomTallShapes {
		want = append(want, fmt.Sprintf("chart-wide chart-tall chart-tall-%d", i+1))
	}
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

// TestRoomSpreadTallDrawing: a large panel's room picture (Spread), the
// curves over the strip of intervals, left some 145 px blank under its
// notes at 1024×768 and 305 px at 1280×1024. Asked Tall, it carries the
// tall drawings too, each one picture of the curves and the strip whose
// whole is drawn to its shape (the strip keeping its rows, the curves'
// plots taking the growth), except a shape hardly taller than the wide
// drawing (roomTallLeast). A strip of 200 experts is already taller than
// every shape: no tall drawing.
func TestRoomSpreadTallDrawing(t *testing.T) {
	v, _ := spreadInputs(20)
	v.Room, v.Tall = true, true
	m := newSpreadModel(v)
	if len(m.Joined) < 2 {
		t.Fatalf("the room's spread draws %d pictures", len(m.Joined))
	}
	wide := m.Joined[0]
	w := wide.Twin.Layout.width()
	var shapes []string
	for _, j := range m.Joined[2:] {
		shapes = append(shapes, j.Twin.Shape)
		if j.Twin.Layout.width() != w {
			t.Errorf("the %s picture is %g units wide, the wide one %g", j.Twin.Shape, j.Twin.Layout.width(), w)
		}
		if j.Strip.Height != wide.Strip.Height {
			t.Errorf("the %s picture's strip is %g units tall, the wide one's %g", j.Twin.Shape, j.Strip.Height, wide.Strip.Height)
		}
		var i int
		if _, err := fmt.Sscanf(j.Twin.Shape, "chart-tall-%d", &i); err != nil || i < 1 || i > len(roomTallShapes) {
			t.Fatalf("a tall picture's class is %q", j.Twin.Shape)
		}
		if want := w / roomTallShapes[i-1]; math.Abs(j.Twin.Height-want) > 1 {
			t.Errorf("the %s picture is %g units tall with its strip, want %g for its shape %g", j.Twin.Shape, j.Twin.Height, want, roomTallShapes[i-1])
		}
	}
	for i, aspect := range roomTallShapes {
		class := fmt.Sprintf("chart-tall-%d", i+1)
		drawn := false
		for _, s := range shapes {
			drawn = drawn || s == class
		}
		if grow := w/aspect - wide.Twin.Height; drawn != (grow >= roomTallLeast) {
			t.Errorf("the %s picture drawn: %v, with %g units to grow", class, drawn, grow)
		}
	}
	if len(shapes) < 3 {
		t.Errorf("a spread of 20 draws the tall pictures %q, want at least the three tallest", shapes)
	}
	v, _ = spreadInputs(200)
	v.Room, v.Tall = true, true
	if n := len(newSpreadModel(v).Joined); n != 2 {
		t.Errorf("a spread of 200 in the room draws %d pictures, want the wide and the compact", n)
	}
	v.Room = false
	if n := len(newSpreadModel(v).Panel.Drawings); n != 2 {
		t.Errorf("a spread outside the room asked Tall draws its curves %d times, want 2", n)
	}
}
