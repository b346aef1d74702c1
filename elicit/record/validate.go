package record

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"reflect"
	"slices"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// Validate checks a record as an import would receive it: the format
// marker, every field of every entity, and that every reference points at
// an entity of the record. Every text passes the rules of the form it was
// typed in (package input: valid UTF-8, no control characters but
// newline, carriage return and tab, the same limits in characters); every
// id is from 1 to input.MaxID; the workshop's round is at most
// workshop.MaxRounds and every other round at most the workshop's. Answers and consensus judgements are re-checked
// by fitting them, and a revision's fit, like a consensus prior's Beta,
// must match the fresh one (ValidateFits). A question's agreed_prior must be the last of its
// prior_history, with its Beta's own mean, sd and percentiles where it
// has them (RulePriorMismatch; Prior.Unsummarised): it is the number the record's reader was given,
// and an import keeps the history; its warnings, where it has them, must
// carry its Beta's codes (their words are the writing version's). A prior from the pool that names the
// revisions it pooled must be the single Beta of their pool under its
// weight set (RulePoolMismatch). The other derived numbers (the current
// pools, snippets) are not trusted and not checked: an import drops them. A record's chain and
// fingerprint, where it has them, must be the ones its facts give
// (CheckChain, RuleChainMismatch). The first broken rule is
// returned as an *elicit.InputError whose Field is the path into the document,
// e.g. "revisions[3].answer.values[1]".
func (r Record) Validate() error {
	_, err := r.ValidateFits()
	return err
}

// ValidateFits is Validate that also returns the fresh fit of every
// revision, in the record's order, for the import to keep with it (the
// zero Fit for an answer an earlier build saved under looser rules,
// EarlierRule, which is kept unfitted). A
// revision that carries its fit (every record Parley writes) is checked
// against the fresh one (sameFit: the bounds exactly, and α and β to 1e-6
// relative or, for a fit an earlier solver stopped elsewhere in the
// objective's flat valley, the objective to its minimum and the chance
// below each stated value to 1e-3), else RuleFitMismatch at
// "revisions[i].fit".
func (r Record) ValidateFits() ([]elicit.Fit, error) {
	fits := make([]elicit.Fit, len(r.Revisions))
	if err := r.validate(fits); err != nil {
		return nil, err
	}
	return fits, nil
}

// fitAgreement is the relative difference in α or β beyond which a kept
// fit does not match a fresh one: far above the fit's own accuracy (1e-9
// relative in the objective at the global minimum), far below any
// difference that changes a printed digit.
const fitAgreement = 1e-6

// curveAgreement is the largest difference in a chance below, at the
// points sameCurve probes, between the Beta of a prior agreed from the
// pool and the single Beta this version forms of the same pool, where
// their α and β lie further apart than fitAgreement: an earlier version's
// solver may stop elsewhere along a flat valley, where α and β move
// together and the curve barely moves (its fits did: up to 4e-5 apart in
// α and β, 8e-6 in the demo's chances, TestRecordsOfEarlierBuildsImport).
// 1e-5 is below any difference a page shows (they write chances to three
// or four figures, 49.30% or 6.190%); a Beta changed by hand moves the
// curve by more (α alone 1e-4 larger moves the invented demo's first fit
// by 6e-5 at its median: SciPy 1.10.1's beta.cdf and beta.ppf, a one-off
// check, no committed table). No record of an earlier build with a prior
// from the pool has been found that needs it; it is a bound, not a
// measured need: the builds that name a prior's pooled revisions formed
// the demo's pool priors within 5e-15 of this version's single Beta
// (testdata/records/demo_*_pool.json, TestPoolPriorsOfEarlierBuildsImport)
// and 600 invented pools' within 2e-12 (testdata/records/earlier_pools,
// TestPoolsOfEarlierBuildsAreTaken).
const curveAgreement = 1e-5

// sseAgreement is how much larger, relatively, the least-squares objective
// of a kept fit may be than this version's minimum where sameFit falls
// back on the objective, and sseFloor how much larger absolutely (a
// near-exact fit, whose minimum is about 0: 1e-10 is a residual of 1e-5).
// The build before the Levenberg–Marquardt fit stopped at most 8.5e-9
// above the minimum on 1,071 invented judgements, and at most 2.9e-6 of
// it wherever it stopped more than 1e-10 above
// (testdata/records/earlier_fits, TestFitsOfAnEarlierBuildAreTaken).
const (
	sseAgreement = 1e-5
	sseFloor     = 1e-10
)

