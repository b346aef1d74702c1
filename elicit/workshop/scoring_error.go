package workshop

import (
	"errors"
	"regexp"
	"strconv"

	"github.com/parley-elicit/parley/elicit"
)

// ScoringError is the classical model's refusal of a calibration set,
// placed in the workshop: the calibration question and, where the rule is
// about one answer, the expert, the revision and the quantile that broke
// it. elicit names them by the set's keys and indexes
// (assessments[3].quantiles[2], questions["q7"]), which mean nothing to a
// facilitator. It unwraps to the *elicit.InputError.
type ScoringError struct {
	QuestionID int64 // 0 when the rule is about the whole panel
	ExpertID   int64 // 0 when the rule is about the question, not one answer
	RevisionID int64 // the scored revision of ExpertID's answer
	Quantile   int   // index into the answer's values; -1 when none
	Err        *elicit.InputError
}

func (e *ScoringError) Error() string { return e.Err.Error() }
func (e *ScoringError) Unwrap() error { return e.Err }

var (
	assessmentField = regexp.MustCompile(`^assessments\[(\d+)\](?:\.quantiles\[(\d+)\])?`)
	questionField   = regexp.MustCompile(`^\w+\["(q\d+)"\]`)
)

// placeError returns err as a *ScoringError when it is an input error
// whose field points into set (an assessment or a question by its key);
// any other error comes back as it is.
func (c CalibrationSet) placeError(err error) error {
	var ie *elicit.InputError
	if !errors.As(err, &ie) {
		return err
	}
	se := &ScoringError{Quantile: -1, Err: ie}
	if m := assessmentField.FindStringSubmatch(ie.Field); m != nil {
		i, _ := strconv.Atoi(m[1])
		if i >= len(c.Assessments) {
			return err
		}
		a := c.Assessments[i]
		se.QuestionID, se.ExpertID = keyID(a.Question), keyID(a.Expert)
		if i < len(c.RevisionIDs) {
			se.RevisionID = c.RevisionIDs[i]
		}
		if m[2] != "" {
			se.Quantile, _ = strconv.Atoi(m[2])
		}
		return se
	}
	if m := questionField.FindStringSubmatch(ie.Field); m != nil {
		se.QuestionID = keyID(m[1])
		return se
	}
	return err
}

// keyID is the ID in a SeedExpertKey or SeedQuestionKey (0 if none).
func keyID(key string) int64 {
	if len(key) < 2 {
		return 0
	}
	id, err := strconv.ParseInt(key[1:], 10, 64)
	if err != nil {
		return 0
	}
	return id
}
