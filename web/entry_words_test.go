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

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// youWords finds the second person, which on the facilitator's page for
// entering an expert's judgement would speak to the facilitator as if
// they were the expert.
var youWords = regexp.MustCompile(`(?i)\b(you|your|you're)\b`)

// On the facilitator's page for entering a judgement on an expert's
// behalf, the preview's heading and read-backs name the expert; on the
// expert's own page they say "you".
func TestEntryPreviewNamesTheExpert(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	q := qs[0]
	priya := es[2] // has not answered question 1 in the demo
	page := entryPath(ws.ID, q.ID, priya.ID)
	form := url.Values{"channel": {"phone"}, "values[0]": {"0.01"}, "values[1]": {"0.03"}, "values[2]": {"0.09"}}
	preview := func(body string) string {
		body = html.UnescapeString(body)
		start := strings.Index(body, `id="preview"`)
		end := strings.Index(body[max(start, 0):], "<svg")
		if start < 0 || end < 0 {
			t.Fatalf("no preview before its picture in:\n%s", body)
		}
		return body[start : start+end]
	}

	_, frag := h.post(page+"/preview?fragment=1", form)
	frag = html.UnescapeString(frag)
	// The picture's key, table and caption name her too.
	for _, want := range []string{"Priya Raman's answers", "Priya Raman said", "best matches Priya Raman's answers", "Priya Raman gave a chance of"} {
		if !strings.Contains(frag, want) {
			t.Errorf("entry picture lacks %q", want)
		}
	}
	for _, you := range []string{"your answers", "you said", "below yours", "you gave", "you think"} {
		if strings.Contains(frag, you) {
			t.Errorf("entry picture says %q", you)
		}
	}
	if i := strings.Index(frag, "<svg"); i > 0 {
		frag = frag[:i]
	}
	if r, _ := h.post(page+"/save", form); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("save: %d", r.StatusCode)
	}
	_, full := h.get(page)
	for what, text := range map[string]string{"live preview": frag, "page after saving": preview(full)} {
		for _, want := range []string{"What Priya Raman's numbers imply", "Priya Raman is saying there is a 1 in 20 chance the value is below 0.01",
			"Priya Raman is saying the value is as likely to be below 0.03"} {
			if !strings.Contains(text, want) {
				t.Errorf("entry %s lacks %q", what, want)
			}
		}
		if m := youWords.FindString(text); m != "" {
			t.Errorf("entry %s speaks to the facilitator as the expert (%q)", what, m)
		}
	}

	// The expert's own page keeps "you".
	_, own := h.get(links[2].Path + "q/" + strconv.FormatInt(q.ID, 10))
	own = preview(own)
	for _, want := range []string{"What your numbers imply", "You are saying there is a 1 in 20 chance the value is below 0.01"} {
		if !strings.Contains(own, want) {
			t.Errorf("the expert's own preview lacks %q", want)
		}
	}
	if strings.Contains(own, "Priya Raman") {
		t.Error("the expert's own preview names her in the third person")
	}
}

// Every warning the preview can give names the expert on the
// facilitator's page and speaks to the expert on their own.
func TestEntryWarningsNameTheExpert(t *testing.T) {
	q := workshop.Question{Lower: 0, Upper: 1, Format: workshop.FormatInterval}
	fit := elicit.Fit{
		Dist:  elicit.ScaledBeta{Beta: elicit.Beta{Alpha: 0.5, Beta: 3}, Lower: 0, Upper: 1},
		Probs: []float64{0.3, 0.5, 0.7}, // 40% sure of the interval
		Warnings: []elicit.Warning{{Code: elicit.WarnUShaped}, {Code: elicit.WarnJShaped}, {Code: elicit.WarnPoorFit},
			{Code: elicit.WarnTailMisfit}, {Code: elicit.WarnNearCertainty}, {Code: elicit.WarnBeyondDouble}, {Code: "some_later_code"}},
	}
	own := expertWarnings(q, fit, false, speaker{})
	named := expertWarnings(q, fit, false, speaker{Name: "Carmen Ruiz"})
	if len(own) != 8 || len(named) != 8 {
		t.Fatalf("%d and %d warnings, want 8 each", len(own), len(named))
	}
	for i := range own {
		if !youWords.MatchString(own[i]) || strings.Contains(own[i], "Carmen Ruiz") {
			t.Errorf("the expert's warning %d does not speak to them: %q", i, own[i])
		}
		if m := youWords.FindString(named[i]); m != "" || !strings.Contains(named[i], "Carmen Ruiz") {
			t.Errorf("the facilitator's warning %d does not name the expert (%q): %q", i, m, named[i])
		}
	}
}