// stateAgreement is how far a kept fit's chance below a stated value may
// lie from this version's fit's where sameFit falls back on the
// objective: the earlier build's lay up to 7.9e-5 apart. 1e-3 is below
// the figures a page writes the curve's chance below an answer to
// (49.3%, 6.19%).
const stateAgreement = 1e-3

// curveProbes are the chances at which sameCurve compares two curves.
var curveProbes = [...]float64{0.01, 0.05, 0.25, 0.5, 0.75, 0.95, 0.99}

// sameCurve reports whether the Beta k the record keeps is this version's
// f for every purpose the record shows it for: the same bounds, and α and
// β within fitAgreement relative, or else k's chance below each of f's
// 1, 5, 25, 50, 75, 95 and 99% points within curveAgreement.
func sameCurve(k, f elicit.ScaledBeta) bool {
	if k.Lower != f.Lower || k.Upper != f.Upper {
		return false
	}
	if relDiff(k.Alpha, f.Alpha) <= fitAgreement && relDiff(k.Beta.Beta, f.Beta.Beta) <= fitAgreement {
		return true
	}
	if k.Validate() != nil {
		return false
	}
	for _, p := range curveProbes {
		if !(math.Abs(k.CDF(f.Quantile(p))-p) <= curveAgreement) {
			return false
		}
	}
	return true
}

// sameFit reports whether the Beta k the record keeps as the fit of an
// answer is this version's fit f of it: the same bounds, and α and β
// within fitAgreement relative, or else k a least-squares fit of the
// answer as an earlier solver stopped it: its objective within
// sseAgreement (or sseFloor) of f's minimum and its chance below each
// stated value within stateAgreement of f's. The curves are not compared
// away from the stated values: where two pairs fix a U-shaped Beta, two
// exact fits a hair apart in α and β (Beta(0.09856, 0.10002)) differ by
// 0.01 in the chance below their own 1% point, which lies near 1e-20.
func sameFit(k elicit.ScaledBeta, f elicit.Fit) bool {
	if k.Lower != f.Dist.Lower || k.Upper != f.Dist.Upper {
		return false
	}
	if relDiff(k.Alpha, f.Dist.Alpha) <= fitAgreement && relDiff(k.Beta.Beta, f.Dist.Beta.Beta) <= fitAgreement {
		return true
	}
	if k.Validate() != nil {
		return false
	}
	var sse float64
	for i, x := range f.Stated {
		c := k.CDF(x)
		if !(math.Abs(c-(f.Probs[i]+f.ProbErrors[i])) <= stateAgreement) {
			return false
		}
		sse += (c - f.Probs[i]) * (c - f.Probs[i])
	}
	return sse <= f.SSE*(1+sseAgreement)+sseFloor
}

// EarlierRule reports whether err refuses an answer by a rule an earlier
// build of Parley did not have: the rules that keep a judgement inside
// the fit's accuracy envelope (values a hair from a bound or from each
// other, a judgement no Beta in the search box fits), which came with
// the Levenberg–Marquardt fit on 2026-12-02. Builds before them saved
// such answers ("4.9e-324, 1e-323, 1.5e-323" on [0, 1]), and their
// records, and the databases they wrote, upgraded and exported, must
// still import (testdata/records/demo_7c8c05c_tiny.json). Such an answer
// is kept in the record as it was saved and not fitted; every other
// rule still refuses it.
func EarlierRule(err error) bool {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return false
	}
	switch ie.Rule {
	case elicit.RuleValueNearBound, elicit.RuleValuesTooClose, elicit.RuleFitRange:
		return true
	}
	return false
}

// RuleFitMismatch is the rule that a revision's fit is the fit of its
// answer.
const RuleFitMismatch elicit.Rule = "does not match a fresh fit of its answer"

// RuleSheetMismatch is the rule that a revision's answer sheet and row
// are the ones the log's answers_imported entries give it.
const RuleSheetMismatch elicit.Rule = "does not match the answer sheet import in the record's events"

// CheckFormat reports whether r is written in the record format this
// version reads. A file without "parley_record" is no Parley record (it
// was said to be "format 0"); one of another format may lay its facts
// out otherwise, so neither an import nor a fingerprint reads it.
func (r Record) CheckFormat() error {
	switch {
	case r.Format == 0:
		return inputErr("parley_record", elicit.RuleRequired, "the file is not a Parley record: every record begins with \"parley_record\": %d", Version)
	case r.Format != Version:
		return inputErr("parley_record", elicit.RuleUnknown, "format %d; this version reads %d", r.Format, Version)
	}
	return nil
}

