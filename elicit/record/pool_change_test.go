package record

import (
	"bytes"
	"encoding/csv"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

// The pool under an agreed prior, read from the record: unchanged right
// after the agreement, revised once an expert saves again, and the same
// whether the record was built with its panels (Build, the JSON and the
// report) or without (BuildHistory, the CSVs); the priors CSV's last
// column says so. BuildHistory's questions carry no current fits, and a
// reading of those had every pooled expert "no longer in the pool".
func TestPoolChangeFromTheRecord(t *testing.T) {
	src := workshoptest.PumpSeals()
	src.Priors = src.Priors[:1] // the prior from the pool is the one in force
	src.Weights = workshop.Weights{WorkshopID: 7, Scheme: workshop.WeightsEqual}
	src.Data = nil
	src.Priors[0].Pooled = []int64{35, 32} // Ada's round-2 answer and Bela's; Chidi is revoked
	check := func(name string, wantChanged bool, wantRevised []int64) {
		t.Helper()
		for _, build := range []struct {
			name string
			f    func(workshop.Snapshot, time.Time) (Record, error)
		}{{"Build", Build}, {"BuildHistory", BuildHistory}} {
			r, err := build.f(src, t0.Add(time.Hour))
			if err != nil {
				t.Fatal(err)
			}
			c, ok := r.PoolChange(r.Questions[0])
			if !ok || c.Any() != wantChanged || len(c.Left) != 0 || len(c.Joined) != 0 || len(c.Revised) != len(wantRevised) {
				t.Errorf("%s, %s: %v %+v, want changed %v with revised %v", name, build.name, ok, c, wantChanged, wantRevised)
			}
			for i, e := range wantRevised {
				if i < len(c.Revised) && c.Revised[i] != e {
					t.Errorf("%s, %s: revised %v, want %v", name, build.name, c.Revised, wantRevised)
				}
			}
			want := "false"
			if wantChanged {
				want = "true"
			}
			if head, got := priorsCSVLast(t, r); head != "pool_changed" || got != want {
				t.Errorf("%s, %s: priors CSV %s = %q, want %q", name, build.name, head, got, want)
			}
		}
	}
	check("as agreed", false, nil)
	src.Revisions = append(src.Revisions, workshop.Revision{ID: 36, QuestionID: 11, ExpertID: 22, Round: 2,
		At: t0.Add(9 * time.Minute), Answer: workshop.Answer{Values: []float64{0.12, 0.22, 0.42}}})
	check("Bela revised", true, []int64{22})
}

// A pooled judgement withdrawn since marks the prior as agreed from a
// pool that has changed, in the record and the priors CSV, whether or
// not the expert has another answer.
func TestPoolChangeAfterAWithdrawal(t *testing.T) {
	src := workshoptest.PumpSeals()
	src.Priors = src.Priors[:1]
	src.Weights = workshop.Weights{WorkshopID: 7, Scheme: workshop.WeightsEqual}
	src.Data = nil
	src.Priors[0].Pooled = []int64{35, 32} // Ada's round-2 answer and Bela's
	for i := range src.Revisions {
		if src.Revisions[i].ID == 32 {
			src.Revisions[i].Withdrawn = true
		}
	}
	r, err := Build(src, t0.Add(time.Hour))
	if err != nil {
		t.Fatal(err)
	}
	c, ok := r.PoolChange(r.Questions[0])
	if !ok || !c.Any() || len(c.Withdrawn) != 1 || c.Withdrawn[0] != 22 || len(c.Revised)+len(c.Left) != 0 {
		t.Fatalf("Bela's pooled judgement withdrawn: %v %+v", ok, c)
	}
	if head, got := priorsCSVLast(t, r); head != "pool_changed" || got != "true" {
		t.Errorf("priors CSV %s = %q, want pool_changed true", head, got)
	}
}

// priorsCSVLast is the priors CSV's last column: its header and its first
// row's value.
func priorsCSVLast(t *testing.T, r Record) (head, value string) {
	t.Helper()
	var buf bytes.Buffer
	if err := r.WritePriorsCSV(&buf); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	last := len(rows[0]) - 1
	return rows[0][last], rows[1][last]
}
