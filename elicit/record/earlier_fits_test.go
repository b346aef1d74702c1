package record

import (
	"bufio"
	"encoding/json"
	"math"
	"os"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// The fits an earlier build made of 1,071 invented judgements
// (testdata/records/earlier_fits: the build before the Levenberg–
// Marquardt fit, 7c8c05c, run by earlier_fits.sh on seeded judgements;
// 2356720 makes the same fits) are taken as this version's fits of them
// (sameFit), as that build's records' fits must be for the records to
// import. The demo's 36 fits agreed to 8e-6 in every chance below, but
// 45 of these 1,071 lay further from today's than the first rule took
// (found by review): up to 7.9e-5 in the chance below a stated value,
// and in the objective at most 8.5e-9 above the minimum, at most 2.9e-6
// of it wherever more than 1e-10 above. Each judgement this version
// refuses is refused only by a rule that build lacked (EarlierRule).
func TestFitsOfAnEarlierBuildAreTaken(t *testing.T) {
	f, err := os.Open("../../testdata/records/earlier_fits/fits_7c8c05c.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	var n, refused int
	var worstCurve, worstSSE float64
	for sc.Scan() {
		var row struct {
			J    elicit.Judgement `json:"j"`
			A, B float64
		}
		if err := json.Unmarshal(sc.Bytes(), &row); err != nil {
			t.Fatal(err)
		}
		n++
		fresh, err := elicit.FitQuantiles(row.J)
		if err != nil {
			if !EarlierRule(err) {
				t.Errorf("%v: refused by a rule the earlier build had: %v", row.J.Values, err)
			}
			refused++
			continue
		}
		kept := elicit.ScaledBeta{Beta: elicit.Beta{Alpha: row.A, Beta: row.B}, Lower: 0, Upper: 1}
		if !sameFit(kept, fresh) {
			t.Errorf("%v at %v: the earlier build's Beta(%g, %g) is not taken as this version's Beta(%g, %g)",
				row.J.Values, row.J.Probs, row.A, row.B, fresh.Dist.Alpha, fresh.Dist.Beta.Beta)
		}
		var sse float64
		for i, x := range fresh.Stated {
			r := kept.CDF(x) - fresh.Probs[i]
			sse += r * r
			worstCurve = math.Max(worstCurve, math.Abs(kept.CDF(x)-fresh.Dist.CDF(x)))
		}
		if fresh.SSE > 1e-12 {
			worstSSE = math.Max(worstSSE, (sse-fresh.SSE)/fresh.SSE)
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if n < 1000 {
		t.Fatalf("%d fits of the earlier build, want over 1000", n)
	}
	t.Logf("%d fits, %d judgements refused today; the largest gap in a chance below a stated value %.2g, in the objective %.2g relative", n, refused, worstCurve, worstSSE)
}