func (r Record) validate(fits []elicit.Fit) error {
	if err := r.CheckFormat(); err != nil {
		return err
	}
	w := r.Workshop
	if err := checkWorkshop(w); err != nil {
		return err
	}
	experts := map[int64]bool{}
	for i, e := range r.Experts {
		p := fmt.Sprintf("experts[%d]", i)
		if err := checkID(p+".id", e.ID, experts); err != nil {
			return err
		}
		if e.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", e.WorkshopID, w.ID)
		}
		if err := e.CheckText(); err != nil {
			return under(p, err)
		}
		if e.Created.IsZero() {
			return inputErr(p+".created", elicit.RuleRequired, "")
		}
		experts[e.ID] = true
	}
	questions := map[int64]workshop.Question{}
	seenQ := map[int64]bool{}
	positions := map[int]bool{}
	for i, q := range r.Questions {
		p := fmt.Sprintf("questions[%d]", i)
		if err := checkID(p+".id", q.ID, seenQ); err != nil {
			return err
		}
		if q.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", q.WorkshopID, w.ID)
		}
		if err := checkQuestion(p, q.Question); err != nil {
			return err
		}
		if positions[q.Position] {
			return inputErr(p+".position", elicit.RuleUnknown, "position %d appears twice", q.Position)
		}
		positions[q.Position] = true
		seenQ[q.ID] = true
		questions[q.ID] = q.Question
		for j, ap := range q.PriorHistory {
			if err := checkPrior(fmt.Sprintf("%s.prior_history[%d]", p, j), ap, q.Question, w); err != nil {
				return err
			}
		}
	}
	seenR := map[int64]bool{}
	pooled := map[int64]pooledFit{} // revision → its question, expert and the fit a panel pooled
	unfitted := map[int64]bool{}    // revisions saved under an earlier build's looser rules (EarlierRule)
	revs := make([]workshop.Revision, len(r.Revisions))
	for i, rv := range r.Revisions {
		revs[i] = rv.Revision
	}
	sheets := sheetRows(r.Events, revs)
	for i, rv := range r.Revisions {
		p := fmt.Sprintf("revisions[%d]", i)
		if err := checkID(p+".id", rv.ID, seenR); err != nil {
			return err
		}
		if i > 0 && rv.ID <= r.Revisions[i-1].ID {
			return inputErr(p+".id", RuleOldestFirst, "revision %d after revision %d", rv.ID, r.Revisions[i-1].ID)
		}
		seenR[rv.ID] = true
		q, ok := questions[rv.QuestionID]
		if !ok {
			return inputErr(p+".question_id", elicit.RuleUnknown, "no question %d in the record", rv.QuestionID)
		}
		if !experts[rv.ExpertID] {
			return inputErr(p+".expert_id", elicit.RuleUnknown, "no expert %d in the record", rv.ExpertID)
		}
		if err := checkRound(p+".round", rv.Round, w); err != nil {
			return err
		}
		if rv.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if err := input.CheckText(p+".reason", rv.Reason, input.MaxLongText, false); err != nil {
			return err
		}
		if err := rv.CheckProvenance(); err != nil {
			return under(p, err)
		}
		if s := rv.Sheet; s != nil {
			if want, ok := sheets[rv.ID]; !ok {
				return inputErr(p+".sheet", RuleSheetMismatch, "no answer sheet import in the events names revision %d", rv.ID)
			} else if *s != want {
				return inputErr(p+".sheet", RuleSheetMismatch, "the record says %q row %d (SHA-256 %s), the events say %q row %d (SHA-256 %s)",
					s.File, s.Row, s.SHA256, want.File, want.Row, want.SHA256)
			}
		}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			if !EarlierRule(err) {
				return under(p+".answer", err)
			}
			// An answer an earlier build saved under looser rules: kept as
			// it was saved, never fitted by this version (fits[i] stays
			// the zero Fit; the panel says why, PanelMember.FitErr), and
			// never pooled: no build that named a prior's pooled
			// revisions took such an answer, and the import keeps no fit
			// of it that a pool could be checked against again.
			unfitted[rv.ID] = true
			continue
		}
		if k := rv.Fit; k != nil {
			if !sameFit(k.Dist, f) {
				return inputErr(p+".fit", RuleFitMismatch, "the record says Beta(%g, %g) on [%g, %g], a fresh fit gives Beta(%g, %g) on [%g, %g]",
					k.Dist.Alpha, k.Dist.Beta.Beta, k.Dist.Lower, k.Dist.Upper, f.Dist.Alpha, f.Dist.Beta.Beta, f.Dist.Lower, f.Dist.Upper)
			}
		}
		fits[i] = f
		d := f.Dist
		if rv.Fit != nil {
			d = rv.Fit.Dist // the kept fit, which the panel pooled (Revision.FitOf)
		}
		pooled[rv.ID] = pooledFit{question: rv.QuestionID, expert: rv.ExpertID, dist: d}
	}
	// A prior from the pool names revisions of its own question.
	for i, q := range r.Questions {
		for j, ap := range q.PriorHistory {
			for k, id := range ap.Pooled {
				if unfitted[id] {
					return inputErr(fmt.Sprintf("questions[%d].prior_history[%d].pooled_revisions[%d]", i, j, k), elicit.RuleUnknown,
						"revision %d was saved under an earlier version's looser rules and is not fitted, so no pool took it", id)
				}
				if pooled[id].question != q.ID {
					return inputErr(fmt.Sprintf("questions[%d].prior_history[%d].pooled_revisions[%d]", i, j, k), elicit.RuleUnknown,
						"no revision %d on question %d in the record", id, q.ID)
				}
			}
		}
	}
	// A question's freeze names one of its own revisions, the last saved
	// when its true value was revealed, as the store sets it: any other
	// number would be read back, and exported again, as another freeze.
	// One question's record written before Parley kept that revision left
	// it out for a calibration question kept as the weights' evidence; it
	// has no chain and none of that question's events, and still reads:
	// an import freezes the same answers, the question's up to the freeze.
	for i, q := range r.Questions {
		id := q.RevealedThrough
		if id <= 0 {
			continue
		}
		if p, held := pooled[id]; p.question != q.ID && (held || r.Chain != nil || r.revealCarriesFreeze(q.ID)) {
			return inputErr(fmt.Sprintf("questions[%d].revealed_through", i), elicit.RuleUnknown,
				"no revision %d on question %d in the record", id, q.ID)
		}
	}
	if err := r.checkWeightHistory(experts, questions); err != nil {
		return err
	}
	if err := r.checkStudyData(questions); err != nil {
		return err
	}
	seenE := map[int64]bool{}
	for i, e := range r.Events {
		p := fmt.Sprintf("events[%d]", i)
		if err := checkID(p+".id", e.ID, seenE); err != nil {
			return err
		}
		seenE[e.ID] = true
		if e.WorkshopID != w.ID {
			return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", e.WorkshopID, w.ID)
		}
		if _, ok := questions[e.QuestionID]; e.QuestionID != 0 && !ok {
			return inputErr(p+".question_id", elicit.RuleUnknown, "no question %d in the record", e.QuestionID)
		}
		if !knownEvent(e.Kind) {
			return inputErr(p+".kind", elicit.RuleUnknown, "%q", e.Kind)
		}
		if e.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if err := input.CheckText(p+".reason", e.Reason, input.MaxLongText, false); err != nil {
			return err
		}
		if err := input.CheckText(p+".detail", e.Detail, input.MaxDetail, false); err != nil {
			return err
		}
	}
	sets := map[int64]workshop.Weights{}
	for _, wt := range r.WeightHistory {
		sets[wt.ID] = wt
	}
	for i, q := range r.Questions {
		for j, ap := range q.PriorHistory {
			p := fmt.Sprintf("questions[%d].prior_history[%d]", i, j)
			if err := checkConsensusFit(p, ap, q.Question); err != nil {
				return err
			}
			if err := checkPoolPrior(p, ap, pooled, sets); err != nil {
				return err
			}
		}
	}
	if err := r.CheckInForce(); err != nil {
		return err
	}
	// Last, so that every fact is otherwise sound: a caller that reads
	// the chain alone (parley fingerprint) can tell a changed fact from a
	// broken record. The questions' own rows are then checked against
	// their chained events.
	if err := r.CheckChain(); err != nil {
		return err
	}
	if err := r.CheckDefinitions(); err != nil {
		return err
	}
	return r.CheckRounds()
}

