package chart

import (
	"math"
	"regexp"
	"strings"
	"testing"
)

// The weight map's log axis writes its decades as the pages write
// numbers, in plain decimals down to 1e-9: the demo's overconfident
// expert, calibration 0.0003602, set the axis to start at "1e-4", the one
// number in exponent form on the calibration page beside "0.0003602" in
// its caption. Adjacent decade labels, at the map's widest stride, stay
// apart at the tick labels' 13px.
func TestWeightMapDecadesReadAsDecimals(t *testing.T) {
	exp := regexp.MustCompile(`\de-?\d`)
	for lo := -1; lo >= -12; lo-- {
		v := ScoresView{Alpha: 0.5, Rows: []ScoreRow{
			{Expert: "Expert A", Calibration: 0.8, Information: 0.2, Weight: 1},
			{Expert: "Expert B", Calibration: 3.6 * math.Pow(10, float64(lo)), Information: 2.6},
		}}
		m := newScoresModel(v)
		var labels []string
		for i, tk := range m.XTicks {
			labels = append(labels, tk.Label)
			if lo >= -9 && exp.MatchString(tk.Label) {
				t.Errorf("lowest score 3.6e%d: the decade %s is written %q", lo, tk.Value, tk.Label)
			}
			if i > 0 {
				a, b := m.XTicks[i-1], tk
				if !tickLabelsClear(b.Label, parseCoord(t, b.Pos), a.Label, parseCoord(t, a.Pos), 13) {
					t.Errorf("lowest score 3.6e%d: decades %q and %q run together", lo, a.Label, b.Label)
				}
			}
		}
		if lo == -4 && !strings.Contains(strings.Join(labels, " "), "0.0001") {
			t.Errorf("lowest score 3.6e-4: the decades read %q", labels)
		}
	}
}
