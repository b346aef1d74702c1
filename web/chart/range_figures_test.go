package chart

import (
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
	if want := "5th " + m.Pcts[0] + ", median " + m.Pcts[1] + ", 95th " + m.Pcts[2]; !strings.Contains(m.Desc, want) {
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
