package e2e

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestFarTailChanceStaysOnOneLine: a chips board whose chips all lie low
// puts its upper bin edges far in the fitted curve's upper tail, where
// the fit's table says "more than 99.9999%". Beside the picture on a
// wide screen that cell was narrow enough to break the phrase over two
// lines ("more than" above "99.9999%"), at 1366 px and again at 1920 px.
// Each number of the fit's table stays on one line there, and on a phone
// the table, as blocks of labelled lines, still fits the screen.
func TestFarTailChanceStaysOnOneLine(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	q := workshop.Question{WorkshopID: d.w.ID, Wording: "Place 6 chips on the share of valves that stick in their first year (invented).",
		Quantity: "sticking share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
		BinEdges: []float64{0, 0.05, 0.1, 0.15, 0.2, 0.3, 0.4, 0.6, 1}, Chips: 6}
	if err := site.DB.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	var priya workshop.Expert
	for _, e := range d.experts {
		if e.Name == "Priya Raman" {
			priya = e
		}
	}
	rv := workshop.Revision{QuestionID: q.ID, ExpertID: priya.ID, Answer: workshop.Answer{Counts: []int{0, 2, 3, 1, 0, 0, 0, 0}},
		Reason: "Sticking is rare past a fifth (invented)."}
	if err := site.DB.SaveRevision(ctx, &rv); err != nil {
		t.Fatal(err)
	}
	shots := newScreenshots(t)
	br := startBrowser(t)
	expert := br.person("Priya Raman")
	page := site.URL + linkOf(t, d.links, "Priya Raman") + "q/" + strconv.FormatInt(q.ID, 10)
	for _, w := range []int64{390, 1366, 1920} {
		where := fmt.Sprintf("the chips board's fit table at %d px", w)
		expert.viewport(w, 900, w < 600)
		if st := expert.open(page); st != http.StatusOK {
			t.Fatalf("%s: %d", where, st)
		}
		cells := eval[[]string](expert, "the fit table's cells", `[...document.querySelectorAll(".chart-table-fit td")].filter(c => c.getClientRects().length).map(c => {
			const r = document.createRange();
			r.selectNodeContents(c);
			const tops = [...r.getClientRects()].filter(b => b.width > 0).map(b => Math.round(b.top));
			return String(new Set(tops).size) + " " + c.innerText.trim();
		})`)
		far := 0
		for _, c := range cells {
			lines, text, _ := strings.Cut(c, " ")
			if strings.Contains(text, "more than 99.9999%") {
				far++
			}
			if text != "" && lines != "1" && w > 600 {
				t.Errorf("%s: %q is broken over %s lines", where, text, lines)
			}
		}
		if far == 0 {
			t.Fatalf("%s: no far-tail chance in %q, so nothing is tested", where, cells)
		}
		fits(t, expert, where, w)
		shots.take(expert, fmt.Sprintf("far-tail-chips-%d", w))
	}
}