// checkConsensusFit checks that a prior agreed from a consensus judgement
// is that judgement's fit, as the panel's form makes it (RuleFitMismatch,
// with a revision's tolerance).
func checkConsensusFit(p string, ap workshop.AgreedPrior, q workshop.Question) error {
	if ap.Source != workshop.PriorFromConsensus || ap.Consensus == nil {
		return nil
	}
	f, err := q.Fit(*ap.Consensus)
	if err != nil {
		return under(p+".consensus", err)
	}
	if k := ap.Dist; !sameFit(k, f) {
		return inputErr(p+".dist", RuleFitMismatch, "the record says Beta(%g, %g) on [%g, %g], a fresh fit of its consensus gives Beta(%g, %g) on [%g, %g]",
			k.Alpha, k.Beta.Beta, k.Lower, k.Upper, f.Dist.Alpha, f.Dist.Beta.Beta, f.Dist.Lower, f.Dist.Upper)
	}
	return nil
}

// pooledFit is a revision's question, expert and fitted Beta, as a panel
// pooled it.
type pooledFit struct {
	question int64
	expert   int64
	dist     elicit.ScaledBeta
}

// RulePoolMismatch is the rule that a prior agreed from the pool is the
// single Beta of the pool it names.
const RulePoolMismatch elicit.Rule = "does not match the single Beta of the pool of its pooled_revisions"

