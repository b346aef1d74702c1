package web

import (
	"context"

	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// The record fingerprint (package fingerprint) is shown where the room
// can note it: on the decision log (now, and after each round's close),
// on the room view once a round is closed, and in the printed report.
// The value shown is the first 64 bits of the chain's SHA-256 value, as
// 4 groups of 4 hex digits (fingerprint.Value.Short); parley fingerprint
// --check finds a noted one in an exported record.

// snapshot reads everything stored about ws, in one read transaction
// where the store can (store.DB does).
func (s *Server) snapshot(ctx context.Context, ws workshop.Workshop) (workshop.Snapshot, error) {
	if rs, ok := s.store.(recordSourcer); ok {
		return rs.Source(ctx, ws.ID)
	}
	d, err := s.readWorkshopData(ctx, ws)
	if err != nil {
		return workshop.Snapshot{}, err
	}
	evs, err := s.store.Events(ctx, ws.ID)
	if err != nil {
		return workshop.Snapshot{}, err
	}
	data, err := s.store.StudyData(ctx, ws.ID)
	if err != nil {
		return workshop.Snapshot{}, err
	}
	return workshop.Snapshot{Workshop: ws, Questions: d.Questions, Experts: d.Experts,
		Revisions: d.Revisions, Weights: d.Weights, Priors: d.Priors, Data: data, Events: evs}, nil
}

// chainOf is the fingerprint chain of a workshop's stored facts: the
// same chain its exported record carries.
func chainOf(src workshop.Snapshot) fingerprint.Chain {
	return fingerprint.Of(fingerprint.Facts{Workshop: src.Workshop, Revisions: src.Revisions, WeightSets: src.WeightHistory,
		Priors: src.Priors, Data: src.Data, Events: src.Events})
}
