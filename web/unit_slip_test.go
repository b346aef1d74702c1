package web

import (
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"testing"
)

// The choice of percentages carries to the next question (from the
// expert's last answer), and an expert who then typed 0.02, 0.04 and 0.08
// meaning proportions had them read as 0.02%, 0.04% and 0.08%, which only
// the first read-back said. The preview now warns, naming the largest
// value both ways; values typed as percentages, with their sign or above
// 1, and proportions typed as proportions draw no such warning.
func TestProportionsTypedAsPercentagesAreCalledOut(t *testing.T) {
	h, ws, qs, es, links := seeded(t)
	qp := links[2].Path + "q/" + strconv.FormatInt(qs[0].ID, 10)
	const warning = "You chose percentages, so 0.08 is read as 0.08%. If you meant proportions, 0.08 is 8%: choose “As proportions” above, or type every value as a percentage with its % sign, such as 8%. If you do mean 0.08%, add a % sign to each value (0.08%) and this note goes away."
	for _, c := range []struct {
		unit   string
		values []string
		warned bool
	}{
		{"percent", []string{"0.02", "0.04", "0.08"}, true},
		{"percent", []string{"2", "4", "8"}, false},
		{"percent", []string{"0.2%", "0.4%", "0.8%"}, false},
		// A rare event's percentages, as the warning's last sentence says
		// to type them when they are meant.
		{"percent", []string{"0.02%", "0.04%", "0.08%"}, false},
		{"percent", []string{"0.5", "0.8", "1.5"}, false},
		{"proportion", []string{"0.02", "0.04", "0.08"}, false},
	} {
		form := url.Values{"unit": {c.unit}}
		for i, v := range c.values {
			form.Set("values["+strconv.Itoa(i)+"]", v)
		}
		for _, path := range []string{qp + "/preview?fragment=1", qp + "/preview"} {
			r, body := h.post(path, form)
			if r.StatusCode != http.StatusOK {
				t.Fatalf("%s %v: %d", c.unit, c.values, r.StatusCode)
			}
			if got := strings.Contains(body, "You chose percentages"); got != c.warned {
				t.Errorf("%s %s %v: warned %v, want %v", path, c.unit, c.values, got, c.warned)
			}
			if c.warned && !strings.Contains(body, warning) {
				t.Errorf("%s: the warning does not read %q", path, warning)
			}
		}
	}
	// The facilitator entering an expert's judgement meets it too.
	entry := questionPath(ws.ID, qs[0].ID) + "/enter/" + strconv.FormatInt(es[2].ID, 10) + "/preview?fragment=1"
	r, body := h.post(entry, url.Values{"unit": {"percent"}, "values[0]": {"0.02"}, "values[1]": {"0.04"}, "values[2]": {"0.08"}})
	if want := "The form is set to percentages, so 0.08 is read as 0.08%. If " + es[2].Name + " meant proportions, 0.08 is 8%: choose “As proportions” above, or type every value as a percentage with its % sign, such as 8%. If " + es[2].Name + " does mean 0.08%, add a % sign to each value (0.08%) and this note goes away."; r.StatusCode != http.StatusOK || !strings.Contains(body, want) {
		t.Errorf("the facilitator's entry: %d, want %q in %.2000s", r.StatusCode, want, body)
	}
}
