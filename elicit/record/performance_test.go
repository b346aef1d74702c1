package record

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/parley-elicit/parley/elicit/workshop"
	"github.com/parley-elicit/parley/elicit/workshop/workshoptest"
)

func TestRecordCarriesPerformance(t *testing.T) {
	sch := compileSchema(t)
	hidden, err := Build(workshoptest.ValveWear(false), t0)
	if err != nil {
		t.Fatal(err)
	}
	if hidden.Performance != nil || !strings.Contains(hidden.PerformanceNote, "revealed") {
		t.Fatalf("unrevealed: performance %v, note %q", hidden.Performance, hidden.PerformanceNote)
	}
	if err := sch.Validate(asJSONValue(t, hidden)); err != nil {
		t.Fatalf("record with a performance note: %v", err)
	}
	src := workshoptest.ValveWear(true)
	rec, err := Build(src, t0)
	if err != nil {
		t.Fatal(err)
	}
	want, err := workshop.ScorePerformance(workshop.NewCalibrationSet(src.Questions, src.Experts, src.Revisions, true), nil)
	if err != nil {
		t.Fatal(err)
	}
	if rec.Performance == nil || rec.PerformanceNote != "" || !sameWeights(*rec.Performance, want) || rec.Performance.Alpha != want.Alpha {
		t.Fatalf("record performance %+v, want %+v", rec.Performance, want)
	}
	if err := sch.Validate(asJSONValue(t, rec)); err != nil {
		t.Fatalf("record with performance does not match the schema: %v", err)
	}
	// The record survives its own strict import.
	b, err := json.Marshal(rec)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Parse(bytes.NewReader(b)); err != nil {
		t.Fatalf("record with performance does not import: %v", err)
	}
	if rec.Performance.Robustness == nil || len(rec.Performance.Robustness.Rows) != 6 {
		t.Fatalf("record lacks the robustness table: %+v", rec.Performance)
	}
}

func sameWeights(a, b workshop.Performance) bool {
	wa, wb := a.WeightsByExpert(), b.WeightsByExpert()
	for id, v := range wb {
		if math.Abs(wa[id]-v) > 1e-12 {
			return false
		}
	}
	return len(wa) == len(wb)
}
