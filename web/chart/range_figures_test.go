package chart

import (
	"github.com/parley-elicit/parley/elicit"
	"regexp"
	"strings"
	"testing"
)

// narrowFit is a fit on [1000, 2000] as narrow as the fit's accuracy
// envelope allows (α + β = 1e7, elicit.MaxShape): its 5th, 50th and
// 95th percentiles, about 1229.78, 1230.00 and 1230.22, all read "1230"
// at four figures, as does its zoomed window's every end.
func narrowFit() FitView {
	d := sbeta(2.3e6, 7.7e6, 1000, 2000)
	return fitViewOf(d, Point{X: d.Quantile(0.05), P: 0.05}, Point{X: d.Quantile(0.5), P: 0.5}, Point{X: d.Quantile(0.95), P: 0.95})
}

// distinctTexts fails unless the texts, written for the values xs,
// differ wherever the values do and agree wherever they agree.
func distinctTexts(t *testing.T, what string, xs []float64, texts []string) {
	t.Helper()
	for i := range xs {
		for j := i + 1; j < len(xs); j++ {
			if (xs[i] == xs[j]) != (texts[i] == texts[j]) {
				t.Errorf("%s: %v and %v written %q and %q", what, xs[i], xs[j], texts[i], texts[j])
			}
		}
	}
}

func TestFitPictureWritesANarrowRangeApart(t *testing.T) {
	v := narrowFit()
	m := newFitModel(v)
	if m.Invalid != "" {
		t.Fatal(m.Invalid)
	}
	distinctTexts(t, "percentiles", v.Percentiles[:], m.Pcts[:])
	if want := "5% point is " + m.Pcts[0] + ", its middle (the median) " + m.Pcts[1] + " and its 95% point " + m.Pcts[2]; !strings.Contains(m.Desc, want) {
		t.Errorf("caption %q lacks %q", m.Desc, want)
	}
	var stated, fitted []float64
	var statedText, fittedText []string
	for i, r := range m.Rows {
		stated, statedText = append(stated, v.Points[i].X), append(statedText, r.Stated)
		fitted, fittedText = append(fitted, v.Dist.Quantile(v.Points[i].P)), append(fittedText, r.Fitted)
	}
	distinctTexts(t, "stated values", stated, statedText)
	distinctTexts(t, "fitted values", fitted, fittedText)
	for _, d := range m.Drawings {
		for i, k := range d.Marks {
			if want := [3]string{"5%", "median", "95%"}[i] + " " + m.Pcts[i]; k.Label != want {
				t.Errorf("%s: label %q, the caption gives %q", d.Twin.Layout.Name, k.Label, want)
			}
		}
	}
	ends := regexp.MustCompile(`the axis runs from (\S+) to (\S+), inside`).FindStringSubmatch(m.Desc)
	if ends == nil {
		t.Fatalf("caption %q says nothing of a zoomed axis", m.Desc)
	}
	g := m.Drawings[0].Twin
	distinctTexts(t, "the axis's ends", []float64{g.X0, g.X1}, ends[1:])
	// Values that are equal stay written alike, at four figures where
	// those keep them apart.
	if got := FormatRangeWithin([]float64{1234.41, 1234.41, 1500}, 1000, 2000, false); got[0] != "1234" || got[1] != got[0] {
		t.Errorf("equal values written %q", got)
	}
}

// The steadiness picture's caption writes the whole panel's pool, a
// window around 0.4027 no wider than 3e-6, read "0.4027 to 0.4027, median
// 0.4027" at four figures.
func TestSteadinessCaptionWritesANarrowPoolApart(t *testing.T) {
	full := [3]float64{0.40271609, 0.4027175, 0.40271885}
	m := newSteadyPanel("s", SteadinessTarget{Title: "Q1 invented share", Lower: 0, Upper: 1, Full: full,
		Rows: []SteadinessRow{{Label: "without Q2", Pool: &[3]float64{0.4027161, 0.4027176, 0.4027189}, Shift: 4e-8}}})
	got := regexp.MustCompile(`whole panel's \((\S+) to (\S+), median (\S+)\)`).FindStringSubmatch(m.Desc)
	if got == nil {
		t.Fatalf("caption %q does not give the whole panel's pool", m.Desc)
	}
	distinctTexts(t, "the whole panel's pool", []float64{full[0], full[2], full[1]}, got[1:])
	if want := "(0.402716 to 0.402719, median 0.402718)"; !strings.Contains(m.Desc, want) {
		t.Errorf("caption %q lacks %q", m.Desc, want)
	}
}

