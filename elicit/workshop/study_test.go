package workshop

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// ComparedPriors lists each pooled expert's own fit (A's current one, B;
// not the revoked C, nor E who cannot be fitted), the equal-weight pool's
// and the performance-weight pool's single Betas as PanelState forms them,
// and the agreed prior last.
func TestComparedPriors(t *testing.T) {
	in := panelCase()
	perf := Weights{Scheme: WeightsPerformance, ByExpert: map[int64]float64{1: 0.9, 2: 0.1}}
	agreed := AgreedPrior{Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 12})}
	in.Weights = perf // in force
	got, skipped, _ := ComparedPriors(in, &perf, &agreed)
	in.Weights = Weights{Scheme: WeightsEqual}
	equal := PanelState(in)
	in.Weights = perf
	byPerf := PanelState(in)
	want := []elicit.NamedPrior{
		{Name: "A", Prior: mustFit(t, in.Question, 0.1, 0.25, 0.45).Beta, Key: "expert-1"},
		{Name: "B", Prior: mustFit(t, in.Question, 0.02, 0.08, 0.2).Beta, Key: "expert-2"},
		{Name: "Equal-weight pool", Prior: equal.Single.Dist.Beta, Key: "pool-equal"},
		{Name: "Performance-weight pool", Prior: byPerf.Single.Dist.Beta, Key: "pool-performance"},
		{Name: "Agreed prior", Prior: elicit.Beta{Alpha: 3, Beta: 12}, Key: "agreed"},
	}
	if len(skipped) != 0 || len(got) != len(want) {
		t.Fatalf("got %+v, skipped %v", got, skipped)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("[%d] %+v, want %+v", i, got[i], want[i])
		}
	}
	// The weights make a difference: 0.9 on A moves the pool towards A.
	if !(byPerf.Single.Dist.Mean() > equal.Single.Dist.Mean()) {
		t.Errorf("performance pool mean %v, equal %v", byPerf.Single.Dist.Mean(), equal.Single.Dist.Mean())
	}
	// Without performance weights or an agreed prior, those rows go.
	plain := panelCase()
	plain.Weights = Weights{Scheme: WeightsEqual}
	got, _, _ = ComparedPriors(plain, nil, nil)
	if len(got) != 3 || got[2].Name != "Equal-weight pool" {
		t.Errorf("without them: %+v", got)
	}
	// Custom weights in force add their pool; performance weights not in
	// force are named as suggested (found in review).
	custom := panelCase()
	custom.Weights = Weights{Scheme: WeightsCustom, ByExpert: map[int64]float64{1: 0.2, 2: 0.8}}
	got, _, _ = ComparedPriors(custom, &perf, nil)
	byCustom := PanelState(custom)
	names, keys := map[string]elicit.Beta{}, map[string]string{}
	for _, p := range got {
		names[p.Name], keys[p.Name] = p.Prior, p.Key
	}
	if keys["Custom-weight pool (in force)"] != "pool-custom" || keys["Performance-weight pool (suggested)"] != "pool-performance" {
		t.Errorf("keys of the pools: %v", keys)
	}
	if b, ok := names["Custom-weight pool (in force)"]; !ok || b != byCustom.Single.Dist.Beta {
		t.Errorf("custom weights in force: %+v", got)
	}
	if _, ok := names["Performance-weight pool (suggested)"]; !ok {
		t.Errorf("performance weights not in force are not named as suggested: %+v", got)
	}
}

