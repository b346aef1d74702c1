package record

import (
	"bytes"
	"encoding/json"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// A fit's tail_misfit warning carries its particulars into the record
// (elicit.Fit.TailMiss), for the report; the JSON export keeps the
// warning as code and message only. The judgement is invented.
func TestFitOfCarriesTheTailMiss(t *testing.T) {
	f, err := elicit.FitQuantiles(elicit.Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.06, 0.15, 0.42}, Lower: 0, Upper: 1})
	if err != nil {
		t.Fatal(err)
	}
	want, ok := f.TailMiss()
	if !ok {
		t.Fatalf("the test's judgement misses no tail: %+v", f.Warnings)
	}
	rf := FitOf(f)
	if len(rf.Warnings) != 1 || rf.Warnings[0].Tail == nil || *rf.Warnings[0].Tail != want {
		t.Fatalf("record warnings %+v, want the tail miss %+v", rf.Warnings, want)
	}
	b, err := json.Marshal(rf.Warnings[0])
	if err != nil {
		t.Fatal(err)
	}
	if want := `{"code":"tail_misfit","message":`; !bytes.HasPrefix(b, []byte(want)) || bytes.Count(b, []byte(`":`)) != 2 {
		t.Errorf("the warning's JSON is %s, want code and message only", b)
	}
}
