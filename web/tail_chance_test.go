package web

import (
	"context"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// A chips board whose chips all lie low leaves its upper bin edges far in
// the fitted curve's upper tail. The fit table and the read-backs write
// such a computed chance as a true bound ("more than 99.9999%"), not with
// the fourteen figures it took to stay short of 100%
// ("99.999999999997%"), which no expert can read.
func TestFarTailChanceReadsAsABound(t *testing.T) {
	g := newExpertRig(t)
	q := workshop.Question{WorkshopID: g.ws.ID, Wording: "Place 6 chips on the share of valves that stick.",
		Quantity: "Sticking share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
		BinEdges: []float64{0, 0.05, 0.1, 0.15, 0.2, 0.3, 0.4, 0.6, 1}, Chips: 6}
	if err := g.db.AddQuestion(context.Background(), &q); err != nil {
		t.Fatal(err)
	}
	f := url.Values{}
	for i, c := range []int{0, 2, 3, 1, 0, 0, 0, 0} {
		f.Set("counts["+strconv.Itoa(i)+"]", strconv.Itoa(c))
	}
	resp, body := g.post(g.qpath(0, q)+"/preview", f)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("preview: status %d", resp.StatusCode)
	}
	// Edges 0.4 and 0.6 lie far in the upper tail: the fitted chance
	// below 0.4 was "99.9999999%", below 0.6 (1 in double) "100%".
	cell := regexp.MustCompile(`data-label="the curve&#39;s chance below it" role="cell">([^<]*)<`)
	var cells []string
	for _, m := range cell.FindAllStringSubmatch(wideOnly(body), -1) {
		cells = append(cells, m[1])
	}
	if n := len(cells); n < 7 || cells[5] != "more than 99.9999%" || cells[6] != "more than 99.9999%" {
		t.Errorf("fitted chances %q, want the last two as more than 99.9999%%", cells)
	}
	for _, c := range cells {
		if c == "100%" || c == "0%" || regexp.MustCompile(`\.\d{5,}%`).MatchString(c) {
			t.Errorf("a fitted chance strictly inside reads %q", c)
		}
	}
	// A chance below of 0% or 100% is reached only at a bound, which the
	// curve's value names: "the curve says 1" beside "you said 0.2" read
	// as a wide miss.
	says := regexp.MustCompile(`data-label="the curve says" role="cell">([^<]*)<`)
	var values []string
	for _, m := range says.FindAllStringSubmatch(wideOnly(body), -1) {
		values = append(values, m[1])
	}
	if n := len(values); n < 7 || values[0] != "0, the lower bound" || values[3] != "1, the upper bound" || values[6] != "1, the upper bound" || values[1] == "" || strings.Contains(values[1], "bound") {
		t.Errorf("the curve's values %q, want the bound named where the chance below is 0%% or 100%%", values)
	}
	// The read-back said the curve gives "no chance" above 0.6.
	if !strings.Contains(body, "The best-matching curve gives a chance of less than 0.0001% above it.") || strings.Contains(body, "gives no chance") {
		t.Error("the read-back of the far-tail edge 0.6 is not a true bound")
	}
}

// The read-back of a stated value the curve puts far in its upper tail
// says "more than 99.9999%", not fourteen figures.
func TestFittedBackBoundsAFarTail(t *testing.T) {
	if got, want := fittedBack(0.05, 0.99999999999997), "The best-matching curve gives a chance of more than 99.9999% below it."; got != want {
		t.Errorf("fittedBack = %q, want %q", got, want)
	}
	if got, want := fittedBack(0.95, 0.9999997), "The best-matching curve gives a chance of less than 0.0001% above it."; got != want {
		t.Errorf("fittedBack = %q, want %q", got, want)
	}
}
