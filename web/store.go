package web

import (
	"context"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// Store is what the web layer needs from persistence. store.DB implements
// it; handlers never see SQL. Lookups of a missing row return an error
// for which errors.Is(err, workshop.ErrNotFound) holds; a save outside an
// open round returns one for which errors.Is(err, workshop.ErrRoundClosed).
type Store interface {
	// Workshops
	CreateWorkshop(ctx context.Context, w *workshop.Workshop) error // sets ID, Created, Round=1, Open=true; records EventWorkshopCreated
	UpdateWorkshop(ctx context.Context, w workshop.Workshop) error  // title, purpose, decision, notes only
	Workshop(ctx context.Context, id int64) (workshop.Workshop, error)
	Workshops(ctx context.Context) ([]workshop.Workshop, error)
	// PanelSalt is the workshop's secret salt for the order of its
	// anonymised round feedback.
	PanelSalt(ctx context.Context, workshopID int64) ([]byte, error)
	// SetRound closes the current round (open=false) or opens round n
	// (open=true, n = current+1), recording the event with its reason in
	// the same transaction.
	SetRound(ctx context.Context, workshopID int64, round int, open bool, reason string) error
	// ReopenRound opens the last closed round again (workshop.Workshop.CheckReopen).
	ReopenRound(ctx context.Context, workshopID int64, reason string) error
	// SetArchived archives a workshop (closing its round) or brings it back.
	SetArchived(ctx context.Context, workshopID int64, archived bool, reason string) error
	// DeleteWorkshop removes a workshop with no answers and no agreed
	// priors, leaving its title, time and reason in DeletedWorkshops.
	DeleteWorkshop(ctx context.Context, workshopID int64, reason string) error
	DeletedWorkshops(ctx context.Context) ([]workshop.DeletedWorkshop, error)

	// Questions
	AddQuestion(ctx context.Context, q *workshop.Question) error // sets ID, Position; records EventQuestionAdded
	Question(ctx context.Context, id int64) (workshop.Question, error)
	Questions(ctx context.Context, workshopID int64) ([]workshop.Question, error)
	// SetTrueValue stores or reveals a calibration question's true value,
	// recording EventTruthRevealed when reveal is true. The first reveal
	// freezes the question's answers.
	SetTrueValue(ctx context.Context, questionID int64, value float64, reveal bool, reason string) error
	// SetLogScale sets whether a calibration question's information is
	// scored on the log scale, recording the change with its reason.
	SetLogScale(ctx context.Context, questionID int64, on bool, reason string) error
	// Corrections, each with its event and reason.
	Recorded(ctx context.Context, questionID int64) (workshop.Recorded, error)
	EditQuestion(ctx context.Context, q workshop.Question, reason string) error // workshop.Question.CheckCorrection
	SetQuestionRetired(ctx context.Context, questionID int64, retired bool, reason string) error

	// Experts and their access tokens (only hashes are stored).
	AddExpert(ctx context.Context, e *workshop.Expert, tokenHash []byte) error // records EventExpertAdded
	Expert(ctx context.Context, id int64) (workshop.Expert, error)
	Experts(ctx context.Context, workshopID int64) ([]workshop.Expert, error)
	ExpertByToken(ctx context.Context, tokenHash []byte) (workshop.Expert, error) // revoked experts are not found
	ReissueToken(ctx context.Context, expertID int64, tokenHash []byte, reason string) error
	RevokeExpert(ctx context.Context, expertID int64, reason string) error
	RevokedExperts(ctx context.Context, workshopID int64) ([]int64, error) // ids, in order

	// Revisions: append-only. SaveRevision fails with workshop.ErrRoundClosed when
	// the workshop's round is not open; it sets ID, Round and At.
	SaveRevision(ctx context.Context, r *workshop.Revision) error
	// SaveRevisions saves several under SaveRevision's rules, all or none;
	// an error names the first refused (*workshop.RevisionRefused, "revisions[i]: ...").
	SaveRevisions(ctx context.Context, rs []workshop.Revision) error
	// SaveImportedRevisions is SaveRevisions for an answer sheet's rows,
	// recording workshop.EventAnswersImported with imp in the same
	// transaction.
	SaveImportedRevisions(ctx context.Context, workshopID int64, rs []workshop.Revision, imp workshop.SheetImport) error
	Revisions(ctx context.Context, workshopID int64) ([]workshop.Revision, error) // oldest first
	// Narrower reads for the expert's pages, which are opened many times a
	// round: one expert's revisions (all questions, or one), and each
	// expert's latest revision of one question saved in round `through` or
	// before (workshop.Current with workshop.Through). All ordered by revision id.
	ExpertRevisions(ctx context.Context, expertID int64) ([]workshop.Revision, error)
	QuestionExpertRevisions(ctx context.Context, questionID, expertID int64) ([]workshop.Revision, error)
	LatestRevisions(ctx context.Context, questionID int64, through int) ([]workshop.Revision, error)
	// ExpertHistory is one expert's revisions with the withdrawn ones
	// (Revision.Withdrawn), for the facilitator's pages of one expert.
	ExpertHistory(ctx context.Context, expertID int64) ([]workshop.Revision, error)
	// SetReasonWithheld withholds a revision's reason from the round
	// feedback and the room view, or shows it again.
	SetReasonWithheld(ctx context.Context, revisionID int64, withheld bool, reason string) error
	// WithdrawRevision withdraws a revision of the workshop, with its
	// reason (workshop.CheckWithdrawal): it stays in the record, marked,
	// and is nobody's current answer; a revision of another workshop is
	// not found.
	WithdrawRevision(ctx context.Context, workshopID, revisionID int64, reason string) error

	// Facilitator decisions.
	SetWeights(ctx context.Context, w *workshop.Weights) error                          // records EventWeightsSet
	Weights(ctx context.Context, workshopID int64) (workshop.Weights, error)            // equal when never set
	WeightHistory(ctx context.Context, workshopID int64) ([]workshop.Weights, error)    // every set applied, oldest first
	AgreePrior(ctx context.Context, p *workshop.AgreedPrior) error                      // records EventPriorAgreed
	AgreedPriors(ctx context.Context, workshopID int64) ([]workshop.AgreedPrior, error) // oldest first
	Events(ctx context.Context, workshopID int64) ([]workshop.Event, error)             // oldest first
	// Study data: batches of observed data against a question's agreed
	// prior, append-only, with EventDataRecorded.
	RecordData(ctx context.Context, d *workshop.StudyData) error
	StudyData(ctx context.Context, workshopID int64) ([]workshop.StudyData, error) // oldest first

	// Facilitator sign-in. The secret's hash is spent by its one sign-in.
	FacilitatorHash(ctx context.Context) ([]byte, error)         // nil, nil when none set or it was spent
	SetFacilitatorHash(ctx context.Context, hash []byte) error   // ends every session
	IssueFacilitatorHash(ctx context.Context, hash []byte) error // leaves sessions open
	// UseFacilitatorHash deletes hash if it is still the stored one and
	// stores the session in the same transaction (purging expired ones);
	// false when hash was spent or replaced.
	UseFacilitatorHash(ctx context.Context, hash, sessionHash []byte, expires, now time.Time) (bool, error)
	SessionValid(ctx context.Context, tokenHash []byte, now time.Time) (bool, error)
	EndSession(ctx context.Context, tokenHash []byte) error // sign-out
}
