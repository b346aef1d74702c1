package web

import (
	"context"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// An expert who wrote their last proportion as percentages finds a
// question they have not answered yet set to percentages too; it was
// set back to proportions, and their 25 was refused ("Did you mean
// 25%?") on every question. An expert who last wrote proportions, or
// whose percentages the facilitator entered for them, keeps proportions.
func TestUnitChoiceCarriesToTheNextQuestion(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	ctx := context.Background()
	fresh := qs[0]
	fresh.ID, fresh.Position, fresh.Wording, fresh.Quantity = 0, 0, "Invented: what share of the spare units will fail?", "spare units failing"
	if err := h.db.AddQuestion(ctx, &fresh); err != nil {
		t.Fatal(err)
	}
	percentChecked := func(link DemoLink) bool {
		t.Helper()
		res, body := h.get(link.Path + "q/" + strconv.FormatInt(fresh.ID, 10))
		if res.StatusCode != http.StatusOK {
			t.Fatalf("the new question's page: %d", res.StatusCode)
		}
		return strings.Contains(body, `id="f-unit-percent" name="unit" value="percent" checked`)
	}
	save := func(link DemoLink, unit string, values ...string) {
		t.Helper()
		form := url.Values{"unit": {unit}}
		for i, v := range values {
			form.Set("values["+strconv.Itoa(i)+"]", v)
		}
		if r, body := h.post(link.Path+"q/"+strconv.FormatInt(qs[0].ID, 10)+"/save", form); r.StatusCode != http.StatusSeeOther {
			t.Fatalf("save as %s: %d %s", unit, r.StatusCode, body)
		}
	}
	if percentChecked(links[0]) {
		t.Error("an expert who wrote proportions is offered percentages")
	}
	save(links[0], "percent", "2", "5", "12")
	if !percentChecked(links[0]) {
		t.Error("an expert who last wrote percentages is offered proportions on the next question")
	}
	save(links[0], "proportion", "0.02", "0.05", "0.12")
	if percentChecked(links[0]) {
		t.Error("an expert who went back to proportions is offered percentages")
	}
	// Percentages the facilitator entered for an expert are not theirs.
	entry := url.Values{"channel": {"phone"}, "unit": {"percent"}, "values[0]": {"2"}, "values[1]": {"5"}, "values[2]": {"12"}}
	if r, body := h.post(questionPath(ws.ID, qs[0].ID)+"/enter/"+strconv.FormatInt(es[1].ID, 10)+"/save", entry); r.StatusCode != http.StatusSeeOther {
		t.Fatalf("entry on behalf: %d %.300s", r.StatusCode, body)
	}
	if percentChecked(links[1]) {
		t.Error("percentages the facilitator entered set the expert's own page to percentages")
	}
}
