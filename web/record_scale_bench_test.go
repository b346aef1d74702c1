package web

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"net/http"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/fingerprint"
	"github.com/parley-elicit/parley/elicit/record"
	"github.com/parley-elicit/parley/elicit/workshop"
)

// A workshop's record at the size of a long workshop: 40 experts × 30
// questions × 4 rounds (4,800 revisions, each with a reason), a
// correction of every third question, reasons withheld and shown again,
// a question retired and brought back, an agreed prior on every question
// and two batches of study data on each, all through the store; then its
// export, the decision log, the report and a question's panel served
// over loopback, and the record read, verified and imported in process.
// Timings are benchmarks, never assertions:
//
//	go test ./web -run '^$' -bench RecordAtLength -benchtime 3x
const (
	lengthExperts   = 40
	lengthQuestions = 30
	lengthRounds    = 4
)

type lengthWorkshop struct {
	h   *harness
	ws  workshop.Workshop
	qs  []workshop.Question
	doc []byte // the exported record
}

func seedLength(b *testing.B) lengthWorkshop {
	b.Helper()
	ctx := context.Background()
	h := newHarness(b)
	h.signIn()
	ws := workshop.Workshop{Title: "Culvert blockages (invented)", Purpose: "priors for a maintenance model", Invented: true}
	must(b, h.db.CreateWorkshop(ctx, &ws))
	var qs []workshop.Question
	for i := range lengthQuestions {
		q := workshop.Question{WorkshopID: ws.ID, Wording: fmt.Sprintf("Invented question %d: share of culverts blocked?", i+1),
			Quantity: "blocked share", Units: "proportion", Lower: 0, Upper: 1, Format: workshop.FormatQuantiles,
			Probs: []float64{0.05, 0.5, 0.95}}
		must(b, h.db.AddQuestion(ctx, &q))
		qs = append(qs, q)
	}
	var es []workshop.Expert
	for i := range lengthExperts {
		e := workshop.Expert{WorkshopID: ws.ID, Name: fmt.Sprintf("Expert %d (invented)", i+1)}
		must(b, h.db.AddExpert(ctx, &e, fmt.Appendf(nil, "token-%d", i)))
		es = append(es, e)
	}
	for i := 0; i < len(qs); i += 3 {
		q := qs[i]
		q.Wording += " (after a storm)"
		must(b, h.db.EditQuestion(ctx, q, "Invented: clearer wording"))
		qs[i] = q
	}
	must(b, h.db.SetQuestionRetired(ctx, qs[1].ID, true, "Invented: ambiguous"))
	must(b, h.db.SetQuestionRetired(ctx, qs[1].ID, false, "Invented: settled"))
	var withheld []int64
	for round := 1; round <= lengthRounds; round++ {
		if round > 1 {
			must(b, h.db.SetRound(ctx, ws.ID, round, true, "Invented: the panel revises after the discussion"))
		}
		var revs []workshop.Revision
		for ei, e := range es {
			for qi, q := range qs {
				m := 0.1 + 0.6*float64((ei*7+qi*3+round)%20)/20
				rv := workshop.Revision{QuestionID: q.ID, ExpertID: e.ID,
					Reason: fmt.Sprintf("Invented reason of expert %d in round %d: inspection logs and storm records.", ei+1, round),
					Answer: workshop.Answer{Values: []float64{m * 0.5, m, m + (1-m)*0.4}}}
				f, err := q.Fit(rv.Answer)
				must(b, err)
				rv.Kept = &f
				revs = append(revs, rv)
			}
		}
		must(b, h.db.SaveRevisions(ctx, revs))
		if round == 2 {
			for i := 0; i < len(revs); i += 40 {
				withheld = append(withheld, revs[i].ID)
			}
		}
		must(b, h.db.SetRound(ctx, ws.ID, round, false, ""))
	}
	for i, id := range withheld {
		must(b, h.db.SetReasonWithheld(ctx, id, true, "Invented: names a contractor"))
		if i%2 == 0 {
			must(b, h.db.SetReasonWithheld(ctx, id, false, "Invented: the contractor agreed"))
		}
	}
	for i, q := range qs {
		p := workshop.AgreedPrior{QuestionID: q.ID, Source: workshop.PriorFromConsensus,
			Consensus: &workshop.Answer{Values: []float64{0.1, 0.2 + 0.005*float64(i), 0.45}},
			Rationale: "Invented: agreed in the discussion"}
		f, err := q.Fit(*p.Consensus)
		must(b, err)
		p.Dist = f.Dist
		must(b, h.db.AgreePrior(ctx, &p))
		for k := range 2 {
			d := workshop.StudyData{QuestionID: q.ID, Successes: 3 + k, Trials: 40, Source: "Invented survey",
				ObservedOn: fmt.Sprintf("2026-0%d-15", k+1)}
			must(b, h.db.RecordData(ctx, &d))
		}
	}
	w := lengthWorkshop{h: h, ws: ws, qs: qs}
	w.doc = w.fetch(b, exportPath(ws.ID, "json"))
	return w
}

func (w lengthWorkshop) fetch(b *testing.B, path string) []byte {
	b.Helper()
	req, _ := http.NewRequest(http.MethodGet, w.h.ts.URL+path, nil)
	res, err := w.h.client.Do(req)
	if err != nil {
		b.Fatal(err)
	}
	body, err := io.ReadAll(res.Body)
	res.Body.Close()
	if err != nil || res.StatusCode != http.StatusOK {
		b.Fatalf("GET %s: %d %v", path, res.StatusCode, err)
	}
	return body
}

func BenchmarkRecordAtLength(b *testing.B) {
	w := seedLength(b)
	wp := workshopPath(w.ws.ID)
	for _, page := range []struct{ name, path string }{
		{"export-json", exportPath(w.ws.ID, "json")},
		{"export-csv", exportPath(w.ws.ID, "csv")},
		{"log", wp + "/log"},
		{"report", wp + "/report"},
		{"panel", questionPath(w.ws.ID, w.qs[0].ID)},
	} {
		b.Run(page.name, func(b *testing.B) {
			var n, runs int
			before := processCPU()
			for b.Loop() {
				n = len(w.fetch(b, page.path))
				runs++
			}
			b.ReportMetric((processCPU()-before).Seconds()*1000/float64(runs), "cpu-ms/op")
			b.ReportMetric(float64(n)/1024, "KB")
		})
	}
	b.Run("parse", func(b *testing.B) {
		for b.Loop() {
			if _, err := record.Parse(bytes.NewReader(w.doc)); err != nil {
				b.Fatal(err)
			}
		}
	})
	rec, err := record.Decode(bytes.NewReader(w.doc))
	must(b, err)
	b.Run("check-chain", func(b *testing.B) {
		for b.Loop() {
			must(b, rec.CheckChain())
		}
	})
	b.Run("check-definitions", func(b *testing.B) {
		for b.Loop() {
			must(b, rec.CheckDefinitions())
		}
	})
	b.Run("chain", func(b *testing.B) {
		for b.Loop() {
			fingerprint.Of(rec.Facts())
		}
	})
	b.Run("import", func(b *testing.B) {
		parsed, err := record.Parse(bytes.NewReader(w.doc))
		must(b, err)
		for b.Loop() {
			if _, err := w.h.db.Import(context.Background(), parsed); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// processCPU is the CPU time (user and system) this process has used: the
// server's and the client's, which on a shared machine is a steadier
// figure than the wall time.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func must(tb testing.TB, err error) {
	tb.Helper()
	if err != nil {
		tb.Fatal(err)
	}
}
