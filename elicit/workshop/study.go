package workshop

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
)

// StudyData is one batch of observed data that the project lead records
// against a question's agreed prior: successes in trials, where they come
// from, and the day they were observed. Batches are only ever added;
// together they update the agreed prior (DataTotals, elicit.Posterior).
type StudyData struct {
	ID         int64     `json:"id"`
	QuestionID int64     `json:"question_id"`
	Successes  int       `json:"successes"`
	Trials     int       `json:"trials"`
	Source     string    `json:"source"`      // where the data come from: a study, a report, a field log
	ObservedOn string    `json:"observed_on"` // the day observed, input.DateLayout
	At         time.Time `json:"at"`          // when recorded
}

// Validate checks a new batch by the rules of the form it is typed in:
// ValidateKept's, and the day observed in 1900 or later
// (input.CheckObservedDate: a year such as 0026 is mistyped, and a batch,
// never removed, would keep it). Errors name the field by its JSON key.
func (d StudyData) Validate() error {
	if err := d.ValidateKept(); err != nil {
		return err
	}
	return input.CheckObservedDate("observed_on", d.ObservedOn)
}

// ValidateKept checks a batch already recorded, as an imported record
// holds it: 1 ≤ trials ≤ elicit.MaxUpdateTrials, 0 ≤ successes ≤ trials,
// a source of at most input.MaxShortText characters, and the day
// observed a calendar date. It does not hold the day to 1900 or later:
// that rule guards typing, and a batch recorded before it may hold an
// earlier year; batches are never changed, so the record brings it back
// as it was written rather than not at all.
func (d StudyData) ValidateKept() error {
	if d.Trials < 1 || d.Trials > elicit.MaxUpdateTrials {
		return inputErr("trials", elicit.RuleCountRange, "1 to %d, got %d", elicit.MaxUpdateTrials, d.Trials)
	}
	if d.Successes < 0 || d.Successes > d.Trials {
		return inputErr("successes", elicit.RuleCountRange, "0 to the trials (%d), got %d", d.Trials, d.Successes)
	}
	if err := input.CheckText("source", d.Source, input.MaxShortText, true); err != nil {
		return err
	}
	return input.CheckDate("observed_on", d.ObservedOn)
}

// CheckObservedBy refuses a batch observed after the day it is recorded
// at (in UTC, with a day's grace, since the project lead's calendar may be
// a day ahead of UTC): data cannot be observed in the future.
func (d StudyData) CheckObservedBy(at time.Time) error {
	day, err := time.Parse(input.DateLayout, d.ObservedOn)
	if err != nil {
		return input.CheckDate("observed_on", d.ObservedOn)
	}
	if latest := at.UTC().Truncate(24 * time.Hour).Add(24 * time.Hour); day.After(latest) {
		return inputErr("observed_on", input.RuleDateAfterRecorded, "observed on %s, recorded on %s", d.ObservedOn, at.UTC().Format(input.DateLayout))
	}
	return nil
}

// DataTotals is the successes and trials of every batch recorded for
// question q, summed: binomial batches of one proportion update a Beta
// prior exactly as one batch of their totals (the likelihoods multiply).
func DataTotals(data []StudyData, q int64) (successes, trials, batches int) {
	for _, d := range data {
		if d.QuestionID == q {
			successes += d.Successes
			trials += d.Trials
			batches++
		}
	}
	return successes, trials, batches
}

// CheckDataTotal refuses a batch that would take a question's recorded
// trials beyond elicit.MaxUpdateTrials, the limit of an update.
func CheckDataTotal(recorded int, d StudyData) error {
	if recorded+d.Trials > elicit.MaxUpdateTrials {
		return inputErr("trials", elicit.RuleCountRange,
			"the question's batches may hold at most %d trials together; %d are recorded, so at most %d more",
			elicit.MaxUpdateTrials, recorded, elicit.MaxUpdateTrials-recorded)
	}
	return nil
}

// IsProportion reports whether the question asks for a proportion on
// [0, 1], the scale on which binomial data update a Beta prior.
func (q Question) IsProportion() bool {
	return elicit.ScaledBeta{Lower: q.Lower, Upper: q.Upper}.OnUnit()
}

