package workshop

import (
	"fmt"

	"github.com/parley-elicit/parley/elicit"
)

// BasisClassicalModel is the method of a WeightBasis: Cooke's classical
// model as elicit.ClassicalModel computes it.
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
// elicit.ClassicalModel on CalibrationAnswers, the true values and the bounds,
// with Overshoot and the cut-off Alpha fixed (or optimised, when
// AlphaRule is AlphaOptimised), gives Experts' scores and weights again.
type WeightBasis struct {
	Method    string  `json:"method"` // BasisClassicalModel
	Alpha     float64 `json:"alpha"`
	AlphaRule string  `json:"alpha_rule"` // AlphaOptimised or AlphaFixed
	// LogAlpha is ln α when α is a calibration score below the smallest
	// double, so that Alpha reads 0 (elicit.Scores).
	LogAlpha  *float64  `json:"log_alpha,omitempty"`
	Overshoot float64   `json:"overshoot"` // the k of the intrinsic range
	Probs     []float64 `json:"probs"`
	Answers   string    `json:"answers"` // which answers were scored (AnswersRule)
	// Questions are the scored calibration questions, in workshop order.
	Questions []BasisQuestion `json:"calibration_questions"`
	// CalibrationAnswers are the answers scored, question by question.
	CalibrationAnswers []BasisAnswer       `json:"calibration_answers"`
	Skipped            []SkippedQuestion   `json:"skipped"`
	Experts            []PerformanceExpert `json:"experts"`
	Pooled             elicit.PooledScore  `json:"pooled"`
	Warnings           []elicit.Warning    `json:"warnings"`
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
	// LogScale: the question's information was scored against the
	// log-uniform background (Question.LogScale).
	LogScale bool `json:"log_uniform_background,omitempty"`
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
		Method: BasisClassicalModel, Alpha: p.Alpha, LogAlpha: p.LogAlpha, AlphaRule: p.AlphaRule, Overshoot: elicit.DefaultOvershoot,
		Probs: append([]float64(nil), p.Probs...), Answers: p.Answers,
		Questions: []BasisQuestion{}, CalibrationAnswers: []BasisAnswer{},
		Skipped:  []SkippedQuestion{},
		Experts:  append([]PerformanceExpert(nil), p.Experts...),
		Pooled:   p.Pooled,
		Warnings: append([]elicit.Warning{}, p.Warnings...),
	}
	for _, sk := range p.Skipped {
		// The question itself is in the workshop; the basis names it.
		b.Skipped = append(b.Skipped, SkippedQuestion{ID: sk.ID, Reason: sk.Reason})
	}
	ids := map[string]int64{}
	for _, q := range set.Questions {
		tv := *q.TrueValue
		b.Questions = append(b.Questions, BasisQuestion{QuestionID: q.ID, TrueValue: &tv, Lower: q.Lower, Upper: q.Upper, LogScale: q.LogScale})
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

// ModelInput is the basis as elicit.ClassicalModel's input, with experts and
// questions keyed by SeedExpertKey and SeedQuestionKey, and the options
// that reproduce the cut-off. It fails when a true value is withheld.
func (b WeightBasis) ModelInput() ([]elicit.SeedAssessment, map[string]float64, map[string][2]float64, elicit.ModelOptions, error) {
	real := map[string]float64{}
	bounds := map[string][2]float64{}
	logs := map[string]bool{}
	for i, q := range b.Questions {
		if q.TrueValue == nil {
			return nil, nil, nil, elicit.ModelOptions{}, inputErr(fmt.Sprintf("calibration_questions[%d].true_value", i), elicit.RuleRequired,
				"question %d's true value is withheld until it is revealed", q.QuestionID)
		}
		k := SeedQuestionKey(q.QuestionID)
		real[k], bounds[k] = *q.TrueValue, [2]float64{q.Lower, q.Upper}
		if q.LogScale {
			logs[k] = true
		}
	}
	as := make([]elicit.SeedAssessment, len(b.CalibrationAnswers))
	for i, a := range b.CalibrationAnswers {
		as[i] = elicit.SeedAssessment{Expert: SeedExpertKey(a.ExpertID), Question: SeedQuestionKey(a.QuestionID), Probs: b.Probs, Quantiles: a.Quantiles}
	}
	opt := elicit.ModelOptions{Overshoot: b.Overshoot, LogScale: logs}
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

// Withheld is b as an export record shows it: the true value of every
// question in b that is not revealed in questions is left out.
func (b WeightBasis) Withheld(questions map[int64]Question) WeightBasis {
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
