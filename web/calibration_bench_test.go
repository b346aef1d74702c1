package web

import (
	"context"
	"math/rand/v2"
	"net/http"
	"strconv"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit/workshop"
)

// cpuPerOp reports, besides ns/op, the process's CPU time per operation
// from getrusage, steadier than wall time on a shared machine.
func cpuPerOp(b *testing.B, op func()) {
	var before, after syscall.Rusage
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &before)
	n := 0
	for b.Loop() {
		op()
		n++
	}
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &after)
	cpu := time.Duration(after.Utime.Nano()-before.Utime.Nano()) + time.Duration(after.Stime.Nano()-before.Stime.Nano())
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(n), "cpu-ns/op")
}

func getOK(b *testing.B, h *harness, path string) {
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

// BenchmarkCalibrationPageDemo serves the invented demo's calibration
// page over loopback: scores, the weight map, the robustness reruns and
// their pictures, the pools side by side.
func BenchmarkCalibrationPageDemo(b *testing.B) {
	h, ws, _, _, _ := seeded(b)
	cpuPerOp(b, func() { getOK(b, h, calibrationPath(ws.ID)) })
}

// largePanel is an invented panel of 20 experts, 15 calibration
// questions at 5/50/95 with true values, and 2 target questions.
func largePanel(b *testing.B) (*harness, workshop.Workshop, workshop.Question) {
	h := newHarness(b)
	h.signIn()
	ctx := context.Background()
	ws := workshop.Workshop{Title: "Large invented panel", Invented: true}
	if err := h.db.CreateWorkshop(ctx, &ws); err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	var qs []workshop.Question
	for i := 0; i < 17; i++ {
		q := workshop.Question{WorkshopID: ws.ID, Wording: "Invented " + strconv.Itoa(i), Quantity: "share " + strconv.Itoa(i),
			Lower: 0, Upper: 1, Format: workshop.FormatQuantiles, Probs: []float64{0.05, 0.5, 0.95}}
		if i >= 2 {
			tv := 0.1 + 0.8*rng.Float64()
			q.Calibration, q.TrueValue = true, &tv
		}
		if err := h.db.AddQuestion(ctx, &q); err != nil {
			b.Fatal(err)
		}
		qs = append(qs, q)
	}
	for e := 0; e < 20; e++ {
		ex, _ := h.addExpert(ws, "Invented expert "+strconv.Itoa(e))
		for _, q := range qs {
			m := 0.1 + 0.8*rng.Float64()
			w := 0.02 + 0.2*rng.Float64()
			rv := workshop.Revision{QuestionID: q.ID, ExpertID: ex.ID, Answer: workshop.Answer{Values: []float64{
				max(0.001, m-w), m, min(0.999, m+w)}}}
			if err := h.db.SaveRevision(ctx, &rv); err != nil {
				b.Fatal(err)
			}
		}
	}
	return h, ws, qs[0]
}

// BenchmarkCalibrationPage20x15 serves the calibration page of 20 experts
// on 15 calibration questions: 35 reruns of the classical model.
func BenchmarkCalibrationPage20x15(b *testing.B) {
	h, ws, _ := largePanel(b)
	cpuPerOp(b, func() { getOK(b, h, calibrationPath(ws.ID)) })
}

// BenchmarkPanelStrength20x15 is what the warnings add to each question
// panel view when performance weights are on offer: gathering the
// calibration answers and scoring them.
func BenchmarkPanelStrength20x15(b *testing.B) {
	h, ws, _ := largePanel(b)
	d, err := h.srv.readWorkshopData(context.Background(), ws)
	if err != nil {
		b.Fatal(err)
	}
	cpuPerOp(b, func() {
		if v := panelStrength(d); v.Lead == "" {
			b.Fatal("performance weights not offered")
		}
	})
}
