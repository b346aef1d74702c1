package elicit

import (
	"context"
	"fmt"
	"syscall"
	"testing"
	"time"
)

// benchCPU runs f in the benchmark loop and, besides wall-clock ns/op,
// reports cpu-ns/op: the process's CPU time per operation (getrusage),
// less disturbed than wall time when other work shares the cores.
func benchCPU(b *testing.B, f func() error) {
	var before, after syscall.Rusage
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &before)
	n := 0
	for b.Loop() {
		if err := f(); err != nil {
			b.Fatal(err)
		}
		n++
	}
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &after)
	cpu := time.Duration(after.Utime.Nano()-before.Utime.Nano()) + time.Duration(after.Stime.Nano()-before.Stime.Nano())
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(n), "cpu-ns/op")
}

// BenchmarkCriterion: one criterion at 1000 trials under the invented
// inverter prior Beta(2, 38), with the warm-started intervals
// (plan_intervals.go); the Direct variants compute each outcome's
// interval from nothing with EqualTailed and HDI, the comparison that
// justifies the warm starts (over the same outcomes, the central ones
// CriterionValue keeps).
func BenchmarkCriterion(b *testing.B) {
	prior := Beta{2, 38}
	for _, g := range []SampleSizeGoal{
		{Criterion: CriterionALC, Interval: IntervalEqual, Level: 0.95, Length: 0.05},
		{Criterion: CriterionALC, Interval: IntervalHPD, Level: 0.95, Length: 0.05},
		{Criterion: CriterionACC, Interval: IntervalEqual, Level: 0.95, Length: 0.05},
		{Criterion: CriterionACC, Interval: IntervalHPD, Level: 0.95, Length: 0.05},
		{Criterion: CriterionWOC, Interval: IntervalEqual, Level: 0.95, Length: 0.05},
	} {
		b.Run(string(g.Criterion)+"-"+string(g.Interval), func(b *testing.B) {
			benchCPU(b, func() error { _, err := CriterionValue(prior, g, 1000); return err })
		})
	}
	for _, kind := range []IntervalKind{IntervalEqual, IntervalHPD} {
		b.Run("alc-"+string(kind)+"-Direct", func(b *testing.B) {
			benchCPU(b, func() error {
				pmf, err := PriorPredictive(prior, 1000)
				if err != nil {
					return err
				}
				lo, hi := centralOutcomes(pmf, tailMass/2)
				var s neumaierSum
				for x := lo; x <= hi; x++ {
					p := pmf[x]
					d := Beta{prior.Alpha + float64(x), prior.Beta + float64(1000-x)}
					lo, hi, err := EqualTailed(d, 0.95)
					if kind == IntervalHPD {
						lo, hi, err = HDI(d, 0.95)
					}
					if err != nil {
						return err
					}
					s.add(p * (hi - lo))
				}
				return nil
			})
		})
	}
}

// BenchmarkSampleSize: the whole search under Beta(2, 38): ALC at width
// 0.04 (n = 362) and 0.02 (n = 1564), both found by the scan of every n.
func BenchmarkSampleSize(b *testing.B) {
	for _, l := range []float64{0.04, 0.02} {
		g := SampleSizeGoal{Criterion: CriterionALC, Interval: IntervalEqual, Level: 0.95, Length: l}
		b.Run(fmt.Sprintf("width%g", l), func(b *testing.B) {
			benchCPU(b, func() error { _, err := SampleSize(context.Background(), Beta{2, 38}, g); return err })
		})
	}
}

// BenchmarkFromIntervalQuantiles: the exact quantile match of an invented
// 90% interval [0.03, 0.12].
func BenchmarkFromIntervalQuantiles(b *testing.B) {
	benchCPU(b, func() error { _, err := FromIntervalQuantiles(0.03, 0.12, 0.9); return err })
}