// checkPoolPrior checks that a prior agreed from the pool, naming the
// revisions it pooled, is the single Beta of their pool (elicit.LinearPool
// of their fits, each weighted as its weight set gave the expert;
// Pool.BestBeta), as the panel formed it (sameCurve: α and β to
// fitAgreement, or the curve to curveAgreement). A
// prior from before Parley kept its pooled revisions names none and is
// not checked.
func checkPoolPrior(p string, ap workshop.AgreedPrior, fits map[int64]pooledFit, sets map[int64]workshop.Weights) error {
	if ap.Source != workshop.PriorFromPool || len(ap.Pooled) == 0 {
		return nil
	}
	wt := sets[ap.WeightSetID] // set 0, none applied: equal weights
	dists := make([]elicit.ScaledBeta, len(ap.Pooled))
	raw := make([]float64, len(ap.Pooled))
	for k, id := range ap.Pooled {
		pf := fits[id]
		dists[k], raw[k] = pf.dist, wt.Of(pf.expert)
	}
	pool, err := elicit.LinearPool(dists, raw)
	if err != nil {
		return inputErr(p+".pooled_revisions", RulePoolMismatch, "their pool cannot be formed: %v", err)
	}
	rep, err := pool.BestBeta()
	if err != nil {
		return inputErr(p+".pooled_revisions", RulePoolMismatch, "their pool has no single Beta: %v", err)
	}
	if k, f := ap.Dist, rep.Dist; !sameCurve(k, f) {
		return inputErr(p+".dist", RulePoolMismatch, "the record says Beta(%g, %g) on [%g, %g]; the pool of the revisions it names (%d) gives Beta(%g, %g) on [%g, %g]",
			k.Alpha, k.Beta.Beta, k.Lower, k.Upper, len(ap.Pooled), f.Alpha, f.Beta.Beta, f.Lower, f.Upper)
	}
	return nil
}

// RulePriorMismatch is broken by a question's agreed_prior that is not
// the last agreement of its prior_history, or whose summary is not its
// Beta's.
const RulePriorMismatch elicit.Rule = "must be the last agreement of prior_history, summarised by its own Beta"

// summaryAgreement is the relative difference beyond which a current
// prior's mean, sd or percentile is not its Beta's (with 1e-12 of the
// question's span for a value near 0): far above the quantiles' accuracy
// in any version of Parley, far below a printed digit.
const summaryAgreement = 1e-6

// CheckInForce checks the record's copies of what is in force, which the
// chain does not cover, against the chained histories they copy: the
// weights against weight_history's last set (RuleInForce at "weights")
// and each question's agreed_prior against its prior_history
// (CheckCurrentPriors). Validate runs it, and so does parley fingerprint.
func (r Record) CheckInForce() error {
	if n := len(r.WeightHistory); n > 0 && !sameSet(r.Weights, r.WeightHistory[n-1]) {
		last := r.WeightHistory[n-1]
		return inputErr("weights", RuleInForce, "the record says set %d, %s, by expert %v; weight_history's last is set %d, %s, by expert %v",
			r.Weights.ID, r.Weights.Scheme, r.Weights.ByExpert, last.ID, last.Scheme, last.ByExpert)
	}
	return r.CheckCurrentPriors()
}

// sameSet is whether a and b are the same weight set in what the chain
// covers of one (its basis, derived, is checked on its own).
func sameSet(a, b workshop.Weights) bool {
	return a.ID == b.ID && a.WorkshopID == b.WorkshopID && a.Scheme == b.Scheme && a.Reason == b.Reason &&
		a.At.Equal(b.At) && maps.Equal(a.ByExpert, b.ByExpert)
}