// A pool enters the comparison by its single Beta (elicit.Pool.BestBeta);
// where that Beta is far from the pool (its Representation warns) the
// comparison says so beside the pool, in the Representation's numbers:
// the rows and a plan under it are that Beta's, not the pool's. Two
// experts far apart (invented: near 2% and near 60%) make a two-humped
// equal-weight pool that no single Beta follows; a pool whose Beta
// carries no warning gets no caveat.
func TestComparedPriorsSayWhereAPoolsBetaIsFarFromIt(t *testing.T) {
	in := panelCase()
	in.Weights = Weights{Scheme: WeightsEqual}
	in.Revisions = []Revision{
		{ID: 10, QuestionID: 1, ExpertID: 1, Round: 1, Answer: Answer{Values: []float64{0.01, 0.02, 0.04}}},
		{ID: 11, QuestionID: 1, ExpertID: 2, Round: 1, Answer: Answer{Values: []float64{0.4, 0.6, 0.8}}},
	}
	priors, _, caveats := ComparedPriors(in, nil, nil)
	if len(caveats) != len(priors) {
		t.Fatalf("%d caveats for %d priors", len(caveats), len(priors))
	}
	single := PanelState(in).Single
	if single == nil || len(single.Warnings) == 0 {
		t.Fatalf("the two-humped pool's single Beta carries no warning: %+v", single)
	}
	for i, p := range priors {
		switch {
		case p.Name == "Equal-weight pool":
			c := caveats[i]
			for _, want := range []string{"Equal-weight pool", "only roughly", elicit.GapText(single.MaxCDFError), "not the pool's"} {
				if !strings.Contains(c, want) {
					t.Errorf("caveat %q lacks %q", c, want)
				}
			}
		case caveats[i] != "":
			t.Errorf("%s: caveat %q", p.Name, caveats[i])
		}
	}
	// The panel of TestComparedPriors: each pool's caveat is there
	// exactly when its single Beta warns.
	in = panelCase()
	perf := Weights{Scheme: WeightsPerformance, ByExpert: map[int64]float64{1: 0.9, 2: 0.1}}
	in.Weights = perf
	priors, _, caveats = ComparedPriors(in, &perf, nil)
	in.Weights = Weights{Scheme: WeightsEqual}
	equal := PanelState(in).Single
	in.Weights = perf
	byPerf := PanelState(in).Single
	for i, p := range priors {
		var rep *elicit.Representation
		switch p.Name {
		case "Equal-weight pool":
			rep = equal
		case "Performance-weight pool":
			rep = byPerf
		}
		if want := rep != nil && len(rep.Warnings) > 0; (caveats[i] != "") != want {
			t.Errorf("%s: caveat %q, single Beta's warnings %v", p.Name, caveats[i], rep)
		}
	}
}

// StudyUpdate sums the batches (Beta(3, 12) with 2 in 10 and 1 in 5 is
// Beta(6, 24) by the conjugate update, BDA3 §2.4) and reports the numbers
// of elicit's functions.
func TestStudyUpdate(t *testing.T) {
	q := Question{ID: 4, Lower: 0, Upper: 1}
	p := AgreedPrior{QuestionID: 4, Dist: elicit.Unit(elicit.Beta{Alpha: 3, Beta: 12})}
	data := []StudyData{{QuestionID: 4, Successes: 2, Trials: 10}, {QuestionID: 5, Successes: 9, Trials: 9}, {QuestionID: 4, Successes: 1, Trials: 5}}
	u, err := StudyUpdate(q, p, data)
	if err != nil {
		t.Fatal(err)
	}
	if u.Successes != 3 || u.Trials != 15 || u.Batches != 2 || u.Posterior != (elicit.Beta{Alpha: 6, Beta: 24}) || math.Abs(u.Mean-0.2) > 1e-15 {
		t.Fatalf("update %+v", u)
	}
	c, _ := elicit.ConflictCheck(p.Dist.Beta, 3, 15)
	if u.Conflict != c || u.Reading != ConflictReading(c) {
		t.Errorf("conflict %+v", u.Conflict)
	}
	if _, err := StudyUpdate(q, p, nil); !errors.Is(err, ErrNoData) {
		t.Errorf("without data: %v", err)
	}
	q.Upper = 10
	var ie *elicit.InputError
	if _, err := StudyUpdate(q, p, data); !errors.As(err, &ie) {
		t.Errorf("a question on [0, 10]: %v", err)
	}
}