// ComparedPriors are the priors a question's study is compared under
// (elicit.Sensitivity): each pooled expert's own current fit, the pool
// of the panel under equal weights and under performance weights (each
// represented by its single Beta, elicit.Pool.BestBeta), and the agreed
// prior. The panels are workshop.PanelState's; performance weights are
// left out when perf is nil (none were ever computed), and a pool
// without a single Beta is left out and named in skipped.
//
// in.Weights are the weights in force: custom weights in force add the
// pool under them; performance weights that are not in force (perf is
// what the calibration page would offer) are named as suggested.
//
// caveats runs beside priors: for a pool whose single Beta is far from
// the pool (elicit.Representation.Far), words saying that the Beta stands
// in for the pool only roughly (StandInCaveat); "" for every other prior.
//
// Each prior's Key stays the same as experts answer, revise or leave and
// weights change (a plan's address names its prior by it): "expert-ID",
// "pool-equal", "pool-custom", "pool-performance" and "agreed".
func ComparedPriors(in PanelInput, perf *Weights, agreed *AgreedPrior) (priors []elicit.NamedPrior, skipped, caveats []string) {
	inForce := in.Weights
	in.Weights = Weights{WorkshopID: in.Question.WorkshopID, Scheme: WeightsEqual}
	equal := PanelState(in)
	for _, m := range equal.Members {
		if m.Pooled && m.Fit != nil {
			priors = append(priors, elicit.NamedPrior{Name: m.Expert.Name, Prior: m.Fit.Dist.Beta, Key: "expert-" + strconv.FormatInt(m.Expert.ID, 10)})
			caveats = append(caveats, "")
		}
	}
	pool := func(name, key string, p Panel) {
		switch {
		case p.PoolErr != nil:
			skipped = append(skipped, fmt.Sprintf("%s: %v", name, p.PoolErr))
		case p.Single == nil:
			skipped = append(skipped, fmt.Sprintf("%s: no single Beta: %v", name, p.SingleErr))
		default:
			priors = append(priors, elicit.NamedPrior{Name: name, Prior: p.Single.Dist.Beta, Key: key})
			caveats = append(caveats, StandInCaveat(name, *p.Single))
		}
	}
	pool(WeightsEqual.PoolName(), "pool-equal", equal)
	if inForce.Scheme == WeightsCustom {
		in.Weights = inForce
		pool(WeightsCustom.PoolName()+" (in force)", "pool-custom", PanelState(in))
	}
	if perf != nil {
		name := WeightsPerformance.PoolName()
		if inForce.Scheme != WeightsPerformance {
			name += " (suggested)"
		}
		in.Weights = *perf
		pool(name, "pool-performance", PanelState(in))
	}
	if agreed != nil {
		priors = append(priors, elicit.NamedPrior{Name: "Agreed prior", Prior: agreed.Dist.Beta, Key: "agreed"})
		caveats = append(caveats, "")
	}
	return priors, skipped, caveats
}

// StandInCaveat says, for the pool called name, that its single Beta r
// stands in for it only roughly, with the distances that fail
// elicit.Representation's checks; "" when none does. Updating or planning
// under a pool updates or plans under that Beta, so where the Beta misses
// the pool's spread the posterior and the plan miss it too.
func StandInCaveat(name string, r elicit.Representation) string {
	cdf, sd, interval := r.Far()
	var how []string
	if cdf {
		how = append(how, "their CDFs differ by up to "+elicit.GapText(r.MaxCDFError))
	}
	if sd {
		how = append(how, fmt.Sprintf("its standard deviation is %.3g times the pool's", r.SDRatio))
	}
	if interval {
		how = append(how, fmt.Sprintf("its central 90%% interval is %.3g times as wide as the pool's", r.IntervalRatio))
	}
	if len(how) == 0 {
		return ""
	}
	return name + ": its single Beta stands in for the pool only roughly (" + strings.Join(how, "; ") +
		"), so the posterior and any plan under it are that Beta's, not the pool's."
}

// UpdateLevel is the credible level of the intervals an update reports.
const UpdateLevel = 0.95

// Update is a question's agreed prior updated with every batch of data
// recorded for it: the posterior Beta(α + s, β + n − s) (elicit.Posterior),
// its 95% equal-tailed and highest-density intervals, and the prior–data
// conflict check (elicit.ConflictCheck) with its reading in words. The
// numbers are those of `parley update` for the same prior and totals.
type Update struct {
	Prior     elicit.Beta     `json:"prior"`
	Successes int             `json:"successes"`
	Trials    int             `json:"trials"`
	Batches   int             `json:"batches"`
	Level     float64         `json:"level"`
	Posterior elicit.Beta     `json:"posterior"`
	Mean      float64         `json:"mean"`
	SD        float64         `json:"sd"`
	Interval  [2]float64      `json:"interval"`
	HDI       [2]float64      `json:"hdi"`
	Conflict  elicit.Conflict `json:"prior_data_conflict"`
	Reading   string          `json:"conflict_reading"`
	// BatchesBeforePrior counts the batches recorded before the prior
	// was agreed. If they informed the prior, the posterior counts them
	// twice; the pages and the report say so.
	BatchesBeforePrior int `json:"batches_before_prior,omitempty"`
}