// RuleInForce is broken by weights in force that are not the last set
// of weight_history.
const RuleInForce elicit.Rule = "must be the last set of weight_history"

// CheckCurrentPriors checks each question's prior_history and the
// agreed_prior beside it: the history runs oldest first, in ascending id,
// as the store keeps it (the chain covers each agreement but not the
// list's order), and the agreed_prior, a copy the chain does not cover,
// is the history's last with its own Beta's summary (checkCurrentPrior).
// Both are refused with RulePriorMismatch.
func (r Record) CheckCurrentPriors() error {
	for i, q := range r.Questions {
		for j := 1; j < len(q.PriorHistory); j++ {
			if prev, ap := q.PriorHistory[j-1], q.PriorHistory[j]; ap.ID <= prev.ID {
				return inputErr(fmt.Sprintf("questions[%d].prior_history[%d].id", i, j), RulePriorMismatch,
					"prior %d after prior %d: the history runs oldest first, in ascending id", ap.ID, prev.ID)
			}
		}
		if err := checkCurrentPrior(fmt.Sprintf("questions[%d].agreed_prior", i), q); err != nil {
			return err
		}
	}
	return nil
}

// checkCurrentPrior checks a question's agreed_prior against its history
// and its own Beta. A record may leave it out; then the history's last is
// the current prior, as the import keeps it.
func checkCurrentPrior(p string, q Question) error {
	cur := q.AgreedPrior
	if cur == nil {
		return nil
	}
	n := len(q.PriorHistory)
	if n == 0 {
		return inputErr(p, RulePriorMismatch, "prior_history is empty")
	}
	last := q.PriorHistory[n-1]
	if !reflect.DeepEqual(cur.AgreedPrior, last) {
		return inputErr(p, RulePriorMismatch, "it is not prior_history[%d] (%s, Beta(%g, %g) agreed at %s); it says %s, Beta(%g, %g) agreed at %s",
			n-1, last.Source, last.Dist.Alpha, last.Dist.Beta.Beta, last.At.Format(time.RFC3339),
			cur.Source, cur.Dist.Alpha, cur.Dist.Beta.Beta, cur.At.Format(time.RFC3339))
	}
	d := cur.Dist
	span := d.Upper - d.Lower
	// A prior written before the record carried its summary gave no
	// number beside the Beta, so none can be another's; its warnings,
	// if it has any, are checked below all the same.
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"mean", cur.Mean, d.Mean()}, {"sd", cur.SD, d.SD()},
		{"percentiles.p05", cur.Percentiles.P05, d.Quantile(0.05)},
		{"percentiles.p50", cur.Percentiles.P50, d.Quantile(0.5)},
		{"percentiles.p95", cur.Percentiles.P95, d.Quantile(0.95)},
	} {
		if cur.Unsummarised {
			break
		}
		if !(math.Abs(c.got-c.want) <= summaryAgreement*math.Abs(c.want)+1e-12*span) {
			return inputErr(p+"."+c.name, RulePriorMismatch, "%v, but Beta(%g, %g) on [%g, %g] has %v", c.got, d.Alpha, d.Beta.Beta, d.Lower, d.Upper, c.want)
		}
	}
	// Warnings are the Beta's own: the same codes, in order. Their words
	// are the writing version's (a later version may word them anew, or
	// print a figure in them a digit apart, as the summary's numbers are
	// held only to summaryAgreement); a record from before they were
	// kept has none to check.
	if cur.Warnings != nil {
		if got, want := warningCodes(cur.Warnings), warningCodes(priorWarnings(d)); !slices.Equal(got, want) {
			return inputErr(p+".warnings", RulePriorMismatch, "codes %v, but Beta(%g, %g) on [%g, %g] has %v", got, d.Alpha, d.Beta.Beta, d.Lower, d.Upper, want)
		}
	}
	return nil
}

// warningCodes are the codes of ws, in order.
func warningCodes(ws []Warning) []string {
	codes := make([]string, len(ws))
	for i, w := range ws {
		codes[i] = w.Code
	}
	return codes
}

// relDiff is |a − b| relative to the larger magnitude.
func relDiff(a, b float64) float64 {
	return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
}

