package chart

import (
	"strings"
	"testing"
)

// A strip of one expert's median (a question one expert answered, as a
// calibration question often is) writes that median once: its table read
// "lowest 0.2962, median of the medians 0.2962, highest 0.2962" on the
// projector, three rows of a spread there is not.
func TestOneMedianIsWrittenOnce(t *testing.T) {
	truth := 0.3268
	m := newMedianStrip(MedianStripView{ID: "one", Quantity: "share of returns", Units: "proportion of returns", Lower: 0, Upper: 1,
		Labels: []string{"Expert A"}, Medians: []float64{0.29624}, Truth: &truth})
	if len(m.Rows) != 1 || m.Rows[0].Value != "0.2962" || !strings.Contains(m.Rows[0].Name, "Expert A") {
		t.Errorf("one median's rows: %+v", m.Rows)
	}
	for _, word := range []string{"lowest", "highest", "median of the medians"} {
		if strings.Contains(m.Desc, word) {
			t.Errorf("one median's caption says %q: %q", word, m.Desc)
		}
	}
	if !strings.Contains(m.Desc, "0.3268") {
		t.Errorf("one median's caption leaves out the revealed true value: %q", m.Desc)
	}
	// Two medians keep their spread.
	two := newMedianStrip(MedianStripView{ID: "two", Quantity: "share", Lower: 0, Upper: 1,
		Labels: []string{"Expert A", "Expert B"}, Medians: []float64{0.2, 0.3}})
	if len(two.Rows) != 3 || two.Rows[0].Name != "lowest" {
		t.Errorf("two medians' rows: %+v", two.Rows)
	}
}
