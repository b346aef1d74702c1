package e2e

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// minSVGText is the smallest a picture's text may be drawn, in CSS pixels.
const minSVGText = 11

// svgTextCheck measures, in the page, every text of the pictures inside
// css: its font size times the scale at which its SVG is drawn. It
// returns the smallest, and how many texts it measured.
const svgTextCheck = `(() => {
	let smallest = 1e9, n = 0, where = "";
	for (const svg of document.querySelectorAll(%q)) {
		const vb = svg.viewBox.baseVal, w = svg.getBoundingClientRect().width;
		if (!vb || !vb.width || !w) continue;
		const scale = w / vb.width;
		for (const t of svg.querySelectorAll("text")) {
			const px = parseFloat(getComputedStyle(t).fontSize) * scale;
			n++;
			if (px < smallest) { smallest = px; where = t.textContent; }
		}
	}
	return {smallest, n, where};
})()`

type textSize struct {
	Smallest float64 `json:"smallest"`
	N        int     `json:"n"`
	Where    string  `json:"where"`
}

// checkLayout fails when the page scrolls sideways or a picture's text
// in css is drawn smaller than minSVGText.
func checkLayout(t *testing.T, p *person, where, css string, width int) {
	t.Helper()
	if sw := eval[int](p, "page width", `document.documentElement.scrollWidth`); sw > width {
		t.Errorf("%s at %d px: the page scrolls sideways (%d px wide)", where, width, sw)
	}
	ts := eval[textSize](p, "measure picture text", fmt.Sprintf(svgTextCheck, css))
	if ts.N == 0 {
		t.Errorf("%s at %d px: no picture text found in %s", where, width, css)
	} else {
		t.Logf("%s at %d px: smallest of %d picture texts drawn at %.1f px (%q)", where, width, ts.N, ts.Smallest, ts.Where)
	}
	if ts.N > 0 && ts.Smallest < minSVGText-0.05 {
		t.Errorf("%s at %d px: picture text %q is drawn at %.1f px, below %d px", where, width, ts.Where, ts.Smallest, minSVGText)
	}
}