func checkWorkshop(w workshop.Workshop) error {
	if w.ID == 0 && w.Created.IsZero() && w.Title == "" && w.Round == 0 {
		// No "workshop" object at all: said so, not "workshop.id: must
		// be greater than 0 (got 0)", an id nobody wrote.
		return inputErr("workshop", elicit.RuleRequired, "the record has no workshop (its id, title, round and created)")
	}
	if err := input.CheckID("workshop.id", w.ID); err != nil {
		return err
	}
	if err := w.CheckText(); err != nil {
		return under("workshop", err)
	}
	if w.Round < 1 || w.Round > workshop.MaxRounds {
		return inputErr("workshop.round", elicit.RuleCountRange, "round %d; a workshop has rounds 1 to %d", w.Round, workshop.MaxRounds)
	}
	if w.Created.IsZero() {
		return inputErr("workshop.created", elicit.RuleRequired, "")
	}
	return nil
}

func checkQuestion(p string, q workshop.Question) error {
	if err := input.CheckID(p+".position", int64(q.Position)); err != nil {
		return err
	}
	if q.TrueValue != nil && !q.Calibration {
		return inputErr(p+".true_value", elicit.RuleUnknown, "only a calibration question has a true value")
	}
	if err := checkOptionalID(p+".revealed_through", q.RevealedThrough); err != nil {
		return err
	}
	if (q.RevealedAt != nil || q.RevealedThrough > 0) && !q.Frozen() {
		return inputErr(p+".revealed_at", elicit.RuleUnknown, "only a calibration question whose true value is revealed has a reveal")
	}
	// As kept: a question made before a rule for typing it (MinProbGap)
	// comes back as it was written.
	return under(p, q.ValidateKept())
}

func checkPrior(p string, ap workshop.AgreedPrior, q workshop.Question, w workshop.Workshop) error {
	if err := input.CheckID(p+".id", ap.ID); err != nil {
		return err
	}
	if err := checkOptionalID(p+".weight_set_id", ap.WeightSetID); err != nil {
		return err
	}
	if ap.QuestionID != q.ID {
		return inputErr(p+".question_id", elicit.RuleUnknown, "%d is not the question's id %d", ap.QuestionID, q.ID)
	}
	if err := ap.Dist.Validate(); err != nil {
		return under(p+".dist", err)
	}
	// The prior is a prior for the question's quantity: on its bounds, as
	// the forms make it.
	if ap.Dist.Lower != q.Lower || ap.Dist.Upper != q.Upper {
		return inputErr(p+".dist.lower", elicit.RuleSameBounds, "[%v, %v] differs from the question's [%v, %v]", ap.Dist.Lower, ap.Dist.Upper, q.Lower, q.Upper)
	}
	if err := ap.CheckSource(); err != nil {
		return under(p, err)
	}
	if ap.Consensus != nil {
		if _, err := q.Fit(*ap.Consensus); err != nil {
			return under(p+".consensus", err)
		}
	}
	if err := input.CheckText(p+".rationale", ap.Rationale, input.MaxLongText, false); err != nil {
		return err
	}
	if err := checkRound(p+".round", ap.Round, w); err != nil {
		return err
	}
	if ap.At.IsZero() {
		return inputErr(p+".at", elicit.RuleRequired, "")
	}
	return nil
}

// checkWeightHistory checks the weights in force, every set in the
// history with its basis, and that the history ends with the set in
// force. A record without a history (made before Parley kept one) must
// not name a set it does not carry.
func (r Record) checkWeightHistory(experts map[int64]bool, questions map[int64]workshop.Question) error {
	w := r.Workshop
	if err := checkRecordWeights("weights", r.Weights, w, experts); err != nil {
		return err
	}
	sets := map[int64]bool{}
	var last workshop.Weights
	for i, wt := range r.WeightHistory {
		p := fmt.Sprintf("weight_history[%d]", i)
		if err := checkRecordWeights(p, wt, w, experts); err != nil {
			return err
		}
		if wt.ID <= last.ID {
			return inputErr(p+".id", elicit.RuleUnknown, "set %d after set %d: the history runs oldest first", wt.ID, last.ID)
		}
		if wt.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if wt.Basis != nil {
			if err := checkBasis(p+".basis", *wt.Basis, wt, r, experts, questions); err != nil {
				return err
			}
		}
		sets[wt.ID], last = true, wt
	}
	switch {
	case len(r.WeightHistory) > 0 && r.Weights.ID != last.ID:
		return inputErr("weights.id", elicit.RuleUnknown, "set %d is in force, but the history ends with set %d", r.Weights.ID, last.ID)
	case len(r.WeightHistory) == 0 && r.Weights.ID != 0:
		return inputErr("weights.id", elicit.RuleUnknown, "set %d is not in weight_history", r.Weights.ID)
	case r.Weights.Basis != nil && len(r.WeightHistory) == 0:
		return inputErr("weights.basis", elicit.RuleUnknown, "a basis needs its set in weight_history")
	}
	for i, q := range r.Questions {
		for j, ap := range q.PriorHistory {
			if ap.WeightSetID != 0 && !sets[ap.WeightSetID] {
				return inputErr(fmt.Sprintf("questions[%d].prior_history[%d].weight_set_id", i, j), elicit.RuleUnknown,
					"no weight set %d in weight_history", ap.WeightSetID)
			}
		}
	}
	return nil
}

