package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
	"github.com/parley-elicit/parley/elicit/input"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// fullWorkshop seeds a workshop through every kind of decision: two
// rounds of revisions, a calibration question on the log scale with a
// revealed truth, custom weights, a revoked expert and two agreed priors.
func fullWorkshop(t *testing.T, db *DB) panel {
	t.Helper()
	ctx := context.Background()
	p := seed(t, db)
	save := func(q, e int, a workshop.Answer, reason string) {
		r := workshop.Revision{QuestionID: p.qs[q].ID, ExpertID: p.experts[e].ID, Answer: a, Reason: reason}
		if err := db.SaveRevision(ctx, &r); err != nil {
			t.Fatal(err)
		}
	}
	save(0, 0, quantileAnswer(0.3), "")
	save(0, 1, quantileAnswer(0.4), "")
	save(0, 2, quantileAnswer(0.5), "")
	save(1, 0, workshop.Answer{Lowest: 0.1, Highest: 0.6, Best: 0.3, Confidence: 0.8}, "")
	must(t, db.SetRound(ctx, p.w.ID, 1, false, "discussion"))
	must(t, db.SetRound(ctx, p.w.ID, 2, true, "second look"))
	save(0, 0, quantileAnswer(0.35), "heard Bela")
	// Bela's second round came by phone and the facilitator typed it; its
	// reason names someone, so it is withheld from the feedback.
	byPhone := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[1].ID, Answer: quantileAnswer(0.38),
		Reason: "as Dr Example said (invented)", EnteredBy: workshop.ByFacilitator, Channel: workshop.ChannelPhone}
	must(t, db.SaveRevision(ctx, &byPhone))
	must(t, db.SetReasonWithheld(ctx, byPhone.ID, true, "names a person"))
	must(t, db.RevokeExpert(ctx, p.experts[2].ID, "left"))
	must(t, db.SetLogScale(ctx, p.qs[1].ID, true, "a share spread over orders of magnitude (invented)"))
	must(t, db.SetTrueValue(ctx, p.qs[1].ID, 0.28, true, "seed revealed"))
	must(t, db.SetWeights(ctx, &workshop.Weights{WorkshopID: p.w.ID, Scheme: workshop.WeightsCustom, Reason: "audits",
		ByExpert: map[int64]float64{p.experts[0].ID: 2, p.experts[1].ID: 1}}))
	consensus := quantileAnswer(0.33)
	// The pool's prior names the revisions it pooled: the active experts'
	// latest on the question (Cela is revoked).
	// Its Beta is their pool's single Beta under the custom weights, as
	// the record's validation checks.
	latest := map[int64]workshop.Revision{}
	rs, err := db.Revisions(ctx, p.w.ID)
	must(t, err)
	for _, rv := range rs {
		if rv.QuestionID == p.qs[0].ID && rv.ExpertID != p.experts[2].ID {
			latest[rv.ExpertID] = rv
		}
	}
	var dists []elicit.ScaledBeta
	for _, e := range p.experts[:2] {
		f, err := latest[e.ID].FitOf(p.qs[0])
		must(t, err)
		dists = append(dists, f.Dist)
	}
	pool, err := elicit.LinearPool(dists, []float64{2, 1})
	must(t, err)
	rep, err := pool.BestBeta()
	must(t, err)
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool,
		Dist: rep.Dist, Rationale: "pool", RoundOpen: true,
		Pooled: []int64{latest[p.experts[0].ID].ID, latest[p.experts[1].ID].ID}}))
	// A consensus prior is its judgement's fit, as the panel's form makes it.
	agreed, err := p.qs[0].Fit(consensus)
	must(t, err)
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[0].ID, Source: workshop.PriorFromConsensus,
		Dist: agreed.Dist, Consensus: &consensus, Rationale: "agreed", RoundOpen: true}))
	// A prior from a quick construction on the second question, and data
	// against both agreed priors.
	built := elicit.ConstructionInput{Method: elicit.MethodIntervalQuantiles, Low: 0.1, High: 0.5, Coverage: 0.9, Upper: 1}
	c, err := elicit.Construct(built)
	must(t, err)
	must(t, db.AgreePrior(ctx, &workshop.AgreedPrior{QuestionID: p.qs[1].ID, Source: workshop.PriorFromConstruction,
		Dist: c.Dist, Construction: &built, Rationale: "between 10% and 50%, 90% sure", RoundOpen: true}))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: p.qs[0].ID, Successes: 3, Trials: 20, Source: "pilot (invented)", ObservedOn: "2026-02-01"}))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: p.qs[0].ID, Successes: 6, Trials: 30, Source: "audit (invented)", ObservedOn: "2026-03-01"}))
	must(t, db.RecordData(ctx, &workshop.StudyData{QuestionID: p.qs[1].ID, Successes: 1, Trials: 4, Source: "spot check (invented)", ObservedOn: "2026-03-02"}))
	return p
}

