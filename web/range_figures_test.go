package web

import (
	"context"
	"regexp"
	"strings"
	"testing"

	"github.com/a-h/templ"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// narrowBeta is a Beta on [1000, 2000] as narrow as the accuracy
// envelope allows (α + β = 1e7, elicit.MaxShape): its 5%, 50% and 95%
// points, about 1229.78, 1230.00 and 1230.22, all read "1230" at four
// figures.
func narrowBeta() elicit.ScaledBeta {
	return elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 2.3e6, Beta: 7.7e6}, Lower: 1000, Upper: 2000}
}

// apart fails unless texts, written for the different values of one
// range, all differ.
func apart(t *testing.T, what string, texts ...string) {
	t.Helper()
	for i := range texts {
		for j := i + 1; j < len(texts); j++ {
			if texts[i] == texts[j] {
				t.Errorf("%s: two different values both written %q (%q)", what, texts[i], texts)
			}
		}
	}
}

func renderText(t *testing.T, c templ.Component) string {
	t.Helper()
	var b strings.Builder
	if err := c.Render(context.Background(), &b); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// Where the facilitator's pages and the study write a range (a pool's or
// a prior's 5%, 50% and 95% points, a fit's, an interval's ends, an
// expert's stated values), its values read apart however narrow it is.
func TestPagesWriteNarrowRangesApart(t *testing.T) {
	d := narrowBeta()
	p := workshop.Percentiles{P05: d.Quantile(0.05), P50: d.Quantile(0.5), P95: d.Quantile(0.95)}
	q := workshop.Question{ID: 1, Position: 1, Quantity: "invented load", Lower: 1000, Upper: 2000}

	apart(t, "the steadiness table's pool", strings.Split(poolText(p, q), " · ")...)
	apart(t, "a prior's points on the quick priors", strings.Split(percentilesIn(d), ", ")...)
	apart(t, "a fit's points as typed", fittedRangeAsTyped(q, false, p.P05, p.P50, p.P95)...)
	if m := regexp.MustCompile(`90% between (\S+) and (\S+)\.`).FindStringSubmatch(priorLine(d)); m == nil {
		t.Errorf("prior line %q", priorLine(d))
	} else {
		apart(t, "the study's prior line", m[1:]...)
	}
	apart(t, "the study's interval", strings.Split(intervalText([2]float64{0.40271609, 0.40271885}), " to ")...)
	stated := statedLine(&record.Fit{Dist: d, Probs: []float64{0.05, 0.5, 0.95}, Stated: []float64{p.P05, p.P50, p.P95}}, false)
	var values []string
	for _, part := range strings.Split(stated, "; ") {
		values = append(values, part[strings.Index(part, "\u00a0")+len("\u00a0"):])
	}
	apart(t, "the report's stated values", values...)

	row := renderText(t, compareRow(q, "equal", &workshop.PoolSummary{Mean: d.Mean(), SD: d.SD(), Percentiles: p}, ""))
	var cells []string
	for _, label := range []string{"5%", "50%", "95%"} {
		m := regexp.MustCompile(`data-label="` + label + `">([^<]*)<`).FindStringSubmatch(row)
		if m == nil {
			t.Fatalf("the calibration page's pool row has no %s cell:\n%s", label, row)
		}
		cells = append(cells, m[1])
	}
	apart(t, "the calibration page's pool row", cells...)

	summary := renderText(t, agreedSummary(q, workshop.AgreedPrior{Dist: d}, ""))
	if m := regexp.MustCompile(`5%, 50%, 95%: ([^,]+), ([^,]+), ([^.]+(?:\.\d+)?)\.`).FindStringSubmatch(summary); m == nil {
		t.Errorf("the agreed prior's summary gives no percentiles:\n%s", summary)
	} else {
		apart(t, "the agreed prior's points", m[1:]...)
	}
}

// An expert's own numbers are one range too: their stated values in the
// read-backs, the history and the panel's table, and the fit's points
// read back to them.
func TestAnExpertsNarrowRangeReadsApart(t *testing.T) {
	d := narrowBeta()
	xs := []float64{d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)}
	q := workshop.Question{ID: 1, Position: 1, Quantity: "invented load", Lower: 1000, Upper: 2000, Probs: []float64{0.05, 0.5, 0.95}}
	values := func(s, sep, after string) []string {
		var out []string
		for _, part := range strings.Split(s, sep) {
			out = append(out, part[strings.Index(part, after)+len(after):])
		}
		return out
	}
	apart(t, "the history's answer", values(answerInWords(q, workshop.Answer{Values: xs}), "; ", "below ")...)
	apart(t, "the panel's answer", values(answerSummary(q, workshop.Answer{Values: xs}), "; ", nbsp)...)
	iq := q
	iq.Format = workshop.FormatInterval
	m := regexp.MustCompile(`between (\S+) and (\S+), .* best estimate (\S+)$`).FindStringSubmatch(answerInWords(iq, workshop.Answer{Lowest: xs[0], Highest: xs[2], Best: xs[1], Confidence: 0.9}))
	if m == nil {
		t.Fatal("the history's four values are not written")
	}
	apart(t, "the history's four values", m[1:]...)

	fit := elicit.Fit{Dist: d, Probs: q.Probs, Stated: xs, Fitted: xs, ProbErrors: make([]float64, 3), Percentiles: [3]float64(xs)}
	pv := newPreview(q, fit, false, speaker{})
	var said []string
	points := 0
	for _, line := range pv.ReadBacks {
		if m := regexp.MustCompile(`the value is (?:below|above|as likely to be below) (\S+?)\.? `).FindStringSubmatch(line + " "); m != nil {
			said = append(said, m[1])
		}
		if m := regexp.MustCompile(`has its middle \(the median\) at (\S+), and its 5% and 95% points at (\S+) and (\S+):`).FindStringSubmatch(line); m != nil {
			apart(t, "the fit's points read back", m[1:]...)
			points++
		}
	}
	if points != 1 {
		t.Errorf("the fit's points are not read back: %q", pv.ReadBacks)
	}
	if len(said) != 3 {
		t.Fatalf("read-backs %q", pv.ReadBacks)
	}
	apart(t, "the stated values read back", said...)
	pq := workshop.Question{Quantity: "invented share", Lower: 0, Upper: 1}
	var plain, pct []string
	for _, m := range regexp.MustCompile(`(\d[^ ,]*) \(([^)]*)\)`).FindAllStringSubmatch(readAsLine(pq, []float64{0.40271609, 0.4027175, 0.40271885}), -1) {
		plain, pct = append(plain, m[1]), append(pct, m[2])
	}
	if len(plain) != 3 {
		t.Fatalf("read as %q", readAsLine(pq, []float64{0.40271609, 0.4027175, 0.40271885}))
	}
	apart(t, "a proportion's values read as", plain...)
	apart(t, "a proportion's values read as percentages", pct...)
}

// A question's bounds are a range too: the rules take bounds as close as
// 1 and 1.00001, which four figures wrote "1 to 1".
func TestBoundsReadApart(t *testing.T) {
	q := workshop.Question{ID: 1, Position: 1, Quantity: "invented gauge reading", Lower: 1, Upper: 1.00001, Calibration: true}
	for what, got := range map[string]string{
		"the true value's hint":     truthHint(q),
		"a prior's label":           priorLabel(elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 2, Beta: 3}, Lower: 1, Upper: 1.00001}),
		"the question's summary":    renderText(t, questionSummary(q)),
		"the log's prior":           betaLabel(elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 2, Beta: 3}, Lower: 1, Upper: 1.00001}),
		"the bounds joined by text": boundsText(q.Lower, q.Upper, " to "),
	} {
		if !strings.Contains(got, "1.00001") {
			t.Errorf("%s writes the upper bound 1.00001 as the lower: %q", what, got)
		}
	}
}