func checkRecordWeights(p string, wt workshop.Weights, w workshop.Workshop, experts map[int64]bool) error {
	if err := checkOptionalID(p+".id", wt.ID); err != nil {
		return err
	}
	if wt.WorkshopID != w.ID {
		return inputErr(p+".workshop_id", elicit.RuleUnknown, "%d is not the workshop's id %d", wt.WorkshopID, w.ID)
	}
	if err := wt.Check(); err != nil {
		return under(p, err)
	}
	ids := make([]int64, 0, len(wt.ByExpert))
	for id := range wt.ByExpert {
		ids = append(ids, id)
	}
	slices.Sort(ids)
	for _, id := range ids {
		if !experts[id] {
			return inputErr(fmt.Sprintf("%s.by_expert[%d]", p, id), elicit.RuleUnknown, "no expert %d in the record", id)
		}
	}
	return input.CheckText(p+".reason", wt.Reason, input.MaxLongText, false)
}

func checkRound(field string, round int, w workshop.Workshop) error {
	if round < 1 || round > w.Round {
		return inputErr(field, elicit.RuleCountRange, "round %d; the workshop has rounds 1 to %d", round, w.Round)
	}
	return nil
}

func checkID(field string, id int64, seen map[int64]bool) error {
	if err := input.CheckID(field, id); err != nil {
		return err
	}
	if seen[id] {
		return inputErr(field, elicit.RuleUnknown, "id %d appears twice", id)
	}
	return nil
}

// checkOptionalID checks an id that may be 0 for none: 0 to input.MaxID.
func checkOptionalID(field string, id int64) error {
	if id == 0 {
		return nil
	}
	if id < 0 {
		return inputErr(field, elicit.RuleNonNegative, "got %d", id)
	}
	return input.CheckID(field, id)
}

func knownEvent(k workshop.EventKind) bool {
	for _, known := range workshop.EventKinds {
		if k == known {
			return true
		}
	}
	return false
}

// checkStudyData checks every batch of recorded data: its id, a question
// of the record with an agreed prior, the rules of a batch already
// recorded (workshop.StudyData.ValidateKept: a day observed before 1900,
// recorded before the form refused it, comes back), a time, and each
// question's total within elicit.MaxUpdateTrials.
func (r Record) checkStudyData(questions map[int64]workshop.Question) error {
	withPrior := map[int64]bool{}
	for _, q := range r.Questions {
		withPrior[q.ID] = len(q.PriorHistory) > 0
	}
	seen := map[int64]bool{}
	totals := map[int64]int{}
	for i, d := range r.StudyData {
		p := fmt.Sprintf("study_data[%d]", i)
		if err := checkID(p+".id", d.ID, seen); err != nil {
			return err
		}
		seen[d.ID] = true
		if _, ok := questions[d.QuestionID]; !ok {
			return inputErr(p+".question_id", elicit.RuleUnknown, "no question %d in the record", d.QuestionID)
		}
		if !withPrior[d.QuestionID] {
			return inputErr(p+".question_id", elicit.RuleUnknown, "question %d has no agreed prior", d.QuestionID)
		}
		if !questions[d.QuestionID].IsProportion() {
			// As the study page's form: binomial data update a proportion.
			return inputErr(p+".question_id", elicit.RuleUnknown, "question %d is not a proportion on [0, 1]; binomial data update only a proportion", d.QuestionID)
		}
		if err := d.ValidateKept(); err != nil {
			return under(p, err)
		}
		if err := workshop.CheckDataTotal(totals[d.QuestionID], d); err != nil {
			return under(p, err)
		}
		totals[d.QuestionID] += d.Trials
		if d.At.IsZero() {
			return inputErr(p+".at", elicit.RuleRequired, "")
		}
		if err := d.CheckObservedBy(d.At); err != nil {
			return under(p, err)
		}
	}
	return nil
}
