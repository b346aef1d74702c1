package web

import (
	"context"
	"html"
	"net/http"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The prior display shows the rationale the facilitator recorded with
// the agreed prior, as written: escaped, its line breaks kept, and a
// rationale longer than the side of a projector holds cut at a word with
// a note saying where the whole is. It marks the prior's median and 90%
// interval on its curve, named with the numbers the words beside it say.
func TestRoomPriorShowsItsRationaleAndMarks(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	ctx := context.Background()
	q1 := qs[0]
	room := roomPath(ws.ID, q1.ID)
	agree := func(rationale string) {
		t.Helper()
		form := url.Values{"source": {"pool"}, "rationale": {rationale}, "confirm_open": {"on"}}
		if r, body := h.post(questionPath(ws.ID, q1.ID)+"/agree", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("agree: %d %s", r.StatusCode, body)
		}
	}
	read := func() string {
		t.Helper()
		r, body := h.get(room + "?show=prior")
		if r.StatusCode != http.StatusOK {
			t.Fatalf("prior display: %d", r.StatusCode)
		}
		return body
	}
	// Invented rationale with markup, an ampersand and a line break.
	agree("Settled on the pool <b>as is</b> & \"no\" outlier (invented).\nSecond line: the field data of 2019 (invented).")
	body := read()
	want := "<strong>Why the panel settled on it</strong>: Settled on the pool &lt;b&gt;as is&lt;/b&gt; &amp; &#34;no&#34; outlier (invented).\nSecond line: the field data of 2019 (invented)."
	if !strings.Contains(body, want) {
		t.Errorf("the prior display does not show the rationale as written and escaped; want %q", want)
	}
	if strings.Contains(body, "<b>as is</b>") {
		t.Error("the rationale's markup reached the page unescaped")
	}
	if strings.Contains(body, "room-prior-cut") {
		t.Error("a short rationale is said to be cut")
	}

	// The marks: the legend names the median and the 90% interval with
	// the numbers the words say; the median's line stands between the
	// interval's ends, at its place on the linear axis.
	ps, err := h.db.AgreedPriors(ctx, ws.ID)
	if err != nil {
		t.Fatal(err)
	}
	d := ps[len(ps)-1].Dist
	pts := pointsIn(d.Lower, d.Upper, d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95))
	// Beside the picture each mark's sample leads the words that name it,
	// in the room's type; the picture's caption says them too.
	for _, w := range []*regexp.Regexp{
		regexp.MustCompile(`class="mark-sample mark-sample-median"[^>]*>.*?</svg><strong>Median ` + regexp.QuoteMeta(pts[1]) + ` \(proportion of units\)</strong>`),
		regexp.MustCompile(`class="mark-sample mark-sample-interval"[^>]*>.*?</svg><strong>90% interval ` + regexp.QuoteMeta(pts[0]+" to "+pts[2]) + `</strong>`),
		regexp.MustCompile(`The shaded band is the 90% interval ` + regexp.QuoteMeta(pts[0]+" to "+pts[2]) + ` of [^,]+, and the solid upright line its median ` + regexp.QuoteMeta(pts[1]) + `\.`),
	} {
		if !w.MatchString(body) {
			t.Errorf("the prior display does not name its marks: no %s", w)
		}
	}
	x := func(class string) []float64 {
		var out []float64
		for _, m := range regexp.MustCompile(`class="`+class+`" x1="([0-9.]+)"`).FindAllStringSubmatch(body, -1) {
			v, _ := strconv.ParseFloat(m[1], 64)
			out = append(out, v)
		}
		return out
	}
	// The wide and the compact drawings, and the tall ones for a
	// projector taller for its width (chart.PanelView.Tall).
	med, ends := x("mark-median"), x("mark-interval-end")
	if n := 2 + strings.Count(body, `class="chart-svg chart-wide chart-tall `); len(med) != n || len(ends) != 2*n {
		t.Fatalf("the prior's picture draws %d median lines and %d interval ends, want %d and %d (one in each drawing)", len(med), len(ends), n, 2*n)
	}
	lo, mid, hi := d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)
	for k := range med {
		l, r := ends[2*k], ends[2*k+1]
		if got, want := (med[k]-l)/(r-l), (mid-lo)/(hi-lo); !(l < med[k] && med[k] < r) || got < want-0.01 || got > want+0.01 {
			t.Errorf("drawing %d: the median's line at %.1f between %.1f and %.1f, at %.3f of the interval, want %.3f", k, med[k], l, r, got, want)
		}
	}

	// A rationale of 4,000 characters is cut at a word, and says so.
	long := strings.Repeat("Weighed the bench data against the field returns (invented). ", 70)[:4000]
	agree(long)
	body = html.UnescapeString(read())
	m := regexp.MustCompile(`(?s)<strong>Why the panel settled on it</strong>: (.*?)<span class="room-prior-cut">… \(cut here: the whole rationale is on the facilitator's page and in the record\)</span>`).FindStringSubmatch(body)
	if m == nil {
		t.Fatal("a rationale of 4,000 characters is not shown cut, with the note")
	}
	shown := strings.TrimSpace(m[1])
	if n := len([]rune(shown)); n > roomRationaleChars || n < roomRationaleChars/2 || !strings.HasPrefix(long, shown) || !strings.HasSuffix(shown, "(invented).") && long[len(shown)] != ' ' {
		t.Errorf("the cut rationale (%d characters) is not the rationale's start cut at a word: …%q", n, shown[max(0, len(shown)-40):])
	}
}
