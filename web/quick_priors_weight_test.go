package web

import (
	"context"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A quick prior's weight is told in imagined trials only for a proportion
// on [0, 1]; on another scale (an invented repair time in days, 0 to 30)
// the page gives α + β itself and says it is not a number of trials.
func TestQuickPriorWeightOnEachScale(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	days := workshop.Question{WorkshopID: ws.ID, Wording: "How many days does a pump repair take? (invented)",
		Quantity: "Repair time", Units: "days", Lower: 0, Upper: 30, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	if err := h.db.AddQuestion(context.Background(), &days); err != nil {
		t.Fatal(err)
	}
	qp := quickPriorsPath(ws.ID)
	for _, c := range []struct {
		name       string
		q          workshop.Question
		query      string
		in         elicit.ConstructionInput
		want, lack []string
	}{
		{"proportion, interval", qs[0], "&construction=interval&c_low=0.03&c_high=0.12&c_coverage=0.9",
			elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 0.03, High: 0.12, Coverage: 0.9, Upper: 1},
			[]string{"imagined trials</td>"}, []string{"<th scope=\"row\">α + β</th>", alphaBetaHint}},
		{"proportion, mean and SD", qs[0], "&construction=mean_sd&c_mean=0.1&c_sd=0.05",
			elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.1, SD: 0.05, Upper: 1},
			[]string{"as much information as "}, []string{"α + β ="}},
		{"days, interval", days, "&construction=interval&c_low=3&c_high=12&c_coverage=0.9",
			elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 3, High: 12, Coverage: 0.9, Upper: 30},
			[]string{"<th scope=\"row\">α + β</th>", alphaBetaHint}, []string{"imagined trials", "observed trial", "Worth"}},
		{"days, mean and SD", days, "&construction=mean_sd&c_mean=8&c_sd=3",
			elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 8, SD: 3, Upper: 30},
			[]string{"It is not a number of trials here"}, []string{"imagined trials", "observed trial"}},
	} {
		res, body := h.get(qp + "?question=" + strconv.FormatInt(c.q.ID, 10) + c.query)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("%s: %d", c.name, res.StatusCode)
		}
		// α + β of the construction the page shows (the exact quantile
		// match for the interval: both methods are on the page).
		con, err := elicit.Construct(c.in)
		if err != nil {
			t.Fatal(err)
		}
		sum := fv(con.Dist.Alpha + con.Dist.Beta.Beta)
		if c.q.ID == days.ID {
			if c.in.Method == elicit.MethodMeanSD {
				c.want = append(c.want, "α + β = "+sum+". ")
			} else {
				c.want = append(c.want, `<td class="num">`+sum+"</td>")
			}
		} else {
			c.want = append(c.want, sum)
		}
		for _, w := range c.want {
			if !strings.Contains(body, htmlEscape(w)) && !strings.Contains(body, w) {
				t.Errorf("%s: page lacks %q", c.name, w)
			}
		}
		// The results, without the form above them (whose equivalent
		// sample speaks of imagined trials for proportions).
		results := body[strings.Index(body, `id="results"`):]
		for _, w := range c.lack {
			if strings.Contains(results, htmlEscape(w)) || strings.Contains(results, w) {
				t.Errorf("%s: page says %q", c.name, w)
			}
		}
	}
}
