package web

import (
	"net/http"
	"testing"
)

// BenchmarkQuestionPanel serves the facilitator's per-question panel of
// the demo over loopback: every expert's fit, the pool, its best single
// Beta and the overlaid chart, recomputed per request.
func BenchmarkQuestionPanel(b *testing.B) {
	h, ws, qs, _, _ := seeded(b)
	path := questionPath(ws.ID, qs[0].ID)
	b.ResetTimer()
	for b.Loop() {
		req, _ := http.NewRequest(http.MethodGet, h.ts.URL+path, nil)
		res, err := h.client.Do(req)
		if err != nil {
			b.Fatal(err)
		}
		res.Body.Close()
		if res.StatusCode != http.StatusOK {
			b.Fatalf("status %d", res.StatusCode)
		}
	}
}