// The conflict reading grades the doubled smaller tail at 0.05 and 0.01
// (common practice, no source) and says which way the data lean.
func TestConflictReading(t *testing.T) {
	for _, c := range []struct {
		conflict elicit.Conflict
		starts   string
		side     string
	}{
		{elicit.Conflict{Successes: 3, Trials: 100, Lower: 0.4, Upper: 0.7, TwoSided: 0.8}, "No sign of conflict: ", ""},
		{elicit.Conflict{Successes: 9, Trials: 100, Lower: 0.97, Upper: 0.03, TwoSided: 0.06}, "No sign of conflict at the 5% level", ""},
		{elicit.Conflict{Successes: 12, Trials: 100, Lower: 0.99, Upper: 0.02, TwoSided: 0.04}, "The data are surprising", "more"},
		{elicit.Conflict{Successes: 0, Trials: 100, Lower: 0.001, Upper: 1, TwoSided: 0.002}, "The data conflict with the prior", "fewer"},
	} {
		r := ConflictReading(c.conflict)
		if c.conflict.TwoSided < 0.2 && strings.Contains(r, "well within") {
			t.Errorf("%+v: %q overclaims", c.conflict, r)
		}
		if !strings.HasPrefix(r, c.starts) || (c.side != "" && !strings.Contains(r, c.side+" than the prior expected")) {
			t.Errorf("%+v: %q", c.conflict, r)
		}
	}
}

// The reading's tail probability reads on its own side of the cut-off
// that graded it (words, no source needed): two figures wrote 0.04996
// "0.05" beside "surprising", a grade for values below 0.05, and 0.19996
// "0.2" beside "towards its upper end", a grade for values below 0.2.
func TestConflictReadingToldFromItsCutOff(t *testing.T) {
	for _, c := range []struct {
		p    float64
		want string
	}{
		{0.04996, "(two-sided tail probability 0.04996)"},
		{0.19996, "(two-sided tail probability 0.19996)"},
		{0.009996, "(two-sided tail probability 0.009996)"},
		{0.05, "(two-sided tail probability 0.05)"},
		{0.0042, "(two-sided tail probability 0.0042)"},
	} {
		r := ConflictReading(elicit.Conflict{Successes: 12, Trials: 100, Lower: 0.99, Upper: c.p / 2, TwoSided: c.p})
		if !strings.Contains(r, c.want) {
			t.Errorf("p = %v: %q lacks %q", c.p, r, c.want)
		}
	}
}

func TestStudyDataRules(t *testing.T) {
	ok := StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: "2026-01-01"}
	if err := ok.Validate(); err != nil {
		t.Fatal(err)
	}
	if err := (StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: input.EarliestObserved}).Validate(); err != nil {
		t.Errorf("the earliest day: %v", err)
	}
	for _, c := range []struct {
		d     StudyData
		field string
	}{
		{StudyData{Successes: 2, Trials: 1, Source: "log", ObservedOn: "2026-01-01"}, "successes"},
		{StudyData{Successes: -1, Trials: 1, Source: "log", ObservedOn: "2026-01-01"}, "successes"},
		{StudyData{Successes: 0, Trials: elicit.MaxUpdateTrials + 1, Source: "log", ObservedOn: "2026-01-01"}, "trials"},
		{StudyData{Successes: 0, Trials: 1, Source: "", ObservedOn: "2026-01-01"}, "source"},
		{StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: "1 Jan 2027"}, "observed_on"},
		// A mistyped year: batches are never removed, so it would stay.
		{StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: "0026-03-31"}, "observed_on"},
		{StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: "1899-12-31"}, "observed_on"},
	} {
		var ie *elicit.InputError
		if err := c.d.Validate(); !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("%+v: %v, want field %s", c.d, err, c.field)
		}
	}
	// A batch already recorded (an imported record's) keeps the rules
	// but the 1900 one, which guards typing only: a day observed earlier
	// comes back as written; a day not on the calendar does not.
	for _, day := range []string{"0026-03-31", "1899-12-31"} {
		if err := (StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: day}).ValidateKept(); err != nil {
			t.Errorf("kept, observed on %s: %v", day, err)
		}
	}
	for _, d := range []StudyData{{Successes: 0, Trials: 1, Source: "log", ObservedOn: "2026-02-30"}, {Successes: 2, Trials: 1, Source: "log", ObservedOn: "0026-03-31"}} {
		if err := d.ValidateKept(); err == nil {
			t.Errorf("kept: %+v taken", d)
		}
	}
	// Observed at the latest the day after the day recorded (UTC), a
	// day's grace for a calendar ahead of UTC; worked by hand.
	at := time.Date(2026, 12, 2, 23, 30, 0, 0, time.UTC)
	for obs, okay := range map[string]bool{"2026-12-01": true, "2026-12-02": true, "2026-12-03": true, "2026-12-04": false, "2027-01-01": false} {
		err := StudyData{Successes: 0, Trials: 1, Source: "log", ObservedOn: obs}.CheckObservedBy(at)
		var ie *elicit.InputError
		if okay && err != nil {
			t.Errorf("observed %s, recorded %v: %v", obs, at, err)
		}
		if !okay && (!errors.As(err, &ie) || ie.Field != "observed_on") {
			t.Errorf("observed %s, recorded %v: %v, want a refusal of observed_on", obs, at, err)
		}
	}
	if err := CheckDataTotal(elicit.MaxUpdateTrials-5, StudyData{Trials: 6}); err == nil {
		t.Error("a total beyond the update's limit was accepted")
	}
}

