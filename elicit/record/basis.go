package record

import (
	"fmt"
	"math"
	"slices"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// checkBasis checks a weight set's basis as an import receives it: every
// reference points at the record's experts, questions and revisions, an
// answer's quantiles are those its revision saved, and the set's weights
// are the basis's. The scores themselves are the record of what was done
// and are not recomputed here. That only performance weights have a
// basis is the set's own rule (workshop.Weights.Check, checked first).
func checkBasis(p string, b workshop.WeightBasis, wt workshop.Weights, r Record, experts map[int64]bool, questions map[int64]workshop.Question) error {
	if b.Method != workshop.BasisClassicalModel {
		return inputErr(p+".method", elicit.RuleUnknown, "%q", b.Method)
	}
	if b.AlphaRule != workshop.AlphaOptimised && b.AlphaRule != workshop.AlphaFixed {
		return inputErr(p+".alpha_rule", elicit.RuleUnknown, "%q", b.AlphaRule)
	}
	if math.IsNaN(b.Alpha) || b.Alpha < 0 || b.Alpha > 1 {
		return inputErr(p+".alpha", elicit.RuleUnitInterval, "got %v", b.Alpha)
	}
	if math.IsNaN(b.Overshoot) || math.IsInf(b.Overshoot, 0) || b.Overshoot < 0 {
		return inputErr(p+".overshoot", elicit.RuleNonNegative, "got %v", b.Overshoot)
	}
	if len(b.Probs) == 0 {
		return inputErr(p+".probs", elicit.RuleCount, "need at least 1 probability, got 0")
	}
	if err := elicit.CheckProbs(p+".probs", b.Probs); err != nil {
		return err
	}
	if err := input.CheckText(p+".answers", b.Answers, input.MaxLongText, false); err != nil {
		return err
	}
	scored := map[int64]bool{}
	for i, q := range b.Questions {
		f := fmt.Sprintf("%s.calibration_questions[%d]", p, i)
		rq, ok := questions[q.QuestionID]
		switch {
		case !ok:
			return inputErr(f+".question_id", elicit.RuleUnknown, "no question %d in the record", q.QuestionID)
		case !rq.Calibration:
			return inputErr(f+".question_id", elicit.RuleUnknown, "question %d is not a calibration question", q.QuestionID)
		case scored[q.QuestionID]:
			return inputErr(f+".question_id", elicit.RuleDuplicate, "question %d", q.QuestionID)
		}
		if !finite(q.Lower) || !finite(q.Upper) || !(q.Lower < q.Upper) {
			return inputErr(f+".lower", elicit.RuleBoundsOrder, "got [%v, %v]", q.Lower, q.Upper)
		}
		if q.TrueValue != nil {
			if !rq.Revealed {
				return inputErr(f+".true_value", elicit.RuleUnknown, "question %d's true value is not revealed in the record", q.QuestionID)
			}
			if v := *q.TrueValue; !finite(v) || v < q.Lower || v > q.Upper {
				return inputErr(f+".true_value", elicit.RuleInRange, "%v outside [%v, %v]", v, q.Lower, q.Upper)
			}
		}
		scored[q.QuestionID] = true
	}
	revisions := map[int64]Revision{}
	for _, rv := range r.Revisions {
		revisions[rv.ID] = rv
	}
	seen := map[[2]int64]bool{}
	for i, a := range b.CalibrationAnswers {
		f := fmt.Sprintf("%s.calibration_answers[%d]", p, i)
		rv, ok := revisions[a.RevisionID]
		switch {
		case !experts[a.ExpertID]:
			return inputErr(f+".expert_id", elicit.RuleUnknown, "no expert %d in the record", a.ExpertID)
		case !scored[a.QuestionID]:
			return inputErr(f+".question_id", elicit.RuleUnknown, "question %d is not among the basis's calibration questions", a.QuestionID)
		case seen[[2]int64{a.ExpertID, a.QuestionID}]:
			return inputErr(f, elicit.RuleDuplicate, "expert %d, question %d", a.ExpertID, a.QuestionID)
		case !ok:
			return inputErr(f+".revision_id", elicit.RuleUnknown, "no revision %d in the record", a.RevisionID)
		case rv.ExpertID != a.ExpertID || rv.QuestionID != a.QuestionID:
			return inputErr(f+".revision_id", elicit.RuleUnknown, "revision %d is expert %d's answer to question %d", rv.ID, rv.ExpertID, rv.QuestionID)
		case !slices.Equal(rv.Answer.Values, a.Quantiles):
			return inputErr(f+".quantiles", elicit.RuleUnknown, "%v, but revision %d saved %v", a.Quantiles, rv.ID, rv.Answer.Values)
		case len(a.Quantiles) != len(b.Probs):
			return inputErr(f+".quantiles", elicit.RuleLengthMatch, "%d probabilities, %d quantiles", len(b.Probs), len(a.Quantiles))
		}
		seen[[2]int64{a.ExpertID, a.QuestionID}] = true
	}
	for i, s := range b.Skipped {
		if _, ok := questions[s.ID]; !ok {
			return inputErr(fmt.Sprintf("%s.skipped[%d].question_id", p, i), elicit.RuleUnknown, "no question %d in the record", s.ID)
		}
		if err := input.CheckText(fmt.Sprintf("%s.skipped[%d].reason", p, i), s.Reason, input.MaxLongText, false); err != nil {
			return err
		}
	}
	total := 0.0
	for _, v := range wt.ByExpert {
		total += v
	}
	for i, e := range b.Experts {
		f := fmt.Sprintf("%s.experts[%d]", p, i)
		if !experts[e.ExpertID] {
			return inputErr(f+".expert_id", elicit.RuleUnknown, "no expert %d in the record", e.ExpertID)
		}
		if err := input.CheckText(f+".name", e.Name, input.MaxShortText, false); err != nil {
			return err
		}
		for _, x := range []struct {
			name string
			v    float64
		}{{"calibration", e.Calibration}, {"information", e.Information}, {"combined", e.Combined}, {"weight", e.Weight}} {
			if !finite(x.v) || x.v < 0 {
				return inputErr(f+"."+x.name, elicit.RuleNonNegative, "got %v", x.v)
			}
		}
		if e.Weight > 1 || e.Calibration > 1 {
			return inputErr(f, elicit.RuleUnitInterval, "calibration %v, weight %v", e.Calibration, e.Weight)
		}
		// The set's weights are the basis's, up to the set's scale.
		if total > 0 && math.Abs(wt.ByExpert[e.ExpertID]/total-e.Weight) > 1e-9 {
			return inputErr(f+".weight", elicit.RuleUnknown, "%v, but the set gives expert %d %v of %v", e.Weight, e.ExpertID, wt.ByExpert[e.ExpertID], total)
		}
	}
	for i, w := range b.Warnings {
		if err := input.CheckText(fmt.Sprintf("%s.warnings[%d].message", p, i), w.Message, input.MaxLongText, true); err != nil {
			return err
		}
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
