package store

import (
	"bytes"
	"context"
	"database/sql"
	"errors"
	"sync"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A write that waits for the writer is stamped when it writes, not when it
// starts waiting. The record's fingerprint chains facts by their time; a
// save stamped before another fact that committed first was chained
// before it, so the chain's value after that fact, shown meanwhile (the
// decision log's "now", a report printed then), was no longer the
// chain's value anywhere once the save committed: the value noted said
// the record had been changed when it had not. Here the writer is held by
// a transaction that logs an event; each kind of fact is written
// meanwhile, and must come after that event in time (and so in the chain).
func TestWritesAreStampedInTheirTurn(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	r0 := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
	must(t, db.SaveRevision(ctx, &r0))
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: elicit.Unit(elicit.Beta{Alpha: 4, Beta: 9}), Rationale: "the pool", RoundOpen: true}))
	for _, c := range []struct {
		name  string
		write func() (time.Time, error)
	}{
		{"a save", func() (time.Time, error) {
			r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.4)}
			err := db.SaveRevision(ctx, &r)
			return r.At, err
		}},
		{"an answer sheet's saves", func() (time.Time, error) {
			rs := []workshop.Revision{{QuestionID: p.qs[0].ID, ExpertID: p.experts[2].ID, Answer: quantileAnswer(0.35),
				EnteredBy: workshop.ByFacilitator, Channel: workshop.ChannelFile}}
			err := db.SaveRevisions(ctx, rs)
			return rs[0].At, err
		}},
		{"weights", func() (time.Time, error) {
			w := workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsEqual, Reason: "equal again"}
			err := db.SetWeights(ctx, &w)
			return w.At, err
		}},
		{"an agreed prior", func() (time.Time, error) {
			ap := workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
				Dist: elicit.Unit(elicit.Beta{Alpha: 5, Beta: 9}), Rationale: "the pool again", RoundOpen: true}
			err := db.AgreePrior(ctx, &ap)
			return ap.At, err
		}},
		{"study data", func() (time.Time, error) {
			d := workshop.StudyData{QuestionID: p.qs[0].ID, Successes: 2, Trials: 10, Source: "site log (invented)",
				ObservedOn: time.Now().UTC().Format("2006-01-02")}
			err := db.RecordData(ctx, &d)
			return d.At, err
		}},
		{"an expert", func() (time.Time, error) {
			e := workshop.Expert{WorkshopID: p.w.ID, Name: "Dara " + time.Now().Format("150405.000000")}
			err := db.AddExpert(ctx, &e, []byte("hash-"+e.Name))
			return e.Created, err
		}},
	} {
		held, release := make(chan struct{}), make(chan struct{})
		logged := make(chan time.Time, 1)
		go func() {
			err := db.write(ctx, func(tx *sql.Tx) error {
				close(held)
				<-release
				at := now()
				logged <- at
				return insertEvent(ctx, tx, workshop.Event{WorkshopID: p.w.ID, Kind: workshop.EventWorkshopEdited, At: at, Detail: `{}`})
			})
			if err != nil {
				t.Error(err)
			}
		}()
		<-held
		done := make(chan struct{})
		var at time.Time
		var err error
		go func() {
			defer close(done)
			at, err = c.write()
		}()
		// Time for the write to start and wait for the writer; the check
		// below does not depend on how long that takes.
		time.Sleep(50 * time.Millisecond)
		close(release)
		<-done
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if ev := <-logged; at.Before(ev) {
			t.Errorf("%s committed after an event of %s but is stamped %s, before it: the chain puts it first",
				c.name, ev.Format(time.RFC3339Nano), at.Format(time.RFC3339Nano))
		}
	}
}

// Experts save without pause while the rounds are closed, reopened and
// opened, and weights are set: every value the chain had as a round
// closed (what the room is shown) is still the chain's value at that
// close once everything is in, and the record reads back whole, every
// answer within its round (record.CheckRounds).
func TestValuesNotedUnderConcurrentSavesStay(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	p := seed(t, db)
	stop := make(chan struct{})
	var wg sync.WaitGroup
	for i, e := range p.experts {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for n := 0; ; n++ {
				select {
				case <-stop:
					return
				default:
				}
				r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: e.ID, Answer: quantileAnswer(0.2 + 0.01*float64((i+n)%20))}
				if err := db.SaveRevision(ctx, &r); err != nil && !errors.Is(err, workshop.ErrRoundClosed) {
					t.Error(err)
					return
				}
			}
		}()
	}
	noted := map[int64]fingerprint.Value{} // round_closed event id → the chain's value after it, read at once
	note := func() {
		t.Helper()
		src, err := db.Source(ctx, p.w.ID)
		if err != nil {
			t.Fatal(err)
		}
		c := fingerprint.Of(fingerprint.Facts{Workshop: src.Workshop, Revisions: src.Revisions, WeightSets: src.WeightHistory,
			Priors: src.Priors, Data: src.Data, Events: src.Events}) // as the decision log and the room view have it
		closes := c.RoundCloses()
		last := closes[len(closes)-1]
		noted[last.ID] = last.Value
	}
	pause := func() { time.Sleep(20 * time.Millisecond) }
	pause()
	must(t, db.SetRound(ctx, p.w.ID, 1, false, ""))
	note()
	must(t, db.ReopenRound(ctx, p.w.ID, "one more"))
	pause()
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsEqual, Reason: "equal"}))
	must(t, db.SetRound(ctx, p.w.ID, 1, false, ""))
	note()
	must(t, db.SetRound(ctx, p.w.ID, 2, true, "next"))
	pause()
	must(t, db.SetRound(ctx, p.w.ID, 2, false, ""))
	note()
	must(t, db.SetRound(ctx, p.w.ID, 3, true, "last"))
	pause()
	close(stop)
	wg.Wait()

	rec, err := db.Record(ctx, p.w.ID, time.Now())
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	must(t, rec.WriteJSON(&b))
	if _, err := record.Parse(&b); err != nil {
		t.Fatalf("the record does not read back: %v", err)
	}
	c := fingerprint.Of(rec.Facts())
	for _, l := range c.RoundCloses() {
		if want, ok := noted[l.ID]; !ok || l.Value != want {
			t.Errorf("round %d's close (event %d): the chain now gives %s, the room was shown %s", l.Closed, l.ID, l.Value.Short(), want.Short())
		}
	}
	if len(rec.Revisions) < 6 {
		t.Errorf("only %d saves: the test needs saves around the closes", len(rec.Revisions))
	}
}