// A constructed prior keeps inputs that make its Beta; other sources keep
// none.
func TestAgreedPriorCheckSource(t *testing.T) {
	in := elicit.ConstructionInput{Method: elicit.MethodUniform, Upper: 1}
	good := AgreedPrior{Source: PriorFromConstruction, Dist: elicit.Unit(elicit.Uniform()), Construction: &in}
	if err := good.CheckSource(); err != nil || good.ConstructionWords() == "" {
		t.Fatalf("%v, %q", err, good.ConstructionWords())
	}
	for _, bad := range []AgreedPrior{
		{Source: PriorFromConstruction, Dist: elicit.Unit(elicit.Uniform())},
		{Source: PriorFromConstruction, Dist: elicit.Unit(elicit.Beta{Alpha: 1, Beta: 2}), Construction: &in},
		{Source: PriorFromPool, Dist: elicit.Unit(elicit.Uniform()), Construction: &in},
		{Source: "vote", Dist: elicit.Unit(elicit.Uniform())},
	} {
		if err := bad.CheckSource(); err == nil {
			t.Errorf("%+v accepted", bad)
		}
	}
}

// TestPriorAgreedAfterTheData: batches recorded before the prior was
// agreed are counted and named, since if they informed the prior the
// posterior counts them twice (found in review); batches recorded after
// it leave no warning.
func TestPriorAgreedAfterTheData(t *testing.T) {
	t0 := time.Date(2026, 12, 1, 9, 0, 0, 0, time.UTC)
	q := Question{ID: 4, Lower: 0, Upper: 1}
	data := []StudyData{
		{QuestionID: 4, Successes: 30, Trials: 40, At: t0},
		{QuestionID: 4, Successes: 2, Trials: 10, At: t0.Add(2 * time.Hour)},
	}
	for _, c := range []struct {
		agreed time.Time
		before int
		says   string
	}{
		{t0.Add(-time.Hour), 0, ""},
		{t0.Add(time.Hour), 1, "after 1 of the 2 batches of data were recorded"},
		{t0.Add(3 * time.Hour), 2, "after all the data were recorded"},
	} {
		p := AgreedPrior{QuestionID: 4, Dist: elicit.Unit(elicit.Beta{Alpha: 7, Beta: 3}), At: c.agreed}
		u, err := StudyUpdate(q, p, data)
		if err != nil {
			t.Fatal(err)
		}
		if u.BatchesBeforePrior != c.before {
			t.Errorf("agreed %v: %d batches before, want %d", c.agreed, u.BatchesBeforePrior, c.before)
		}
		if w := u.TwiceCounted(); (c.says == "") != (w == "") || !strings.Contains(w, c.says) {
			t.Errorf("agreed %v: warning %q, want one saying %q", c.agreed, w, c.says)
		}
	}
}

// UpdateFailure writes the shapes to four significant figures, as the
// study page writes the agreed prior above it (Beta(9899000, 9899000)),
// so the two read as the same prior.
func TestUpdateFailureWritesShapesAsThePage(t *testing.T) {
	q := Question{ID: 1, Lower: 0, Upper: 1}
	p := AgreedPrior{QuestionID: 1, Dist: elicit.Unit(elicit.Beta{Alpha: 9899408.124, Beta: 9899408.124})}
	data := []StudyData{{QuestionID: 1, Successes: 900_000, Trials: 900_000}}
	_, err := StudyUpdate(q, p, data)
	got := UpdateFailure(q, p, data, err)
	if !strings.Contains(got, "The agreed prior Beta(9899000, 9899000) cannot be updated") || !strings.Contains(got, "Beta(10800000, 9899000)") {
		t.Errorf("%q", got)
	}
}
