package elicit

import (
	"fmt"
	"math"
)

// BasisClassicalModel is the method of a WeightBasis: Cooke's classical
// model as ClassicalModel computes it.
const BasisClassicalModel = "classical_model"

// WeightBasis is what a set of performance weights was made from, kept
// with the set when the facilitator applies it, so that the weights, and
// every pool made with them, can be reproduced after the answers, the
// panel or the true values have moved on. It holds the classical model's
// whole input (the scored calibration questions with their true values
// and bounds, and the calibration answers used, each with the revision it
// came from) and its output (each expert's scores and weight, the
// cut-off and how it was chosen, the performance-weighted pool's scores,
// and the warnings about the weighting's strength).
//
// ClassicalModel on CalibrationAnswers, the true values and the bounds,
// with Overshoot and the cut-off Alpha fixed (or optimised, when
// AlphaRule is AlphaOptimised), gives Experts' scores and weights again.
type WeightBasis struct {
	Method    string    `json:"method"` // BasisClassicalModel
	Alpha     float64   `json:"alpha"`
	AlphaRule string    `json:"alpha_rule"` // AlphaOptimised or AlphaFixed
	Overshoot float64   `json:"overshoot"`  // the k of the intrinsic range
	Probs     []float64 `json:"probs"`
	Answers   string    `json:"answers"` // which answers were scored (AnswersRule)
	// Questions are the scored calibration questions, in workshop order.
	Questions []BasisQuestion `json:"calibration_questions"`
	// CalibrationAnswers are the answers scored, question by question.
	CalibrationAnswers []BasisAnswer       `json:"calibration_answers"`
	Skipped            []SkippedQuestion   `json:"skipped"`
	Experts            []PerformanceExpert `json:"experts"`
	Pooled             PooledScore         `json:"pooled"`
	Warnings           []Warning           `json:"warnings"`
}

// BasisQuestion is one scored calibration question of a WeightBasis. In
// an export record TrueValue is left out (TrueValueWithheld) until the
// question's true value is revealed, as it is on the question itself.
type BasisQuestion struct {
	QuestionID        int64    `json:"question_id"`
	TrueValue         *float64 `json:"true_value,omitempty"`
	TrueValueWithheld bool     `json:"true_value_withheld,omitempty"`
	Lower             float64  `json:"lower"`
	Upper             float64  `json:"upper"`
}

// BasisAnswer is one calibration answer a WeightBasis scored: the
// expert's quantiles at the basis's probabilities, and the revision they
// were saved in.
type BasisAnswer struct {
	ExpertID   int64     `json:"expert_id"`
	QuestionID int64     `json:"question_id"`
	RevisionID int64     `json:"revision_id"`
	Quantiles  []float64 `json:"quantiles"`
}

// NewWeightBasis is the basis of the performance weights p, which
// ScorePerformance computed from set.
func NewWeightBasis(set CalibrationSet, p Performance) WeightBasis {
	b := WeightBasis{
		Method: BasisClassicalModel, Alpha: p.Alpha, AlphaRule: p.AlphaRule, Overshoot: DefaultOvershoot,
		Probs: append([]float64(nil), p.Probs...), Answers: p.Answers,
		Questions: []BasisQuestion{}, CalibrationAnswers: []BasisAnswer{},
		Skipped:  []SkippedQuestion{},
		Experts:  append([]PerformanceExpert(nil), p.Experts...),
		Pooled:   p.Pooled,
		Warnings: append([]Warning{}, p.Warnings...),
	}
	for _, sk := range p.Skipped {
		// The question itself is in the workshop; the basis names it.
		b.Skipped = append(b.Skipped, SkippedQuestion{ID: sk.ID, Reason: sk.Reason})
	}
	ids := map[string]int64{}
	for _, q := range set.Questions {
		tv := *q.TrueValue
		b.Questions = append(b.Questions, BasisQuestion{QuestionID: q.ID, TrueValue: &tv, Lower: q.Lower, Upper: q.Upper})
		ids[SeedQuestionKey(q.ID)] = q.ID
	}
	for _, e := range set.Experts {
		ids[SeedExpertKey(e.ID)] = e.ID
	}
	for i, a := range set.Assessments {
		b.CalibrationAnswers = append(b.CalibrationAnswers, BasisAnswer{
			ExpertID: ids[a.Expert], QuestionID: ids[a.Question], RevisionID: set.RevisionIDs[i],
			Quantiles: append([]float64(nil), a.Quantiles...),
		})
	}
	return b
}