func must(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

var exportTime = time.Date(2026, 3, 3, 12, 0, 0, 0, time.UTC)

func exportJSON(t *testing.T, db *DB, id int64) []byte {
	t.Helper()
	rec, err := db.Record(context.Background(), id, exportTime)
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.MarshalIndent(rec, "", " ")
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestImportRoundTrip exports a workshop, imports the JSON into an empty
// database and exports again: with IDs assigned in the same order the two
// documents are identical.
func TestImportRoundTrip(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := fullWorkshop(t, src)
	first, dst, id := exportImported(t, src, p.w.ID)
	rec, err := record.Parse(bytes.NewReader(first))
	if err != nil {
		t.Fatal(err)
	}
	// Imported experts have no link until the facilitator issues one.
	var withToken int
	must(t, dst.r.QueryRowContext(ctx, `SELECT COUNT(*) FROM experts WHERE token_hash IS NOT NULL`).Scan(&withToken))
	if withToken != 0 {
		t.Fatalf("%d imported experts kept a token", withToken)
	}
	es, _ := dst.Experts(ctx, id)
	must(t, dst.ReissueToken(ctx, es[0].ID, []byte("fresh"), "after import"))
	if e, err := dst.ExpertByToken(ctx, []byte("fresh")); err != nil || e.ID != es[0].ID {
		t.Fatalf("reissued token: %+v, %v", e, err)
	}

	// A second import into the source database gets new IDs throughout.
	again, err := src.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	if again == p.w.ID {
		t.Fatal("import reused the workshop's ID")
	}
	copyRec, err := src.Record(ctx, again, exportTime)
	if err != nil {
		t.Fatal(err)
	}
	if len(copyRec.Revisions) != len(rec.Revisions) || len(copyRec.Events) != len(rec.Events) {
		t.Fatalf("copy has %d revisions, %d events; want %d, %d",
			len(copyRec.Revisions), len(copyRec.Events), len(rec.Revisions), len(rec.Events))
	}
	newExperts := map[int64]bool{}
	for _, e := range copyRec.Experts {
		newExperts[e.ID] = true
	}
	for _, rv := range copyRec.Revisions {
		if !newExperts[rv.ExpertID] {
			t.Fatalf("revision %d points at expert %d outside the copy", rv.ID, rv.ExpertID)
		}
	}
	for id := range copyRec.Weights.ByExpert {
		if !newExperts[id] {
			t.Fatalf("weights name expert %d outside the copy", id)
		}
	}
	// The pooled revisions are remapped to the copy's own, with the same
	// experts' same answers.
	byID := func(r record.Record) map[int64]record.Revision {
		m := map[int64]record.Revision{}
		for _, rv := range r.Revisions {
			m[rv.ID] = rv
		}
		return m
	}
	was, now := rec.Questions[0].PriorHistory[0].Pooled, copyRec.Questions[0].PriorHistory[0].Pooled
	if len(was) != 2 || len(now) != len(was) {
		t.Fatalf("pooled revisions %v in the copy, %v in the record", now, was)
	}
	for i := range was {
		a, b := byID(rec)[was[i]], byID(copyRec)[now[i]]
		if now[i] == was[i] || b.QuestionID != copyRec.Questions[0].ID || !reflect.DeepEqual(a.Answer, b.Answer) || a.Reason != b.Reason {
			t.Errorf("pooled revision %d became %d: %+v, was %+v", was[i], now[i], b.Revision, a.Revision)
		}
	}
	if copyRec.Questions[0].AgreedPrior.Dist != rec.Questions[0].AgreedPrior.Dist {
		t.Fatalf("agreed prior %+v, want %+v", copyRec.Questions[0].AgreedPrior.Dist, rec.Questions[0].AgreedPrior.Dist)
	}
	// The reveal's event names the copy's own freeze, the revision that
	// stands where the record's did.
	seed := copyRec.Questions[1]
	var reveal workshop.Reveal
	for _, e := range copyRec.Events {
		if e.QuestionID == seed.ID && e.Kind == workshop.EventTruthRevealed {
			must(t, json.Unmarshal([]byte(e.Detail), &reveal))
		}
	}
	if reveal.RevealedThrough == nil {
		t.Fatal("the copy's reveal carries no freeze")
	}
	if named := *reveal.RevealedThrough; seed.RevealedThrough == rec.Questions[1].RevealedThrough || named != seed.RevealedThrough ||
		!byID(copyRec)[seed.RevealedThrough].At.Equal(byID(rec)[rec.Questions[1].RevealedThrough].At) {
		t.Errorf("the copy's reveal names revision %d, its question is frozen through %d (the record's through %d)",
			named, seed.RevealedThrough, rec.Questions[1].RevealedThrough)
	}
	// So the copy's own record reads, its freeze bound to its reveal.
	if _, err := record.Parse(bytes.NewReader(exportJSON(t, src, again))); err != nil {
		t.Fatalf("the copy's record: %v", err)
	}
}

func TestImportInvalidWritesNothing(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := fullWorkshop(t, src)
	rec, err := src.Record(ctx, p.w.ID, exportTime)
	if err != nil {
		t.Fatal(err)
	}
	rec.Revisions[1].Answer.Values[1] = 0.01 // no longer increasing

	dst, err := Open(filepath.Join(t.TempDir(), "dst.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer dst.Close()
	_, err = dst.Import(ctx, rec)
	var ie *elicit.InputError
	if !errors.As(err, &ie) || ie.Field != "revisions[1].answer.values[1]" {
		t.Fatalf("Import = %v, want an InputError on revisions[1].answer.values[1]", err)
	}
	for _, table := range []string{"workshops", "questions", "experts", "revisions", "events", "weight_sets", "agreed_priors"} {
		var n int
		if err := dst.r.QueryRowContext(ctx, "SELECT COUNT(*) FROM "+table).Scan(&n); err != nil {
			t.Fatal(err)
		}
		if n != 0 {
			t.Errorf("rejected import left %d rows in %s", n, table)
		}
	}
}

func TestRemapDetail(t *testing.T) {
	m := map[int64]int64{3: 30, 4: 4}
	revs := map[int64]int64{3: 7, 9: 90}
	tests := []struct{ in, want string }{
		{`{"expert_id":3}`, `{"expert_id":30}`},
		{`{"revision_id":9}`, `{"revision_id":90}`},
		{`{"expert_id":3,"revision_id":3}`, `{"expert_id":30,"revision_id":7}`},
		{`{"expert_id":4}`, `{"expert_id":4}`},
		{`{"scheme":"custom","by_expert":{"3":2,"4":1}}`, `{"by_expert":{"30":2,"4":1},"scheme":"custom"}`},
		{`{"sha256":"ab","rows":[2,3],"channel":"file","revisions":[3,9]}`, `{"channel":"file","revisions":[7,90],"rows":[2,3],"sha256":"ab"}`},
		{`{"true_value":0.3,"revealed_at":"2026-11-01T10:30:00Z","revealed_through":9}`,
			`{"revealed_at":"2026-11-01T10:30:00Z","revealed_through":90,"true_value":0.3}`},
		{`{"true_value":0.3,"revealed_at":"2026-11-01T10:30:00Z","revealed_through":0}`,
			`{"true_value":0.3,"revealed_at":"2026-11-01T10:30:00Z","revealed_through":0}`},
		{`{"round":2}`, `{"round":2}`},
		{`not json`, `not json`},
		{``, ``},
	}
	for _, tt := range tests {
		if got := remapDetail(tt.in, m, revs); got != tt.want {
			t.Errorf("remapDetail(%s) = %s, want %s", tt.in, got, tt.want)
		}
	}
}

// TestRecordWhileSaving builds records while experts join and save: every
// record is one snapshot, so it always validates.
func TestRecordWhileSaving(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	done := make(chan error)
	go func() {
		for i := range 300 {
			e := workshop.Expert{WorkshopID: p.w.ID, Name: "late joiner"}
			if err := db.AddExpert(ctx, &e, []byte(fmt.Sprintf("late-%d", i))); err != nil {
				done <- err
				return
			}
			r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: e.ID, Answer: quantileAnswer(0.3)}
			if err := db.SaveRevision(ctx, &r); err != nil {
				done <- err
				return
			}
		}
		done <- nil
	}()
	for {
		select {
		case err := <-done:
			if err != nil {
				t.Fatal(err)
			}
			return
		default:
		}
		rec, err := db.Record(ctx, p.w.ID, exportTime)
		if err != nil {
			t.Fatal(err)
		}
		if err := rec.Validate(); err != nil {
			t.Fatalf("record built during saves is inconsistent: %v", err)
		}
	}
}

// TestImportRollsBack makes the last step of an import fail inside the
// database and checks that the steps before it are undone.
func TestImportRollsBack(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := fullWorkshop(t, src)
	rec, err := src.Record(ctx, p.w.ID, exportTime)
	must(t, err)
	dst := newDB(t)
	// The writer pool holds one connection, so a TEMP trigger on it sees
	// every write.
	_, err = dst.w.ExecContext(ctx, `CREATE TEMP TRIGGER fail_events BEFORE INSERT ON events
		BEGIN SELECT RAISE(ABORT, 'injected failure'); END`)
	must(t, err)
	if _, err := dst.Import(ctx, rec); err == nil {
		t.Fatal("import succeeded despite the failing trigger")
	}
	for _, table := range []string{"workshops", "questions", "experts", "revisions", "weight_sets", "agreed_priors"} {
		var n int
		must(t, dst.r.QueryRowContext(ctx, "SELECT COUNT(*) FROM "+table).Scan(&n))
		if n != 0 {
			t.Errorf("failed import left %d rows in %s", n, table)
		}
	}
}

// TestBackupWhileSaving copies the database while saves go on: the copy
// is sound and holds an unbroken prefix of the revisions.
func TestBackupWhileSaving(t *testing.T) {
	ctx := context.Background()
	db := newDB(t)
	p := seed(t, db)
	stop := make(chan struct{})
	done := make(chan error)
	started := make(chan struct{})
	go func() {
		for n := 0; ; n++ {
			if n == 5 {
				close(started)
			}
			select {
			case <-stop:
				done <- nil
				return
			default:
			}
			r := workshop.Revision{QuestionID: p.qs[0].ID, ExpertID: p.experts[0].ID, Answer: quantileAnswer(0.3)}
			if err := db.SaveRevision(ctx, &r); err != nil {
				done <- err
				return
			}
		}
	}()
	dest := filepath.Join(t.TempDir(), "live.db")
	<-started // some saves have landed; more are on their way
	backupErr := db.Backup(ctx, dest)
	close(stop)
	must(t, <-done)
	must(t, backupErr)
	cp, err := Open(dest)
	must(t, err)
	defer cp.Close()
	if v, err := cp.IntegrityCheck(ctx); v != "ok" || err != nil {
		t.Fatalf("integrity_check = %q, %v", v, err)
	}
	rs, err := cp.Revisions(ctx, p.w.ID)
	must(t, err)
	if len(rs) < 5 {
		t.Fatalf("copy holds %d revisions, want at least the 5 saved before it", len(rs))
	}
	for i, r := range rs {
		if r.ID != rs[0].ID+int64(i) {
			t.Fatalf("copy's revisions skip from %d to %d", rs[i-1].ID, r.ID)
		}
	}
}

// A record written before revisions said who entered them imports, and
// its revisions read as the experts' own.
func TestImportRecordWithoutProvenance(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := fullWorkshop(t, src)
	raw := exportJSON(t, src, p.w.ID)
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	for _, r := range doc["revisions"].([]any) {
		rv := r.(map[string]any)
		delete(rv, "entered_by")
		delete(rv, "channel")
	}
	delete(doc, "fingerprint") // older than the chain too
	delete(doc, "chain")
	old, _ := json.Marshal(doc)
	rec, err := record.Parse(bytes.NewReader(old))
	if err != nil {
		t.Fatal(err)
	}
	dst := newDB(t)
	id, err := dst.Import(ctx, rec)
	if err != nil {
		t.Fatal(err)
	}
	revs, _ := dst.Revisions(ctx, id)
	for _, rv := range revs {
		if rv.EnteredBy != workshop.ByExpert || rv.Channel != "" {
			t.Fatalf("an older record's revision reads as %q %q", rv.EnteredBy, rv.Channel)
		}
	}
}

// TestPooledRevisionsAreTheQuestions: a prior from the pool may name only
// revisions of its own question, in the store and in an imported record,
// and only a prior from the pool names any.
func TestPooledRevisionsAreTheQuestions(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := fullWorkshop(t, src)
	rec, err := src.Record(ctx, p.w.ID, exportTime)
	if err != nil {
		t.Fatal(err)
	}
	var other int64 // a revision of the second question
	for _, rv := range rec.Revisions {
		if rv.QuestionID == p.qs[1].ID {
			other = rv.ID
		}
	}
	var ie *elicit.InputError
	for _, ap := range []workshop.AgreedPrior{
		{QuestionID: p.qs[0].ID, Source: workshop.PriorFromPool, Dist: elicit.Unit(elicit.Beta{Alpha: 6, Beta: 11}), Rationale: "pool", RoundOpen: true, Pooled: []int64{other}},
		{QuestionID: p.qs[0].ID, Source: workshop.PriorFromConsensus, Dist: rec.Questions[0].AgreedPrior.Dist, Consensus: rec.Questions[0].AgreedPrior.Consensus,
			Rationale: "agreed", RoundOpen: true, Pooled: rec.Questions[0].PriorHistory[0].Pooled},
	} {
		if err := src.AgreePrior(ctx, &ap); !errors.As(err, &ie) || !strings.HasPrefix(ie.Field, "pooled_revisions") {
			t.Errorf("%s prior pooling %v: %v, want a refusal on pooled_revisions", ap.Source, ap.Pooled, err)
		}
	}
	rec.Questions[0].PriorHistory[0].Pooled[0] = other
	dst := newDB(t)
	if _, err := dst.Import(ctx, rec); !errors.As(err, &ie) || ie.Field != "questions[0].prior_history[0].pooled_revisions[0]" {
		t.Fatalf("import of a prior pooling another question's revision: %v", err)
	}
	var n int
	must(t, dst.r.QueryRowContext(ctx, `SELECT COUNT(*) FROM agreed_priors`).Scan(&n))
	if n != 0 {
		t.Errorf("a refused import left %d agreed priors", n)
	}
}

// TestImportRefusesAnEditedPooledPrior: a record whose prior from the
// pool was edited (its α, by a part in a thousand) is refused whole at the
// prior's path; the same record unedited imports.
func TestImportRefusesAnEditedPooledPrior(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := fullWorkshop(t, src)
	rec, err := src.Record(ctx, p.w.ID, exportTime)
	must(t, err)
	ap := &rec.Questions[0].PriorHistory[0]
	if ap.Source != workshop.PriorFromPool || len(ap.Pooled) != 2 {
		t.Fatalf("the first prior is %s pooling %v", ap.Source, ap.Pooled)
	}
	ap.Dist.Alpha *= 1.001
	dst := newDB(t)
	var ie *elicit.InputError
	if _, err := dst.Import(ctx, rec); !errors.As(err, &ie) || ie.Field != "questions[0].prior_history[0].dist" || ie.Rule != record.RulePoolMismatch {
		t.Fatalf("import of an edited pooled prior: %v", err)
	}
	if ws, _ := dst.Workshops(ctx); len(ws) != 0 {
		t.Errorf("a refused import left %d workshops", len(ws))
	}
	ap.Dist.Alpha /= 1.001
	if _, err := dst.Import(ctx, rec); err != nil {
		t.Errorf("the record as exported: %v", err)
	}
}

// An import keeps a record's ids only where the database can go on
// numbering after them. A record whose ids sat at the top of the range
// (input.MaxID, 2⁵³ − 1; no Parley database numbers that far) was
// imported with them, and every workshop, question and expert made after
// it was numbered past the range: `parley export --workshop` refused the
// new workshop's id, and its record, carrying such ids, was refused by
// `parley import`.
func TestImportRenumbersIDsAtTheTopOfTheRange(t *testing.T) {
	ctx := context.Background()
	src := newDB(t)
	p := seed(t, src)
	var doc map[string]any
	must(t, json.Unmarshal(exportJSON(t, src, p.w.ID), &doc))
	delete(doc, "fingerprint") // the chain runs over the ids
	delete(doc, "chain")
	// Every id is moved up by the same amount, so that the largest is
	// input.MaxID.
	var walk func(v any, f func(m map[string]any, k string, n int64))
	walk = func(v any, f func(m map[string]any, k string, n int64)) {
		switch v := v.(type) {
		case map[string]any:
			for k, x := range v {
				if n, ok := x.(float64); ok && n > 0 && (k == "id" || strings.HasSuffix(k, "_id")) {
					f(v, k, int64(n))
					continue
				}
				walk(x, f)
			}
		case []any:
			for _, x := range v {
				walk(x, f)
			}
		}
	}
	var largest int64
	walk(doc, func(_ map[string]any, _ string, n int64) { largest = max(largest, n) })
	shift := int64(input.MaxID) - largest
	lift := func(v any) {
		walk(v, func(m map[string]any, k string, n int64) { m[k] = json.Number(fmt.Sprint(n + shift)) })
	}
	lift(doc)
	b, err := json.Marshal(doc)
	must(t, err)
	rec, err := record.Parse(bytes.NewReader(b))
	must(t, err)
	if rec.Workshop.ID != p.w.ID+shift {
		t.Fatalf("the record's workshop is %d, want %d", rec.Workshop.ID, p.w.ID+shift)
	}

	dst := newDB(t)
	id, err := dst.Import(ctx, rec)
	must(t, err)
	w := workshop.Workshop{Title: "Made after the import (invented)", Invented: true}
	must(t, dst.CreateWorkshop(ctx, &w))
	q := workshop.Question{WorkshopID: w.ID, Wording: "Share?", Quantity: "share", Lower: 0, Upper: 1,
		Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
	must(t, dst.AddQuestion(ctx, &q))
	e := workshop.Expert{WorkshopID: w.ID, Name: "Dana"}
	must(t, dst.AddExpert(ctx, &e, []byte("hash-after")))
	for what, n := range map[string]int64{"imported workshop": id, "new workshop": w.ID, "new question": q.ID, "new expert": e.ID} {
		if n < 1 || n > input.MaxID {
			t.Errorf("%s numbered %d, outside 1 to %d", what, n, int64(input.MaxID))
		}
	}
	// The new workshop's record (its events too) reads back.
	if _, err := record.Parse(bytes.NewReader(exportJSON(t, dst, w.ID))); err != nil {
		t.Errorf("the record of the workshop made after the import is refused: %v", err)
	}
	// A record of ordinary ids keeps them, as before.
	fresh := newDB(t)
	rec2, err := record.Parse(bytes.NewReader(exportJSON(t, src, p.w.ID)))
	must(t, err)
	if got, err := fresh.Import(ctx, rec2); err != nil || got != p.w.ID {
		t.Fatalf("an ordinary record imported as %d (%v), want its own id %d", got, err, p.w.ID)
	}
}

// exportImported exports workshop wsID of src, imports the record into a
// new database and checks that its export there is the same bytes; it
// returns the first export, the new database and the workshop's id there.
func exportImported(t *testing.T, src *DB, wsID int64) ([]byte, *DB, int64) {
	t.Helper()
	first := exportJSON(t, src, wsID)
	rec, err := record.Parse(bytes.NewReader(first))
	if err != nil {
		t.Fatal(err)
	}
	dst := newDB(t)
	id, err := dst.Import(context.Background(), rec)
	if err != nil {
		t.Fatal(err)
	}
	if second := exportJSON(t, dst, id); !bytes.Equal(first, second) {
		t.Fatalf("export after import differs:\n%s\n---\n%s", first, second)
	}
	return first, dst, id
}
