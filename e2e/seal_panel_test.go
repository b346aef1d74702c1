package e2e

import (
	"context"
	"fmt"
	"strconv"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/web"
)

// sealPanel is an invented workshop of one question, the first-year
// failure share of a new pump seal, answered by n invented engineers.
type sealPanel struct {
	title  string                   // the workshop's title
	set    func(*workshop.Question) // changes the question before it is saved (nil: as it is)
	median func(i int) float64      // expert i's median; the 5% and 95% are half of it and 1.8 times it
	reason string                   // expert i's reason, a format given the site's number i+1
}

// add saves the panel in s: the workshop, its question, n experts (each
// with a token), and every expert's answer with its reason and its kept
// fit.
func (p sealPanel) add(t *testing.T, s *site, n int) (workshop.Workshop, workshop.Question) {
	t.Helper()
	ctx := context.Background()
	ws := workshop.Workshop{Title: p.title, Invented: true,
		Purpose: "Invented: a prior for the first-year failure share of a new pump seal."}
	if err := s.DB.CreateWorkshop(ctx, &ws); err != nil {
		t.Fatal(err)
	}
	q := workshop.Question{WorkshopID: ws.ID, Wording: "What share of the new seals will fail in their first year?",
		Quantity: "first-year failure share", Units: "proportion of seals", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: workshop.ProbsDefault}
	if p.set != nil {
		p.set(&q)
	}
	if err := s.DB.AddQuestion(ctx, &q); err != nil {
		t.Fatal(err)
	}
	for i := 0; i < n; i++ {
		_, hash, err := web.NewExpertToken()
		if err != nil {
			t.Fatal(err)
		}
		e := workshop.Expert{WorkshopID: ws.ID, Name: fmt.Sprintf("Invented engineer %02d", i+1)}
		if err := s.DB.AddExpert(ctx, &e, hash); err != nil {
			t.Fatal(err)
		}
		m := p.median(i)
		rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID, Answer: workshop.Answer{Values: []float64{m / 2, m, 1.8 * m}},
			Reason: fmt.Sprintf(p.reason, i+1)}
		f, err := q.Fit(rv.Answer)
		if err != nil {
			t.Fatal(err)
		}
		rv.Kept = &f
		if err := s.DB.SaveRevision(ctx, &rv); err != nil {
			t.Fatal(err)
		}
	}
	return ws, q
}

// roomAfterRoundOne closes round 1 of ws, with an invented reason, as a
// panel stands when the room discusses it, and returns the address of q's
// room view.
func roomAfterRoundOne(t *testing.T, s *site, ws workshop.Workshop, q workshop.Question) string {
	t.Helper()
	if err := s.DB.SetRound(context.Background(), ws.ID, 1, false, "Discussion of round 1 (invented)."); err != nil {
		t.Fatalf("close round 1: %v", err)
	}
	return s.URL + "/w/" + strconv.FormatInt(ws.ID, 10) + "/q/" + strconv.FormatInt(q.ID, 10) + "/room"
}
