package record

import (
	"fmt"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// recordPerformance is the record's performance section: scored only on
// revealed true values, with the cut-off of the weights in force. note
// says why there is no section.
func recordPerformance(src workshop.Snapshot) (*workshop.Performance, string) {
	set := workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true)
	switch {
	case len(set.Questions) == 0 && len(set.Pending) == 0:
		if len(set.Skipped) == 0 {
			return nil, ""
		}
		return nil, "no calibration question can be scored: " + skippedText(set.Skipped)
	case len(set.Pending) > 0:
		return nil, fmt.Sprintf("scores are shown once every scored calibration question's true value is revealed (%d not yet)", len(set.Pending))
	}
	p, err := workshop.PerformanceInForce(set, src.Weights)
	if err != nil {
		return nil, "the classical model could not score the panel: " + err.Error()
	}
	var alpha *float64
	if p.AlphaRule == workshop.AlphaFixed {
		alpha = &p.Alpha
	}
	if rb, err := workshop.PerformanceRobustness(set, src.Questions, src.Experts, src.Revisions, alpha); err == nil {
		p.Robustness = &rb
	}
	return &p, ""
}

func skippedText(s []workshop.SkippedQuestion) string {
	out := ""
	for i, q := range s {
		if i > 0 {
			out += "; "
		}
		out += fmt.Sprintf("Q%d %s", q.Question.Position, q.Reason)
	}
	return out
}