// TestCalibrationScreenInBrowser opens the invented demo's calibration
// page as a facilitator at a projector (1366 px) and on a phone (390 px):
// it leads with the weight map, says how weak the calibration is, draws
// the steadiness of the pool, never scrolls the page sideways and keeps
// the pictures' text readable. The facilitator then reveals the true
// values and applies performance weights in the browser; the question
// panel and the printable report say how weak they are, and the report
// shows the scores behind them.
func TestCalibrationScreenInBrowser(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	b := startBrowser(t)
	shots := newScreenshots(t)
	fac := b.person("facilitator")
	signIn(t, site, fac)
	ws, base := d.w, d.url
	page := base + "/calibration"
	pictures := ".chart-weight-map .chart-svg, .chart-steadiness .chart-svg"

	for _, width := range []int{1366, 390} {
		fac.viewport(int64(width), 900, width < 500)
		if st := fac.open(page); st != http.StatusOK {
			t.Fatalf("calibration page: %d", st)
		}
		fac.sees("calibration page", "Who earns weight", "How far these scores can carry weights:",
			"Only 4 calibration questions were scored", "Ines Varga has 100% of the weight",
			"(Ines Varga 4, Tomas Lindqvist 3, Priya Raman 3, Ole Brandt 4)",
			"How steady the weighted pool is", "The performance-weighted pool, scored as if it were an expert")
		notShown(t, fac, "calibration page", "decision maker")
		// The weight map comes before the numbers.
		if !eval[bool](fac, "order", `(() => { const m = document.getElementById("weight-map"), t = document.getElementById("scores-table");
			return !!m && !!t && !!(m.compareDocumentPosition(t) & Node.DOCUMENT_POSITION_FOLLOWING); })()`) {
			t.Errorf("at %d px the weight map does not come before the scores table", width)
		}
		if n := fac.count("#weight-map circle.map-expert"); n != 4 {
			t.Errorf("at %d px the weight map draws %d experts, want 4", width, n)
		}
		checkLayout(t, fac, "calibration page", pictures, width)
		// The cut-off, where the weight is decided, is on screen without
		// scrolling the picture.
		if x := eval[float64](fac, "cut-off position", `document.querySelector("#weight-map .map-cut").getBoundingClientRect().x`); x < 0 || x > float64(width) {
			t.Errorf("at %d px the cut-off is drawn off screen, at x = %.0f", width, x)
		}
		weightMapSaysWhatLiesBeyond(t, fac, width)
		shots.take(fac, "calibration-"+strconv.Itoa(width))
	}
	// A cut-off the facilitator fixes lower: from the map's right end its
	// label is out of view on a phone (α = 0.003), or it is in view only
	// from its left end (α = 0.001). The page brings it into view, with
	// the experts who earn weight right of it.
	fac.viewport(390, 900, true)
	for _, a := range []string{"0.003", "0.001"} {
		fac.open(page + "?alpha=" + a)
		got := eval[mapOnScreen](fac, "the weight map on a phone", mapOnScreenJS)
		if !got.CutShown || !got.MoreLeft || !got.MoreRight {
			t.Errorf("on a phone with the cut-off fixed at %s the map shows its cut-off's label: %v, shadows at the left %v and the right %v, want all", a, got.CutShown, got.MoreLeft, got.MoreRight)
		}
		if len(got.WeightedShown) == 0 {
			t.Errorf("on a phone with the cut-off fixed at %s the map shows none of the experts who earn weight", a)
		}
		shots.part(fac, "#weight-map", "calibration-map-alpha-"+a+"-390")
	}

	// Reveal every true value and apply performance weights through the
	// page's form.
	qs, _ := site.DB.Questions(ctx, ws.ID)
	var target workshop.Question
	for _, q := range qs {
		if q.Calibration {
			if err := site.DB.SetTrueValue(ctx, q.ID, *q.TrueValue, true, "answers in (invented)"); err != nil {
				t.Fatal(err)
			}
		} else if target.ID == 0 {
			target = q
		}
	}
	fac.viewport(1366, 900, false)
	fac.open(page)
	form := `#weights form`
	fac.do("choose performance weights", chromedp.Click(chromedp.CSS(form+` input[name=scheme][value=performance]`)))
	fac.fill(form, "reason", "scored on the invented calibration questions")
	if st := fac.load("set performance weights", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("set weights: %d", st)
	}
	fac.sees("weights in force", "They are the performance weights shown above.", "Stored with them, so the record can reproduce them")
	w, err := site.DB.Weights(ctx, ws.ID)
	if err != nil || w.Scheme != workshop.WeightsPerformance || w.Basis == nil || len(w.Basis.CalibrationAnswers) != 14 {
		t.Fatalf("stored weights %+v, %v", w, err)
	}

	for _, width := range []int{1366, 390} {
		fac.viewport(int64(width), 900, width < 500)
		fac.open(base + "/q/" + strconv.FormatInt(target.ID, 10))
		fac.sees("question panel", "The performance weights in force rest on weak ground:", "Only 4 calibration questions were scored")
		if sw := eval[int](fac, "page width", `document.documentElement.scrollWidth`); sw > width {
			t.Errorf("panel at %d px scrolls sideways (%d px)", width, sw)
		}
		shots.take(fac, "panel-"+strconv.Itoa(width))
		fac.open(base + "/report")
		fac.sees("report", "Calibration scores and performance weights", "How far these scores can carry weights:",
			"Pool weights over time", "scored on the invented calibration questions", "Weak ground: fewer than 10 calibration questions")
		notShown(t, fac, "report", "No scores in this record")
		checkLayout(t, fac, "report", "#performance .chart-svg", width)
		shots.take(fac, "report-"+strconv.Itoa(width))
	}
}

