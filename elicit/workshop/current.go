package workshop

// Key names one expert's answers to one question.
type Key struct {
	Question, Expert int64
}

// Current picks each expert's current revision on each question from
// revs: the one with the highest id among those keep accepts (nil accepts
// every one) that has not been withdrawn. Revisions are never changed or
// deleted, so the latest is the one saved last, and ids rise as revisions
// are saved; a withdrawn revision is nobody's answer, so the expert's
// earlier one, if any, is current again. It is the one rule
// for "an expert's current answer": the panel (PanelState), the round
// feedback, the record and the calibration scores all read revisions
// through it; storage reads the same with a query of its own.
func Current(revs []Revision, keep func(Revision) bool) map[Key]Revision {
	out := make(map[Key]Revision)
	for _, rv := range revs {
		if rv.Withdrawn || (keep != nil && !keep(rv)) {
			continue
		}
		k := Key{rv.QuestionID, rv.ExpertID}
		if cur, ok := out[k]; !ok || rv.ID > cur.ID {
			out[k] = rv
		}
	}
	return out
}

// Through accepts the revisions saved in round `round` or before; round 0
// accepts every round.
func Through(round int) func(Revision) bool {
	return func(rv Revision) bool { return round == 0 || rv.Round <= round }
}