// On the facilitator's page for entering a judgement, the form's labels
// and hints speak of the expert by name, for every answer format; only
// what is the facilitator's own (how the judgement reached them, how they
// type values) says "you". The expert's own page keeps "your median".
func TestEntryFormNamesTheExpert(t *testing.T) {
	rig := newSheetRig(t)
	ada := rig.experts[0]
	own := strings.NewReplacer("How it reached you", "", "How you type values", "", "Either way you may add a % sign", "")
	for i, want := range []string{
		"Ada Quell's median: as likely below as above.",                                    // Q1, quantiles
		"How sure is Ada Quell that the true value lies between their lowest and highest?", // Q2, interval
		"Put more chips where Ada Quell thinks the value is more likely to be",             // Q3, chips
	} {
		_, body := rig.h.get(entryPath(rig.ws.ID, rig.qs[i].ID, ada.ID))
		body = html.UnescapeString(body)
		start := strings.Index(body, `<form class="form answer-form"`)
		end := strings.Index(body[max(start, 0):], "</form>")
		if start < 0 || end < 0 {
			t.Fatalf("Q%d: no answer form in the entry page", i+1)
		}
		form := body[start : start+end]
		if !strings.Contains(form, want) {
			t.Errorf("Q%d: the entry form lacks %q", i+1, want)
		}
		if m := youWords.FindString(own.Replace(form)); m != "" {
			t.Errorf("Q%d: the entry form speaks to the facilitator as the expert (%q)", i+1, m)
		}
	}
	h, _, qs, _, links := seeded(t)
	if _, page := h.get(links[2].Path + "q/" + strconv.FormatInt(qs[0].ID, 10)); !strings.Contains(page, "Your median: as likely below as above.") {
		t.Error("the expert's own form lacks \"Your median\"")
	}
}

// A value refused on the facilitator's entry page names whose value it
// must exceed, as the read-backs name the expert: "Must be larger than
// your 5% value" spoke to the facilitator as if the values were theirs.
// On the expert's own page it stays "your".
func TestEntryRefusalNamesTheExpertsValue(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	priya := es[2]
	form := url.Values{"channel": {"phone"}, "values[0]": {"0.05"}, "values[1]": {"0.03"}, "values[2]": {"0.12"}}
	r, body := h.post(entryPath(ws.ID, qs[0].ID, priya.ID)+"/save", form)
	body = html.UnescapeString(body)
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(body, "Must be larger than Priya Raman's 5% value.") || strings.Contains(body, "your 5% value") {
		t.Errorf("a decreasing entry: %d, and the refusal does not name Priya Raman's 5%% value", r.StatusCode)
	}
	r, body = h.post(links[2].Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", form)
	if r.StatusCode != http.StatusUnprocessableEntity || !strings.Contains(html.UnescapeString(body), "Must be larger than your 5% value.") {
		t.Errorf("a decreasing answer on the expert's page: %d, and the refusal does not say \"your 5%% value\"", r.StatusCode)
	}
}

// On the facilitator's entry page chips placed for an expert are the
// expert's chips by name, in the picture and the closing read-back, as
// on the expert's own page they are "your chips".
func TestEntryChipsPreviewNamesTheExpertsChips(t *testing.T) {
	h, ws, _, es, _ := seeded(t)
	qc := workshop.Question{WorkshopID: ws.ID, Wording: "Place 20 chips on the share of valves that stick (invented).",
		Quantity: "Sticking share", Lower: 0, Upper: 1, Format: workshop.FormatChips,
		BinEdges: []float64{0, 0.1, 0.2, 0.3, 0.5, 1}, Chips: 20}
	if err := h.db.AddQuestion(context.Background(), &qc); err != nil {
		t.Fatal(err)
	}
	form := url.Values{"channel": {"phone"}, "counts[0]": {"2"}, "counts[1]": {"6"}, "counts[2]": {"7"}, "counts[3]": {"4"}, "counts[4]": {"1"}}
	_, frag := h.post(entryPath(ws.ID, qc.ID, es[2].ID)+"/preview?fragment=1", form)
	frag = html.UnescapeString(frag)
	for _, want := range []string{"Priya Raman's chips put 10% below 0.1, the curve ", "the curve that best matches Priya Raman's chips has its middle", ">Priya Raman's chips below each edge<",
		"Priya Raman's chips give a 1 in 10 chance the value is below 0.1."} {
		if !strings.Contains(frag, want) {
			t.Errorf("the entry's chips preview lacks %q", want)
		}
	}
	if m := youWords.FindString(frag); m != "" || strings.Contains(frag, "gave a chance") {
		t.Errorf("the entry's chips preview speaks to the facilitator as the expert (%q) or of chances given", m)
	}
}
