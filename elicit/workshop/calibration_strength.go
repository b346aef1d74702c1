package workshop

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/parley-elicit/parley/elicit"
)

// The warnings about how much a performance weighting can be trusted.
const (
	// WarnFewCalibrationQuestions: fewer than RecommendedCalibrationQuestions
	// calibration questions were scored.
	WarnFewCalibrationQuestions elicit.WarningCode = "few_calibration_questions"
	// WarnOneExpertDominates: one expert has more than DominantWeight of
	// the weight.
	WarnOneExpertDominates elicit.WarningCode = "one_expert_dominates"
	// WarnUnequalCalibrationAnswers: the experts answered different
	// numbers of the scored calibration questions.
	WarnUnequalCalibrationAnswers elicit.WarningCode = "unequal_calibration_answers"
)

// RecommendedCalibrationQuestions is about how many calibration questions
// Cooke & Goossens (2008, "TU Delft expert judgment data base", Reliab.
// Eng. Syst. Saf. 93: 657–674) recommend for the classical model (from
// memory, as issue 10 cites the paper; not checked against the paper
// here). With fewer, a calibration score has little power to tell a
// well-calibrated expert from a lucky one: with N questions and three
// quantiles the score takes only a handful of values.
const RecommendedCalibrationQuestions = 10

// DominantWeight is the share of the weight above which one expert is
// said to dominate a weighting: the pool is then in effect that expert's
// judgement (common practice, no source for the exact figure).
const DominantWeight = 0.9

// CalibrationWarnings says where a performance weighting rests on weak
// ground: fewer than RecommendedCalibrationQuestions scored questions; one
// expert with more than DominantWeight of the weight; experts who answered
// different numbers of the scored questions (each named with their
// count). scored is the number of calibration questions scored; experts
// are the active experts with their normalised weights, in roster order.
// It is the one place these rules live: the calibration page, the
// question panel, the report and the record all show its result.
func CalibrationWarnings(scored int, experts []PerformanceExpert) []elicit.Warning {
	out := []elicit.Warning{}
	if scored < RecommendedCalibrationQuestions {
		out = append(out, elicit.Warning{Code: WarnFewCalibrationQuestions, Message: fmt.Sprintf(
			"Only %d calibration %s scored; Cooke & Goossens (2008) recommend about %d. "+
				"With so few, a calibration score tells a well-calibrated expert from a lucky one only weakly, "+
				"and one question can move the weights a long way.",
			scored, plural(scored, "question was", "questions were"), RecommendedCalibrationQuestions)})
	}
	for _, e := range experts {
		if e.Weight > DominantWeight && len(experts) == 1 {
			out = append(out, elicit.Warning{Code: WarnOneExpertDominates, Message: fmt.Sprintf(
				"%s is the only expert scored, so the performance-weighted pool is %s's judgement alone: "+
					"the scores weigh no one against anyone.", e.Name, e.Name)})
			continue
		}
		if e.Weight > DominantWeight {
			out = append(out, elicit.Warning{Code: WarnOneExpertDominates, Message: fmt.Sprintf(
				"%s has %s of the weight (more than %s): the performance-weighted pool is in effect %s's judgement alone, "+
					"and the other experts' answers barely count.",
				e.Name, percent(e.Weight), percent(DominantWeight), e.Name)})
		}
	}
	if len(experts) > 1 {
		unequal := false
		counts := make([]string, len(experts))
		for i, e := range experts {
			counts[i] = e.Name + " " + strconv.Itoa(e.Answered)
			unequal = unequal || e.Answered != experts[0].Answered
		}
		if unequal {
			out = append(out, elicit.Warning{Code: WarnUnequalCalibrationAnswers, Message: fmt.Sprintf(
				"The experts answered different numbers of the %d scored calibration questions (%s). "+
					"A score on fewer questions is weaker evidence, so the experts are not judged on equal terms.",
				scored, strings.Join(counts, ", "))})
		}
	}
	return out
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// percent writes a share of the weight as a percentage to three
// significant figures (90.4%, as the scores table writes it), or as many
// more as keep it on its own side of DominantWeight and short of 100%
// when it is short of all the weight (elicit.SideDigits): 0.9004 is
// "90.04%", not "90%" beside "more than 90%".
func percent(x float64) string {
	p := 100 * x
	digits := elicit.SideDigits(p, 100*DominantWeight, 3)
	if x < 1 {
		digits = max(digits, elicit.SideDigits(p, 100, 3))
	}
	return strconv.FormatFloat(p, 'g', digits, 64) + "%"
}