// ModelInput is the basis as ClassicalModel's input, with experts and
// questions keyed by SeedExpertKey and SeedQuestionKey, and the options
// that reproduce the cut-off. It fails when a true value is withheld.
func (b WeightBasis) ModelInput() ([]SeedAssessment, map[string]float64, map[string][2]float64, ModelOptions, error) {
	real := map[string]float64{}
	bounds := map[string][2]float64{}
	for i, q := range b.Questions {
		if q.TrueValue == nil {
			return nil, nil, nil, ModelOptions{}, inputErr(fmt.Sprintf("calibration_questions[%d].true_value", i), RuleRequired,
				"question %d's true value is withheld until it is revealed", q.QuestionID)
		}
		k := SeedQuestionKey(q.QuestionID)
		real[k], bounds[k] = *q.TrueValue, [2]float64{q.Lower, q.Upper}
	}
	as := make([]SeedAssessment, len(b.CalibrationAnswers))
	for i, a := range b.CalibrationAnswers {
		as[i] = SeedAssessment{Expert: SeedExpertKey(a.ExpertID), Question: SeedQuestionKey(a.QuestionID), Probs: b.Probs, Quantiles: a.Quantiles}
	}
	opt := ModelOptions{Overshoot: b.Overshoot}
	if b.AlphaRule == AlphaFixed {
		a := b.Alpha
		opt.Alpha = &a
	}
	return as, real, bounds, opt, nil
}

// WeightsByExpert are the basis's weights by expert ID.
func (b WeightBasis) WeightsByExpert() map[int64]float64 {
	m := make(map[int64]float64, len(b.Experts))
	for _, e := range b.Experts {
		m[e.ExpertID] = e.Weight
	}
	return m
}

// withheld is b as an export record shows it: the true value of every
// question in b that is not revealed in questions is left out.
func (b WeightBasis) withheld(questions map[int64]Question) WeightBasis {
	out := b
	out.Questions = make([]BasisQuestion, len(b.Questions))
	for i, q := range b.Questions {
		if !questions[q.QuestionID].Revealed {
			q.TrueValue, q.TrueValueWithheld = nil, true
		}
		out.Questions[i] = q
	}
	return out
}

