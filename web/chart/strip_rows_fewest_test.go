package chart

import (
	"math"
	"math/rand"
	"strings"
	"testing"
)

// TestStripRowsAreAsFewAsTheDotsThatOverlap: the median strip stacks its
// dots in as few rows as the most dots whose letters overlap at one place
// (interval partitioning, Kleinberg & Tardos 2006, §4.1), and no two dots
// of a row overlap. Stacked by their medians, "M" at 13, "W" at 8, "M" at
// 23, "M" at 34 and "AD" at 38 (units) took 4 rows where 3 do; in the
// room a panel of 30 drew a row more for some orders of its letters, and
// the side column shrank them to 11.4 px on a 1280×720 projector
// (TestRoomSideKeepsWhatTheRoomMustSee).
func TestStripRowsAreAsFewAsTheDotsThatOverlap(t *testing.T) {
	px := func(v float64) float64 { return v }
	check := func(labels []string, medians []float64) {
		t.Helper()
		// Each dot spans [l, r): its letters (or the dot, 12 units) and,
		// to its left, the gap it keeps from the dot before it in a row.
		l, r := make([]float64, len(medians)), make([]float64, len(medians))
		for i, m := range medians {
			half := math.Max(12, labelEm(strings.TrimPrefix(labels[i], "Expert "), true)*stripLabelPx(compactLayout)) / 2
			l[i], r[i] = m-half-stripLabelPad, m+half
		}
		depth := 0
		for i := range l {
			d := 0
			for j := range l {
				if l[j] <= l[i] && l[i] < r[j] {
					d++
				}
			}
			depth = max(depth, d)
		}
		rows, n := stripRows(compactLayout, labels, medians, px)
		if n != depth {
			t.Errorf("%q at %v: %d rows, but at most %d dots overlap at one place", labels, medians, n, depth)
		}
		for i := range rows {
			for j := range rows {
				if i != j && rows[i] == rows[j] && l[j] <= l[i] && l[i] < r[j] {
					t.Errorf("%q at %v: %s and %s overlap in row %d", labels, medians, labels[i], labels[j], rows[i])
				}
			}
		}
	}
	check([]string{"Expert M", "Expert W", "Expert M", "Expert M", "Expert AD"}, []float64{13, 8, 23, 34, 38})
	letters := []string{"Expert I", "Expert W", "Expert M", "Expert J", "Expert AD", "Expert L", "Expert AB"}
	rng := rand.New(rand.NewSource(7))
	for k := 0; k < 3000; k++ {
		var ls []string
		var ms []float64
		for i := 0; i < 2+rng.Intn(12); i++ {
			ls = append(ls, letters[rng.Intn(len(letters))])
			ms = append(ms, float64(rng.Intn(120)))
		}
		check(ls, ms)
	}
}
