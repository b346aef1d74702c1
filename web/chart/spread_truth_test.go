package chart

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The picture of a large panel draws a revealed true value as the picture
// of the curves does: a labelled red dashed upright line through the
// curves (the one function, truthMark), continued unlabelled through the
// strip of intervals in the same column, and said in both captions. With
// no curves to draw above the strip, the strip's own line carries the
// label, inside the picture. Before the reveal there is none of it.
func TestSpreadDrawsTheRevealedTrueValue(t *testing.T) {
	const truth = 0.4321
	value := FormatWithin(truth, 0, 1, false)
	words := "The true value, now revealed, is " + value + ": the red dashed upright line."
	svgs := regexp.MustCompile(`(?s)<svg class="chart-svg[^"]*".*?</svg>`)
	for _, curves := range []bool{true, false} {
		v, _ := spreadInputs(30)
		if !curves {
			v.Curves = nil
		}
		v.Truth = ptr(truth)
		m := newSpreadModel(v)
		if !strings.Contains(m.Desc, words) {
			t.Errorf("curves %v: the strip's caption does not say the true value: %q", curves, m.Desc)
		}
		if curves && !strings.Contains(m.Panel.Desc, words) {
			t.Errorf("the curves' caption does not say the true value: %q", m.Panel.Desc)
		}
		for _, lay := range []string{"wide", "compact"} {
			pics := svgs.FindAllString(renderLayout(t, Spread(v), lay), -1)
			if want := map[bool]int{true: 2, false: 1}[curves]; len(pics) != want {
				t.Fatalf("curves %v, %s: %d pictures, want %d", curves, lay, len(pics), want)
			}
			var xs []float64
			for i, pic := range pics {
				ns := parse(t, pic)
				lines, labels := find(ns, "line", "truth-line"), find(ns, "text", "truth-label")
				labelled := i == 0 // the curves', or the strip's without curves
				if len(lines) != 1 || (len(labels) == 1) != labelled || len(labels) > 1 {
					t.Fatalf("curves %v, %s, picture %d: %d lines and %d labels of the true value, want one line, labelled %v", curves, lay, i, len(lines), len(labels), labelled)
				}
				xs = append(xs, lines[0].num(t, "x1"))
				if !labelled {
					continue
				}
				if labels[0].Text != "true value "+value {
					t.Errorf("curves %v, %s: label %q", curves, lay, labels[0].Text)
				}
				vb := strings.Fields(ns[0].Attr["viewBox"])
				w, _ := strconv.ParseFloat(vb[2], 64)
				x, y := labels[0].num(t, "x"), labels[0].num(t, "y")
				width := labelEm(labels[0].Text, true) * truthLabelPx
				left := map[string]float64{"start": x, "middle": x - width/2, "end": x - width}[labels[0].Attr["text-anchor"]]
				if left < 0 || left+width > w || y-0.76*truthLabelPx < 0 {
					t.Errorf("curves %v, %s: label from %.1f to %.1f, baseline %.1f, in a picture %.0f wide", curves, lay, left, left+width, y, w)
				}
				if y1 := lines[0].num(t, "y1"); y > y1 {
					t.Errorf("curves %v, %s: label's baseline %.1f below the line's top %.1f", curves, lay, y, y1)
				}
			}
			if len(xs) == 2 && (xs[0]-xs[1] > 0.5 || xs[1]-xs[0] > 0.5) {
				t.Errorf("%s: the line stands at x %.1f over the curves and at %.1f in the strip", lay, xs[0], xs[1])
			}
		}
	}
	v, _ := spreadInputs(30)
	html := renderLayout(t, Spread(v), "wide") + renderLayout(t, Spread(v), "compact")
	if strings.Contains(html, "truth-") || strings.Contains(html, "true value") {
		t.Errorf("a spread without a true value draws or says one")
	}
}