// checkBasis checks a weight set's basis as an import receives it: every
// reference points at the record's experts, questions and revisions, an
// answer's quantiles are those its revision saved, and the set's weights
// are the basis's. The scores themselves are the record of what was done
// and are not recomputed here.
func checkBasis(p string, b WeightBasis, wt Weights, r Record, experts map[int64]bool, questions map[int64]Question) error {
	if wt.Scheme != WeightsPerformance {
		return inputErr(p, RuleUnknown, "only performance weights have a basis, not %s weights", wt.Scheme)
	}
	if b.Method != BasisClassicalModel {
		return inputErr(p+".method", RuleUnknown, "%q", b.Method)
	}
	if b.AlphaRule != AlphaOptimised && b.AlphaRule != AlphaFixed {
		return inputErr(p+".alpha_rule", RuleUnknown, "%q", b.AlphaRule)
	}
	if math.IsNaN(b.Alpha) || b.Alpha < 0 || b.Alpha > 1 {
		return inputErr(p+".alpha", RuleUnitInterval, "got %v", b.Alpha)
	}
	if math.IsNaN(b.Overshoot) || math.IsInf(b.Overshoot, 0) || b.Overshoot < 0 {
		return inputErr(p+".overshoot", RuleNonNegative, "got %v", b.Overshoot)
	}
	if len(b.Probs) == 0 {
		return inputErr(p+".probs", RuleCount, "need at least 1 probability, got 0")
	}
	if err := CheckProbs(p+".probs", b.Probs); err != nil {
		return err
	}
	if err := checkText(p+".answers", b.Answers, false, maxText); err != nil {
		return err
	}
	scored := map[int64]bool{}
	for i, q := range b.Questions {
		f := fmt.Sprintf("%s.calibration_questions[%d]", p, i)
		rq, ok := questions[q.QuestionID]
		switch {
		case !ok:
			return inputErr(f+".question_id", RuleUnknown, "no question %d in the record", q.QuestionID)
		case !rq.Calibration:
			return inputErr(f+".question_id", RuleUnknown, "question %d is not a calibration question", q.QuestionID)
		case scored[q.QuestionID]:
			return inputErr(f+".question_id", RuleDuplicate, "question %d", q.QuestionID)
		}
		if !finite(q.Lower) || !finite(q.Upper) || !(q.Lower < q.Upper) {
			return inputErr(f+".lower", RuleBoundsOrder, "got [%v, %v]", q.Lower, q.Upper)
		}
		if q.TrueValue != nil {
			if !rq.Revealed {
				return inputErr(f+".true_value", RuleUnknown, "question %d's true value is not revealed in the record", q.QuestionID)
			}
			if v := *q.TrueValue; !finite(v) || v < q.Lower || v > q.Upper {
				return inputErr(f+".true_value", RuleInRange, "%v outside [%v, %v]", v, q.Lower, q.Upper)
			}
		}
		scored[q.QuestionID] = true
	}
	revisions := map[int64]RecordRevision{}
	for _, rv := range r.Revisions {
		revisions[rv.ID] = rv
	}
	seen := map[[2]int64]bool{}
	for i, a := range b.CalibrationAnswers {
		f := fmt.Sprintf("%s.calibration_answers[%d]", p, i)
		rv, ok := revisions[a.RevisionID]
		switch {
		case !experts[a.ExpertID]:
			return inputErr(f+".expert_id", RuleUnknown, "no expert %d in the record", a.ExpertID)
		case !scored[a.QuestionID]:
			return inputErr(f+".question_id", RuleUnknown, "question %d is not among the basis's calibration questions", a.QuestionID)
		case seen[[2]int64{a.ExpertID, a.QuestionID}]:
			return inputErr(f, RuleDuplicate, "expert %d, question %d", a.ExpertID, a.QuestionID)
		case !ok:
			return inputErr(f+".revision_id", RuleUnknown, "no revision %d in the record", a.RevisionID)
		case rv.ExpertID != a.ExpertID || rv.QuestionID != a.QuestionID:
			return inputErr(f+".revision_id", RuleUnknown, "revision %d is expert %d's answer to question %d", rv.ID, rv.ExpertID, rv.QuestionID)
		case !sameFloats(rv.Answer.Values, a.Quantiles):
			return inputErr(f+".quantiles", RuleUnknown, "%v, but revision %d saved %v", a.Quantiles, rv.ID, rv.Answer.Values)
		case len(a.Quantiles) != len(b.Probs):
			return inputErr(f+".quantiles", RuleLengthMatch, "%d probabilities, %d quantiles", len(b.Probs), len(a.Quantiles))
		}
		seen[[2]int64{a.ExpertID, a.QuestionID}] = true
	}
	for i, s := range b.Skipped {
		if _, ok := questions[s.ID]; !ok {
			return inputErr(fmt.Sprintf("%s.skipped[%d].question_id", p, i), RuleUnknown, "no question %d in the record", s.ID)
		}
	}
	total := 0.0
	for _, v := range wt.ByExpert {
		total += v
	}
	for i, e := range b.Experts {
		f := fmt.Sprintf("%s.experts[%d]", p, i)
		if !experts[e.ExpertID] {
			return inputErr(f+".expert_id", RuleUnknown, "no expert %d in the record", e.ExpertID)
		}
		for _, x := range []struct {
			name string
			v    float64
		}{{"calibration", e.Calibration}, {"information", e.Information}, {"combined", e.Combined}, {"weight", e.Weight}} {
			if !finite(x.v) || x.v < 0 {
				return inputErr(f+"."+x.name, RuleNonNegative, "got %v", x.v)
			}
		}
		if e.Weight > 1 || e.Calibration > 1 {
			return inputErr(f, RuleUnitInterval, "calibration %v, weight %v", e.Calibration, e.Weight)
		}
		// The set's weights are the basis's, up to the set's scale.
		if total > 0 && math.Abs(wt.ByExpert[e.ExpertID]/total-e.Weight) > 1e-9 {
			return inputErr(f+".weight", RuleUnknown, "%v, but the set gives expert %d %v of %v", e.Weight, e.ExpertID, wt.ByExpert[e.ExpertID], total)
		}
	}
	for i, w := range b.Warnings {
		if err := checkText(fmt.Sprintf("%s.warnings[%d].message", p, i), w.Message, true, maxText); err != nil {
			return err
		}
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