// The other pictures' words write each range apart too: a curve's
// percentiles in the panel's legend, the spread of the experts' medians,
// the median strip's medians and true value, and each prior's posterior
// mean and interval on the study's comparison. Each is drawn around 1230
// on [1000, 2000], where four figures write every value "1230".
func TestPicturesWriteNarrowRangesApart(t *testing.T) {
	d := narrowFit().Dist
	p := [3]float64{d.Quantile(0.05), d.Quantile(0.5), d.Quantile(0.95)}
	pm := newPanelModel(PanelView{Quantity: "invented load", Lower: 1000, Upper: 2000, Curves: []Curve{{Label: "Expert A", Role: RoleExpert, Dist: d}}})
	if pm.Invalid != "" {
		t.Fatal(pm.Invalid)
	}
	l := pm.Legend[0]
	distinctTexts(t, "the legend's percentiles", p[:], []string{l.P5, l.P50, l.P95})
	if want := "median " + l.P50 + ", 90% between " + l.P5 + " and " + l.P95; !strings.Contains(pm.Desc, want) {
		t.Errorf("panel caption %q lacks %q", pm.Desc, want)
	}

	var others []elicit.ScaledBeta
	for _, a := range []float64{2.2998e6, 2.2999e6, 2.3e6, 2.3001e6, 2.3002e6} {
		others = append(others, sbeta(a, 1e7-a, 1000, 2000))
	}
	sm := newSpreadModel(SpreadView{Quantity: "invented load", Lower: 1000, Upper: 2000, Others: others})
	var meds []float64
	var medTexts []string
	for i, q := range sm.Quartiles {
		meds, medTexts = append(meds, others[i].Quantile(0.5)), append(medTexts, q.Value)
	}
	distinctTexts(t, "the spread's medians", meds, medTexts)

	truth := 1230.05
	ms := newMedianStrip(MedianStripView{Quantity: "invented load", Lower: 1000, Upper: 2000,
		Labels: []string{"Expert A", "Expert B", "Expert C"}, Medians: []float64{1229.9, 1230.0, 1230.2}, Truth: &truth})
	var rowTexts []string
	for _, r := range ms.Rows {
		rowTexts = append(rowTexts, r.Value)
	}
	distinctTexts(t, "the strip's numbers", []float64{1229.9, 1230.0, 1230.2}, rowTexts)
	for _, want := range []string{"Expert A 1229.9, Expert B 1230, Expert C 1230.2.", "The true value, now revealed, is 1230.05."} {
		if !strings.Contains(ms.Desc, want) {
			t.Errorf("strip caption %q lacks %q", ms.Desc, want)
		}
	}
	for _, dr := range ms.Drawings {
		if dr.Dots[2].Value != "1230.2" || dr.Truth == nil || dr.Truth.Label != "true value 1230.05" {
			t.Errorf("%s strip: dot %q, true value %+v", dr.Layout, dr.Dots[2].Value, dr.Truth)
		}
	}

	im := newIntervalsModel(IntervalsView{Rows: []IntervalRow{{Label: "agreed prior", Mean: 0.40271750, Lo: 0.40271609, Hi: 0.40271885}}})
	got := regexp.MustCompile(`agreed prior: mean (\S+), from (\S+) to (\S+);?`).FindStringSubmatch(im.Desc)
	if got == nil {
		t.Fatalf("comparison caption %q lacks the prior's row", im.Desc)
	}
	got[3] = strings.TrimSuffix(got[3], ".")
	distinctTexts(t, "the comparison's row", []float64{0.40271750, 0.40271609, 0.40271885}, got[1:])
}
