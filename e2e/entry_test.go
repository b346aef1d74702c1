package e2e

import (
	"context"
	"net/http"
	"strconv"
	"testing"

	"github.com/chromedp/chromedp"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// TestFacilitatorEntryInBrowser: the facilitator takes Priya's judgement
// from her paper form, sees the same live preview she would, saves it as
// their own entry, and Priya's page says so.
func TestFacilitatorEntryInBrowser(t *testing.T) {
	site, d := startDemo(t)
	ctx := context.Background()
	links, qs := d.links, d.qs
	shots := newScreenshots(t)
	br := startBrowser(t)
	fac := br.person("facilitator")
	signIn(t, site, fac)
	fac.open(d.url + "/q/" + strconv.FormatInt(qs[0].ID, 10))
	fac.do("choose Priya", chromedp.SetValue(chromedp.CSS(`#enter select[name=expert]`), priyaID(t, site, d.w.ID)))
	if st := fac.load("open the entry page", chromedp.Click(chromedp.CSS(`#enter button[type=submit]`))); st != http.StatusOK {
		t.Fatalf("entry page: %d", st)
	}
	fac.sees("entry page", "Q1 for Priya Raman", "How it reached you", "on Priya Raman's behalf")
	fac.do("choose the paper form", chromedp.SetValue(chromedp.CSS(`form.answer-form select[name=channel]`), string(workshop.ChannelPaperForm)))
	typeValues(fac, "0.02", "0.05", "0.12")
	livePreview(t, fac, 3, nil, "above 0.12")
	fac.sees("entry preview", "What Priya Raman's numbers imply", "Priya Raman is saying", "Beta(α = ")
	shots.take(fac, "entry-01-facilitator-enters-for-priya")
	if st := fac.load("save for Priya", chromedp.Click(chromedp.CSS(`form.answer-form button[formaction$="/save"]`))); st != http.StatusOK {
		t.Fatalf("save: %d", st)
	}
	fac.sees("after saving", "Saved for Priya Raman", "facilitator, from a paper form")
	revs, _ := site.DB.Revisions(ctx, d.w.ID)
	last := revs[len(revs)-1]
	if last.EnteredBy != workshop.ByFacilitator || last.Channel != workshop.ChannelPaperForm || last.QuestionID != qs[0].ID {
		t.Fatalf("saved %+v", last)
	}
	priya := br.person("Priya Raman")
	openQuestion(t, priya, site.URL+linkOf(t, links, "Priya Raman"), 1)
	priya.sees("Priya's page", "Your current answer was entered by the facilitator on", "from your paper form")
	if v := priya.value(`form.answer-form [name="values[1]"]`); v != "0.05" {
		t.Errorf("Priya's form shows %q, want the entered 0.05", v)
	}
	shots.take(priya, "entry-02-expert-sees-the-note")
}

func priyaID(t *testing.T, site *site, ws int64) string {
	t.Helper()
	es, _ := site.DB.Experts(context.Background(), ws)
	for _, e := range es {
		if e.Name == "Priya Raman" {
			return strconv.FormatInt(e.ID, 10)
		}
	}
	t.Fatal("no Priya")
	return ""
}