// TestCalibrationScaleFormInBrowser: the facilitator opens a calibration
// question's scale choice (folded under its true-value form) at 1366 and
// 390 px, asks for the log scale without a reason and is shown the form
// again, open, with the reason marked; with a reason the card then says
// "Information scored on the log scale". axe-core finds no serious or
// critical violation with the form open and refused.
func TestCalibrationScaleFormInBrowser(t *testing.T) {
	site, d := startDemo(t)
	axe := axeSourceOrNothing(t)
	b := startBrowser(t)
	shots := newScreenshots(t)
	fac := b.person("facilitator")
	signIn(t, site, fac)
	page := d.url + "/calibration"
	form := `details.background-choice form`
	for _, width := range []int{1366, 390} {
		fac.viewport(int64(width), 900, width < 500)
		fac.open(page)
		fac.do("open the scale choice", chromedp.Click(chromedp.CSS(`details.background-choice summary`)))
		fac.do("choose the log scale", chromedp.Click(chromedp.CSS(form+` input[name=background][value=log-uniform]`)))
		if st := fac.load("ask for the log scale without a reason", chromedp.Click(chromedp.CSS(form+` button[type=submit]`))); st != http.StatusUnprocessableEntity {
			t.Fatalf("at %d px: the log scale without a reason answered %d", width, st)
		}
		if !eval[bool](fac, "form open", `document.querySelector("details.background-choice[open] textarea[aria-invalid=true]") !== null`) {
			t.Errorf("at %d px the refused scale form is not shown open with its reason marked", width)
		}
		fac.sees("refused scale form", "Reason (required to change the scale", "Nothing was saved")
		checkLayout(t, fac, "calibration page, scale refused", ".chart-weight-map .chart-svg", width)
		if axe != "" {
			accessible(t, fac, axe, fmt.Sprintf("calibration page with the scale refused at %d px", width))
		}
		shots.take(fac, "calibration-scale-refused-"+strconv.Itoa(width))
	}
	fac.fill(`details.background-choice[open] form`, "reason", "Arc faults per hour spread over orders of magnitude (invented).")
	if st := fac.load("set the log scale", chromedp.Click(chromedp.CSS(`details.background-choice[open] form button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("set the log scale: %d", st)
	}
	fac.sees("calibration page", "Information scored on the log scale")
	shots.take(fac, "calibration-scale-set-390")
}

// TestSteadinessTableOfManyQuestionsFits: the calibration page's table of
// reruns, a column per target question, keeps to the page at a
// projector's 1280 and 1366 px when a workshop has five target questions,
// one of them a rare event written "0.00001829 · 0.00005055 · 0.0001084":
// the table widened the whole page to 1707 px at 1366. It now scrolls in
// a box of its own, every column within the box's reach (fits).
func TestSteadinessTableOfManyQuestionsFits(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	rare := [][]float64{{0.00002, 0.00005, 0.00012}, {0.00003, 0.0001, 0.00025}, {0.00005, 0.00015, 0.0004}, {0.00004, 0.00012, 0.0003}}
	for k := range 4 {
		q := workshop.Question{WorkshopID: d.w.ID, Wording: fmt.Sprintf("(Invented.) What proportion of HX-40 units will show fault %d in their first year?", k+1),
			Quantity: fmt.Sprintf("first-year share with fault %d", k+1), Units: "proportion of units", Lower: 0, Upper: 1,
			Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
		if err := site.DB.AddQuestion(ctx, &q); err != nil {
			t.Fatal(err)
		}
		for e, vs := range rare {
			rv := workshop.Revision{QuestionID: q.ID, ExpertID: d.experts[e].ID, Answer: workshop.Answer{Values: vs}}
			if err := site.DB.SaveRevision(ctx, &rv); err != nil {
				t.Fatal(err)
			}
		}
	}
	fac := signedInFacilitator(t, site)
	for _, w := range []int64{1280, 1366} {
		fac.viewport(w, 900, false)
		fac.open(d.url + "/calibration")
		if fac.count(".table-steadiness") == 0 {
			t.Fatalf("at %d px the calibration page has no table of reruns", w)
		}
		fac.sees("the reruns", "0.00005055")
		fits(t, fac, "the calibration page with five target questions", w)
	}
}

// mapOnScreen is the weight map as a phone shows it in its box.
type mapOnScreen struct {
	Scrolls       bool     `json:"scrolls"`       // wider than its box
	CutShown      bool     `json:"cutShown"`      // the cut-off's line and label wholly in the box
	WeightedShown []string `json:"weightedShown"` // the weighted experts' discs wholly in the box, by calibration
	Weighted      int      `json:"weighted"`      // how many discs earn weight
	LeftLabel     bool     `json:"leftLabel"`     // the leftmost expert's label wholly in the box
	MoreLeft      bool     `json:"moreLeft"`      // a shadow stands at the box's left edge
	MoreRight     bool     `json:"moreRight"`     // and at its right edge
	Hint          string   `json:"hint"`          // the hint above the map, if shown on screen
}

const mapOnScreenJS = `(() => {
	const fig = document.getElementById("weight-map"), box = fig.querySelector(".map-scroll"), frame = fig.querySelector(".map-frame");
	const b = box.getBoundingClientRect();
	const inBox = e => { const r = e.getBoundingClientRect(); return r.left >= b.left - 0.5 && r.right <= b.right + 0.5; };
	const labels = Array.from(fig.querySelectorAll(".map-label")).sort((x, y) => x.getBoundingClientRect().left - y.getBoundingClientRect().left);
	const weighted = Array.from(fig.querySelectorAll("circle.map-weighted"));
	const shadow = side => { if (!frame) return false; const s = getComputedStyle(frame, side); return s.display !== "none" && s.content !== "none" && s.content !== "normal"; };
	const hint = fig.querySelector(".map-scroll-hint"), h = hint ? hint.getBoundingClientRect() : {left: -1, right: -1};
	return {
		scrolls: box.scrollWidth > box.clientWidth + 1,
		cutShown: inBox(fig.querySelector(".map-cut")) && inBox(fig.querySelector(".map-cut-label")),
		weightedShown: weighted.filter(inBox).map(c => c.dataset.calibration),
		weighted: weighted.length,
		leftLabel: labels.length > 0 && inBox(labels[0]),
		moreLeft: shadow("::before"),
		moreRight: shadow("::after"),
		hint: hint && hint.getClientRects().length && h.left >= 0 && h.right <= window.innerWidth ? hint.innerText : "",
	};
})()`

// weightMapSaysWhatLiesBeyond: on a phone the weight map is wider than
// the screen and opens at its right end, at the cut-off and the experts
// who earn weight; its left-hand label (Ole Brandt's) is out of view.
// That was said by nothing but the label cut at the box's edge: a line
// above the map now says more of it lies to the left, and a shadow
// stands at each edge beyond which more lies. Scrolled to its left end,
// the label is whole and the shadow moves to the right edge. Where the
// map fits (1366 px) there is neither.
func weightMapSaysWhatLiesBeyond(t *testing.T, p *person, width int) {
	t.Helper()
	got := eval[mapOnScreen](p, "the weight map", mapOnScreenJS)
	if width >= 600 {
		if got.Scrolls || got.MoreLeft || got.MoreRight || got.Hint != "" {
			t.Errorf("at %d px the weight map scrolls %v, has shadows at the left %v and the right %v, and the hint %q, want none", width, got.Scrolls, got.MoreLeft, got.MoreRight, got.Hint)
		}
		return
	}
	if !got.Scrolls {
		t.Fatalf("at %d px the weight map fits its box: the test expects it to scroll", width)
	}
	if !got.CutShown || len(got.WeightedShown) != got.Weighted || got.Weighted == 0 {
		t.Errorf("at %d px the weight map opens with its cut-off shown %v and %d of its %d weighted experts, want the cut-off and all", width, got.CutShown, len(got.WeightedShown), got.Weighted)
	}
	if got.LeftLabel {
		t.Errorf("at %d px the weight map opens with its left-hand label in view: the test expects it out of view", width)
	}
	if !strings.HasPrefix(got.Hint, "← More of the map lies to the left") {
		t.Errorf("at %d px the hint above the weight map reads %q, want it to say more lies to the left", width, got.Hint)
	}
	if !got.MoreLeft || got.MoreRight {
		t.Errorf("at %d px the weight map opens with shadows at its left %v and right %v edges, want only the left", width, got.MoreLeft, got.MoreRight)
	}
	eval[bool](p, "scroll the map to its left end", `(() => { const b = document.querySelector("#weight-map .map-scroll"); b.scrollLeft = -b.scrollWidth; b.dispatchEvent(new Event("scroll")); return true; })()`)
	if err := p.poll(2*time.Second, `!document.getElementById("weight-map").hasAttribute("data-more-left")`); err != nil {
		t.Errorf("at %d px the weight map scrolled to its left end still says more lies to the left: %v", width, err)
	}
	got = eval[mapOnScreen](p, "the weight map at its left end", mapOnScreenJS)
	if !got.LeftLabel || got.MoreLeft || !got.MoreRight {
		t.Errorf("at %d px the weight map at its left end shows its left-hand label %v, shadows at its left %v and right %v edges, want the label and only the right", width, got.LeftLabel, got.MoreLeft, got.MoreRight)
	}
}
