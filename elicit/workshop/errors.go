package workshop

import (
	"errors"
	"fmt"

	"github.com/parley-elicit/parley/elicit"
)

// Sentinel errors of the workshop domain, returned (wrapped) by storage.
var (
	ErrNotFound    = errors.New("not found")
	ErrRoundClosed = errors.New("the round is closed")
	// ErrAnswersFrozen is returned when an answer is saved to a
	// calibration question whose true value has been revealed.
	ErrAnswersFrozen = errors.New("the true value has been revealed, so the answers to this question are final")
	// ErrRoundStillOpen is returned when a prior is agreed while the
	// round is open and the facilitator has not confirmed it.
	ErrRoundStillOpen = errors.New("the round is still open, so answers may still change")
	// ErrRevoked is returned when a revoked expert's answer is saved.
	ErrRevoked = errors.New("the expert's access has been revoked")
	// ErrRetired is returned when an answer is saved to a retired question.
	ErrRetired = errors.New("the question has been retired")
	// ErrQuestionChanged is returned when an answer is saved that does
	// not answer its question as the question now stands (Question.StillAnswers):
	// the question was corrected after the answer was checked against it.
	ErrQuestionChanged = errors.New("the question was corrected after the answer was checked against it")
	// ErrNoAgreedPrior is returned when data are recorded for a question
	// that has no agreed prior to update.
	ErrNoAgreedPrior = errors.New("the question has no agreed prior yet")
	// ErrNoData is returned when a question has no recorded data to
	// update its prior with.
	ErrNoData = errors.New("no data have been recorded for the question")
)

// RevisionRefused is storage's refusal of one of several revisions saved
// together (all or none): Index is its place in the list, Err why (one of
// the sentinel errors above, or an input rule). Its text is
// "revisions[Index]: " and Err's.
type RevisionRefused struct {
	Index int
	Err   error
}

func (e *RevisionRefused) Error() string { return fmt.Sprintf("revisions[%d]: %v", e.Index, e.Err) }
func (e *RevisionRefused) Unwrap() error { return e.Err }

// inputErr is an *elicit.InputError for field with a formatted detail.
func inputErr(field string, rule elicit.Rule, format string, args ...any) *elicit.InputError {
	return &elicit.InputError{Field: field, Rule: rule, Detail: fmt.Sprintf(format, args...)}
}
