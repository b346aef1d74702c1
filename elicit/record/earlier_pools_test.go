package record

import (
	"bufio"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/parley-elicit/parley/elicit"
)

// The single Betas earlier builds formed of 200 invented pools
// (testdata/records/earlier_pools, made by earlier_pools.sh with each
// build's own elicit: 821dd3f, the first build whose prior from the pool
// names the revisions it pooled, and the two later builds that changed
// the pool's quantiles or its single Beta, ff655a7 and 2464a62) are each
// taken as the single Beta this version forms of the same experts' fits
// under the same weights (sameCurve), as a prior those builds agreed
// from the pool must be for their records to import.
func TestPoolsOfEarlierBuildsAreTaken(t *testing.T) {
	files, err := filepath.Glob("../../testdata/records/earlier_pools/pools_*.jsonl")
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 3 {
		t.Fatalf("%d files of earlier builds' pools, want 3", len(files))
	}
	for _, name := range files {
		t.Run(filepath.Base(name), func(t *testing.T) {
			t.Parallel()
			f, err := os.Open(name)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			sc := bufio.NewScanner(f)
			sc.Buffer(nil, 1<<20)
			var n, exact int
			var worstCurve, worstRel float64
			for sc.Scan() {
				var row struct {
					Alphas, Betas, W []float64
					A, B             float64
				}
				if err := json.Unmarshal(sc.Bytes(), &row); err != nil {
					t.Fatal(err)
				}
				n++
				dists := make([]elicit.ScaledBeta, len(row.Alphas))
				for i := range dists {
					dists[i] = elicit.ScaledBeta{Beta: elicit.Beta{Alpha: row.Alphas[i], Beta: row.Betas[i]}, Lower: 0, Upper: 1}
				}
				pool, err := elicit.LinearPool(dists, row.W)
				if err != nil {
					t.Fatalf("line %d: %v", n, err)
				}
				rep, err := pool.BestBeta()
				if err != nil {
					t.Fatalf("line %d: %v", n, err)
				}
				kept := elicit.ScaledBeta{Beta: elicit.Beta{Alpha: row.A, Beta: row.B}, Lower: 0, Upper: 1}
				fresh := rep.Dist
				if !sameCurve(kept, fresh) {
					t.Errorf("line %d: the earlier build's Beta(%g, %g) is not taken as this version's Beta(%g, %g)",
						n, row.A, row.B, fresh.Alpha, fresh.Beta.Beta)
				}
				rel := math.Max(relDiff(kept.Alpha, fresh.Alpha), relDiff(kept.Beta.Beta, fresh.Beta.Beta))
				if rel <= fitAgreement {
					exact++
				}
				worstRel = math.Max(worstRel, rel)
				for _, p := range curveProbes {
					worstCurve = math.Max(worstCurve, math.Abs(kept.CDF(fresh.Quantile(p))-p))
				}
			}
			if err := sc.Err(); err != nil {
				t.Fatal(err)
			}
			if n < 200 {
				t.Fatalf("%d pools, want 200", n)
			}
			t.Logf("%d pools, %d with α and β within %g; the largest gap in α or β %.2g relative, in a chance below a probe %.2g",
				n, exact, fitAgreement, worstRel, worstCurve)
		})
	}
}