// StudyUpdate updates the agreed prior p of a proportion question with
// the question's recorded batches. It fails with ErrNoAgreedPrior
// wrapped when there are no data, and with elicit's input errors when the
// prior is not on [0, 1].
func StudyUpdate(q Question, p AgreedPrior, data []StudyData) (Update, error) {
	if !q.IsProportion() || p.Dist.Lower != 0 || p.Dist.Upper != 1 {
		return Update{}, inputErr("question", elicit.RuleUnknown, "binomial data update a proportion on [0, 1]")
	}
	s, n, batches := DataTotals(data, q.ID)
	if batches == 0 {
		return Update{}, ErrNoData
	}
	prior := p.Dist.Beta
	up, err := elicit.UpdateWith(prior, s, n, UpdateLevel)
	if err != nil {
		return Update{}, err
	}
	post := up.Posterior
	c, err := elicit.ConflictCheck(prior, s, n)
	if err != nil {
		return Update{}, err
	}
	return Update{Prior: prior, Successes: s, Trials: n, Batches: batches, Level: UpdateLevel,
		Posterior: post, Mean: post.Mean(), SD: post.SD(),
		Interval: up.Interval, HDI: up.HDI,
		Conflict: c, Reading: ConflictReading(c), BatchesBeforePrior: batchesBefore(data, q.ID, p.At)}, nil
}

// BeyondDouble says which ends of the posterior's intervals are written
// as a bound they lie a hair inside (elicit.IntervalsBeyondDouble); ""
// when none is.
func (u Update) BeyondDouble() string {
	m, _, _ := elicit.IntervalsBeyondDouble(u.Posterior, u.Level, u.Interval, u.HDI)
	return m
}

// batchesBefore counts question q's batches recorded before at.
func batchesBefore(data []StudyData, q int64, at time.Time) int {
	n := 0
	for _, d := range data {
		if d.QuestionID == q && d.At.Before(at) {
			n++
		}
	}
	return n
}

// TwiceCounted warns, in words, that the prior was agreed after some of
// the data it is updated with were recorded; "" when none were.
func (u Update) TwiceCounted() string {
	if u.BatchesBeforePrior == 0 {
		return ""
	}
	which := fmt.Sprintf("%d of the %d batches of data were", u.BatchesBeforePrior, u.Batches)
	if u.BatchesBeforePrior == u.Batches {
		which = "all the data were"
		if u.Batches == 1 {
			which = "the data were"
		}
	}
	return "This prior was agreed after " + which + " recorded. If those data informed the prior, the posterior counts them twice: " +
		"update a prior agreed before the data, or judge the posterior with that in mind."
}

// ConflictReading says in plain words what a prior–data conflict check
// found. The cut-offs 0.01, 0.05 and 0.2 on the doubled smaller tail are
// common practice, no source: they grade the surprise, they do not
// decide anything.
func ConflictReading(c elicit.Conflict) string {
	data := fmt.Sprintf("%d %s in %d %s", c.Successes, plural(c.Successes, "success", "successes"), c.Trials, plural(c.Trials, "trial", "trials"))
	side := "fewer"
	if c.Upper < c.Lower {
		side = "more"
	}
	// The tail probability is written with the figures that keep it on
	// its own side of the cut-offs (elicit.SideDigits): %.2g wrote
	// 0.04996 "0.05" beside "surprising" (below 0.05), and 0.19996 "0.2"
	// beside "towards its upper end" (below 0.2).
	pText := func(p float64) string {
		digits := 2
		for _, cut := range []float64{0.01, 0.05, 0.2} {
			digits = max(digits, elicit.SideDigits(p, cut, 2))
		}
		return strconv.FormatFloat(p, 'g', digits, 64)
	}
	switch p := c.TwoSided; {
	case p == 0:
		// Below the smallest double, not impossible (elicit.TailUnderflowWords).
		return fmt.Sprintf("The data conflict with the prior: %s is far %s than the prior expected (two-sided tail probability %s). Review the prior with the panel before relying on the posterior.", data, side, elicit.TailUnderflowWords)
	case p < 0.01:
		return fmt.Sprintf("The data conflict with the prior: %s is far %s than the prior expected (two-sided tail probability %s). Review the prior with the panel before relying on the posterior.", data, side, pText(p))
	case p < 0.05:
		return fmt.Sprintf("The data are surprising under the prior: %s is %s than the prior expected (two-sided tail probability %s). Look at the prior and the data again.", data, side, pText(p))
	}
	if c.TwoSided < 0.2 {
		end := "lower"
		if side == "more" {
			end = "upper"
		}
		return fmt.Sprintf("No sign of conflict at the 5%% level: %s is within what the prior allowed, though towards its %s end (two-sided tail probability %s).", data, end, pText(c.TwoSided))
	}
	return fmt.Sprintf("No sign of conflict: %s is well within what the prior expected (two-sided tail probability %s).", data, pText(c.TwoSided))
}

