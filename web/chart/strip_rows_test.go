package chart

import (
	"math"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// convergedMedians is an invented panel of 30 after Delphi rounds: 25
// medians drawn together between 0.10 and 0.13 (several the same), five
// apart, 0.05 to 0.21.
func convergedMedians() ([]string, []float64) {
	var labels []string
	var medians []float64
	for i := 0; i < 30; i++ {
		m := 0.10 + 0.005*float64(i%7)
		if i%6 == 5 {
			m = 0.05 + 0.04*float64(i/6)
		}
		s := ""
		for n := i + 1; n > 0; n = (n - 1) / 26 {
			s = string(rune('A'+(n-1)%26)) + s
		}
		labels, medians = append(labels, "Expert "+s), append(medians, m)
	}
	return labels, medians
}

// TestStripPacksItsDotsByTheirLetters: the median strip kept two dots of
// a row 64 units apart (36 on the compact strip) whatever their letters,
// and a panel of 30 whose medians had converged stacked 9 rows high, 563
// px of a projector's side column. Dots now stand as close as their
// letters allow: the 30 take at most 9 rows on the wide strip and 12 on
// the compact one (were 18 on both), and no two letters of a row overlap.
func TestStripPacksItsDotsByTheirLetters(t *testing.T) {
	// chart.css: the letters are 17px on the wide strip, 15px at most on the compact one.
	letterPx := map[string]float64{"wide": 17, "compact": 15}
	labels, medians := convergedMedians()
	m := newMedianStrip(MedianStripView{ID: "c", Quantity: "share", Lower: 0, Upper: 1, Labels: labels, Medians: medians})
	for i, d := range m.Drawings {
		lay := layouts[i]
		rows := map[string][]stripDot{}
		for _, p := range d.Dots {
			rows[p.Y] = append(rows[p.Y], p)
		}
		most := map[string]int{"wide": 9, "compact": 12}[lay.Name]
		if len(rows) > most {
			t.Errorf("%s: 30 medians stacked %d rows high, want at most %d", lay.Name, len(rows), most)
		}
		for y, row := range rows {
			for a := range row {
				for b := a + 1; b < len(row); b++ {
					xa, _ := strconv.ParseFloat(row[a].X, 64)
					xb, _ := strconv.ParseFloat(row[b].X, 64)
					wa := labelEm(row[a].Label, true) * letterPx[lay.Name]
					wb := labelEm(row[b].Label, true) * letterPx[lay.Name]
					if math.Abs(xa-xb) < (wa+wb)/2+1 || math.Abs(xa-xb) < 13 {
						t.Errorf("%s, row at %s: %s at %s and %s at %s overlap", lay.Name, y, row[a].Label, row[a].X, row[b].Label, row[b].X)
					}
				}
			}
		}
	}
	if !strings.Contains(m.Desc, "Expert AD") {
		t.Errorf("the caption leaves out the 30th expert: %q", m.Desc)
	}
}

// TestCrowdedStripStacksItsRowsCloser: a compact strip of more than four
// rows stacks them 29 units apart, not 35.2, so that the room, which shrinks
// a strip taller than its side column, writes the letters of a converged
// panel of 30 larger (they were 10.4 px at 1280×720). A letter still
// clears the dot of the row above: its capitals (at most 15 px; DejaVu
// Sans Bold's cap height taken as 0.73 em, from memory) stand on a
// baseline 10 units over its own dot, and a dot's radius is 6.
func TestCrowdedStripStacksItsRowsCloser(t *testing.T) {
	labels, medians := convergedMedians()
	m := newMedianStrip(MedianStripView{ID: "c", Quantity: "share", Lower: 0, Upper: 1, Labels: labels, Medians: medians})
	for _, d := range m.Drawings {
		var ys []float64
		seen := map[string]bool{}
		for _, p := range d.Dots {
			if !seen[p.Y] {
				seen[p.Y] = true
				y, _ := strconv.ParseFloat(p.Y, 64)
				ys = append(ys, y)
			}
		}
		sort.Float64s(ys)
		// The wide strip's letters are 17 px, and would touch the dot
		// above at 29: it keeps its pitch.
		want, px := 29.0, 15.0
		if d.Layout == "wide" {
			want, px = 35.2, 17
		}
		for i := 1; i < len(ys); i++ {
			pitch := ys[i] - ys[i-1]
			if math.Abs(pitch-want) > 0.01 {
				t.Errorf("%s: rows %.1f units apart, want %.1f", d.Layout, pitch, want)
			}
			if clear := pitch - 6 - 10 - 0.73*px; clear < 1.5 {
				t.Errorf("%s: rows %.1f units apart: a letter clears the dot above by %.1f", d.Layout, pitch, clear)
			}
		}
	}
	// A strip of a few rows keeps its pitch.
	few := newMedianStrip(MedianStripView{ID: "f", Quantity: "share", Lower: 0, Upper: 1,
		Labels: []string{"Expert A", "Expert B"}, Medians: []float64{0.2, 0.2}})
	a, _ := strconv.ParseFloat(few.Drawings[0].Dots[0].Y, 64)
	b, _ := strconv.ParseFloat(few.Drawings[0].Dots[1].Y, 64)
	if math.Abs(math.Abs(a-b)-35.2) > 0.01 {
		t.Errorf("two rows %.1f units apart, want 35.2 as before", math.Abs(a-b))
	}
}
