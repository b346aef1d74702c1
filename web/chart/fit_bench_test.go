package chart

import (
	"io"
	"math"
	"syscall"
	"testing"
	"time"

	"github.com/parley-elicit/parley/elicit"
)

// cpuNs reports the process CPU time per iteration (getrusage), steadier
// than wall time on a shared machine.
func cpuNs(b *testing.B, f func()) {
	var before, after syscall.Rusage
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &before)
	n := 0
	for b.Loop() {
		f()
		n++
	}
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &after)
	cpu := time.Duration(after.Utime.Nano()-before.Utime.Nano()) + time.Duration(after.Stime.Nano()-before.Stime.Nano())
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(n), "cpu-ns/op")
}

// benchFitView is the fit preview of a 5/50/95 judgement (invented
// inverter failure proportion), the case of elicit's BenchmarkFit3, with
// what the fit computed.
func benchFitView(b *testing.B) FitView {
	j := elicit.Judgement{Probs: []float64{0.05, 0.5, 0.95}, Values: []float64{0.01, 0.04, 0.12}, Lower: 0, Upper: 1}
	f, err := elicit.FitQuantiles(j)
	if err != nil {
		b.Fatal(err)
	}
	v := FitView{ID: "bench", Quantity: "proportion failing in year one", Lower: 0, Upper: 1,
		Dist: f.Dist, Percentiles: f.Percentiles}
	for i, p := range f.Probs {
		v.Points = append(v.Points, Point{X: f.Stated[i], P: p})
		v.Fitted = append(v.Fitted, f.Fitted[i])
		v.FittedProbs = append(v.FittedProbs, p+f.ProbErrors[i])
	}
	return v
}

// BenchmarkFitPreviewPicture draws the fit preview's picture, both
// layouts and the table, as for an expert's new draft: each iteration
// nudges α in its last digits, so the remembered spans, knots and paths
// miss and every curve is drawn afresh, while the axes, whose window and
// top are snapped to round steps, stay put and are remembered, as they
// are for a draft that changes the fit a little. Target: no more CPU than
// the fit itself.
func BenchmarkFitPreviewPicture(b *testing.B) {
	v := benchFitView(b)
	alpha := v.Dist.Alpha
	cpuNs(b, func() {
		alpha = math.Nextafter(alpha, math.Inf(1))
		v.Dist.Alpha = alpha
		if err := Fit(v).Render(b.Context(), io.Discard); err != nil {
			b.Fatal(err)
		}
	})
}

// BenchmarkFitPreviewPictureNewAxes is BenchmarkFitPreviewPicture for a
// draft that moves the axes: the remembered frames are forgotten at every
// iteration, so they are laid out and rendered afresh too.
func BenchmarkFitPreviewPictureNewAxes(b *testing.B) {
	v := benchFitView(b)
	alpha := v.Dist.Alpha
	cpuNs(b, func() {
		alpha = math.Nextafter(alpha, math.Inf(1))
		v.Dist.Alpha = alpha
		remembered.frames.Reset()
		if err := Fit(v).Render(b.Context(), io.Discard); err != nil {
			b.Fatal(err)
		}
	})
}

// BenchmarkFitPreviewCurve is the part of BenchmarkFitPreviewPicture that
// is numbers alone: the fitted Beta's span (its percentiles confirmed,
// its 0.1% and 99.9% points solved for) and the knots of its cubic
// pieces, which both layouts share; no paths, words or templates. It
// measures how much of the picture's cost no way of writing the SVG can
// remove while the curves are drawn to smoothTolerance.
func BenchmarkFitPreviewCurve(b *testing.B) {
	v := benchFitView(b)
	alpha := v.Dist.Alpha
	x0, x1 := 0.0, 0.22 // the picture's window (snapped), as drawn
	cpuNs(b, func() {
		alpha = math.Nextafter(alpha, math.Inf(1))
		v.Dist.Alpha = alpha
		s := smoothSpan(v.Dist, v.Lower, v.Upper, &v.Percentiles)
		if ks, ok := smoothKnots(v.Dist, x0, x1, s); !ok || len(ks) < 2 {
			b.Fatal("no knots")
		}
	})
}