// CheckDataUpdate refuses a batch d after which the agreed prior could no
// longer be updated: the posterior of prior by the question's recorded
// successes and trials together with d's must stay within elicit.MaxShape
// (elicit.Posterior). A batch is never removed, so one that broke the
// update would break it for good.
func CheckDataUpdate(prior elicit.Beta, recordedSuccesses, recordedTrials int, d StudyData) error {
	s, n := recordedSuccesses+d.Successes, recordedTrials+d.Trials
	if _, err := elicit.Posterior(prior, s, n); err != nil {
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != elicit.RulePosteriorRange {
			return err
		}
		return inputErr(ie.Field, elicit.RulePosteriorRange,
			"the agreed prior Beta(%.4g, %.4g) updated with %d successes in %d trials, this batch's included, would be Beta(%.4g, %.4g)",
			prior.Alpha, prior.Beta, s, n, prior.Alpha+float64(s), prior.Beta+float64(n-s))
	}
	return nil
}

// CheckPriorUpdate refuses a prior to be agreed for a question whose
// recorded data (successes in trials, all its batches) it could not be
// updated with: the posterior must stay within elicit.MaxShape, as
// CheckDataUpdate asks of a new batch. The field is "prior", the
// agreement as a whole.
func CheckPriorUpdate(prior elicit.Beta, successes, trials int) error {
	if trials == 0 {
		return nil
	}
	if _, err := elicit.Posterior(prior, successes, trials); err != nil {
		var ie *elicit.InputError
		if !errors.As(err, &ie) || ie.Rule != elicit.RulePosteriorRange {
			return err
		}
		return inputErr("prior", elicit.RulePosteriorRange,
			"Beta(%s, %s) updated with the %d successes in %d trials already recorded would be Beta(%s, %s); agree a less certain prior",
			shortNumber(prior.Alpha), shortNumber(prior.Beta), successes, trials,
			shortNumber(prior.Alpha+float64(successes)), shortNumber(prior.Beta+float64(trials-successes)))
	}
	return nil
}

// UpdateFailure says why StudyUpdate(q, p, data) failed with err, in words
// for the project lead (the study page, the report, the record). The one
// refusal a valid record can reach is a posterior beyond elicit.MaxShape:
// a prior agreed after the data so certain that the two together pass the
// limit (CheckDataUpdate refuses such data for the prior already agreed,
// and CheckPriorUpdate such a prior for the data already recorded; a
// record from before that check may still hold one).
func UpdateFailure(q Question, p AgreedPrior, data []StudyData, err error) string {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return "The update could not be computed: " + err.Error()
	}
	if ie.Rule == elicit.RulePosteriorRange {
		s, n, _ := DataTotals(data, q.ID)
		prior := p.Dist.Beta
		post := elicit.Beta{Alpha: prior.Alpha + float64(s), Beta: prior.Beta + float64(n-s)}
		return fmt.Sprintf("The agreed prior Beta(%s, %s) cannot be updated with the %d successes in %d trials recorded: the posterior would be Beta(%s, %s), "+
			"and Parley computes a Beta accurately only while α and β are at most 1e7. The data are kept; a less certain agreed prior can be updated with them.",
			shortNumber(prior.Alpha), shortNumber(prior.Beta), s, n, shortNumber(post.Alpha), shortNumber(post.Beta))
	}
	msg := "The update could not be computed: " + ie.Field + ": " + string(ie.Rule)
	if ie.Detail != "" {
		msg += " (" + ie.Detail + ")"
	}
	return msg
}

// shortNumber writes v to four significant figures, as the pages write
// a Beta's shapes, without an exponent below a billion (9899408 is
// "9899000").
func shortNumber(v float64) string {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 4, 64), 64)
	if math.Abs(r) >= 1000 && math.Abs(r) < 1e9 {
		return strconv.FormatFloat(r, 'f', -1, 64)
	}
	return strconv.FormatFloat(r, 'g', -1, 64)
}
