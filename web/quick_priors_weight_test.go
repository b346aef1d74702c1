package web

import (
	"context"
	"net/http"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A quick prior's weight is told in observed trials only for a proportion
// on [0, 1], in elicit's one phrase (elicit.WorthInTrials) with its
// figures; on another scale (an invented repair time in days, 0 to 30)
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
			nil, []string{"<th scope=\"row\">α + β</th>", alphaBetaHint, "imagined trials"}},
		{"proportion, mean and SD", qs[0], "&construction=mean_sd&c_mean=0.1&c_sd=0.05",
			elicit.ConstructionInput{Method: elicit.MethodMeanSD, Mean: 0.1, SD: 0.05, Upper: 1},
			nil, []string{"α + β =", "imagined trials", "as much information as"}},
		{"days, interval", days, "&construction=interval&c_low=3&c_high=12&c_coverage=0.9",
			elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 3, High: 12, Coverage: 0.9, Upper: 30},
			[]string{"<th scope=\"row\">α + β</th>", alphaBetaHint}, []string{"imagined trials", "observed trial", "Effective sample size"}},
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
		sum := elicit.ESSText(con.Dist.Alpha + con.Dist.Beta.Beta)
		if c.q.ID == days.ID {
			if c.in.Method == elicit.MethodMeanSD {
				c.want = append(c.want, "α + β = "+sum+". ")
			} else {
				c.want = append(c.want, `<td class="num">`+sum+"</td>")
			}
		} else if c.in.Method == elicit.MethodMeanSD {
			c.want = append(c.want, "This prior is "+elicit.Worth(con.Dist.Beta).Words(sv)+".")
		} else {
			c.want = append(c.want, `<td class="num">`+elicit.WorthInTrials(con.Dist.Alpha+con.Dist.Beta.Beta)+"</td>")
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

// A prior's worth in trials was written three ways: "as much information
// as 58.51 observed trials" on the study page, "58.51 imagined trials" on
// quick priors, "worth about N observed trials" in the warnings. Each
// page now says it in elicit's one phrase, with α and β's four figures,
// and the trial counts it names beside it are the Beta's own α and β.
func TestPriorWorthReadsOneWayOnEveryPage(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	agreeSample(t, h, qs[0].ID, 3.456, 58.506, "invented")
	want := "worth about 58.51 observed trials"
	phrase := regexp.MustCompile(`[a-z ]*(?:about|as) [0-9.]+ (?:\w+ )?trials?`)
	for _, page := range []string{
		studyPath(ws.ID, qs[0].ID) + "?trials=100",
		quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(qs[0].ID, 10) + "&construction=equivalent_sample&c_successes=3.456&c_trials=58.506",
	} {
		_, body := h.get(page)
		if i := strings.Index(body, `id="results"`); i >= 0 {
			body = body[i:] // past the quick priors' form, which explains imagined trials
		}
		found := phrase.FindAllString(body, -1)
		if len(found) == 0 {
			t.Errorf("%s: no prior's worth in trials", page)
		}
		for _, f := range found {
			if !strings.HasSuffix(f, want) {
				t.Errorf("%s: the worth reads %q, not %q", page, f, want)
			}
		}
		if !strings.Contains(body, want+" (3.456 successes and 55.05 failures)") && !strings.Contains(body, want+"</td>") {
			t.Errorf("%s: the worth is not split as Beta(3.456, 55.05)", page)
		}
	}
}

// The successes and failures a prior's worth is split into are its α and
// β as the page writes them in the Beta beside it: Beta(3, 20000) is
// "3 successes and 20000 failures", where whole counts said 19997, a
// figure the Beta does not show; Beta(0.99997, 5) is "0.99997
// successes", where four figures said "1 success". Both on the study
// page (the agreed prior and the plan under it) and on quick priors.
func TestPriorWorthCountsAreTheBetaAsWritten(t *testing.T) {
	h, ws, qs, _, _ := seeded(t)
	for _, c := range []struct {
		q                 workshop.Question
		successes, trials float64
		beta, split       string
		lack              []string
	}{
		{qs[0], 3, 20000.4, "Beta(3, 20000)", "worth about 20000 observed trials (3 successes and 20000 failures)", []string{"19997 failures"}},
		{qs[2], 0.99997, 5.99997, "Beta(0.99997, 5)", "worth about 6 observed trials (0.99997 successes and 5 failures)", []string{"1 success "}},
	} {
		q := c.q
		agreeSample(t, h, q.ID, c.successes, c.trials, "invented")
		s, n := strconv.FormatFloat(c.successes, 'g', -1, 64), strconv.FormatFloat(c.trials, 'g', -1, 64)
		for _, page := range []string{
			studyPath(ws.ID, q.ID) + "?trials=100",
			// Quick priors offers the target question, Q1.
			quickPriorsPath(ws.ID) + "?question=" + strconv.FormatInt(qs[0].ID, 10) + "&construction=equivalent_sample&c_successes=" + s + "&c_trials=" + n,
		} {
			_, body := h.get(page)
			if i := strings.Index(body, `id="results"`); i >= 0 {
				body = body[i:]
			} else if i := strings.Index(body, `id="prior"`); i >= 0 {
				body = body[i:]
			}
			if !strings.Contains(body, c.beta) {
				t.Errorf("%s: no %s", page, c.beta)
			}
			if !strings.Contains(body, c.split) {
				t.Errorf("%s: the worth is not %q", page, c.split)
			}
			for _, l := range c.lack {
				if strings.Contains(body, l) {
					t.Errorf("%s: says %q", page, l)
				}
			}
		}
	}
}
