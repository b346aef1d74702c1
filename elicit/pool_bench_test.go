package elicit

import (
	"syscall"
	"testing"
	"time"
)

// benchExperts is an invented panel of 20 experts on a failure rate, with
// shapes from vague to confident and unequal weights.
func benchExperts() ([]ScaledBeta, []float64) {
	ds := make([]ScaledBeta, 20)
	w := make([]float64, 20)
	for i := range ds {
		a := 1.5 + float64(i%5)*2.5
		b := 20 + float64(i)*15
		ds[i] = Unit(Beta{a, b})
		w[i] = 1 + float64(i%3)
	}
	return ds, w
}

func gridProbs(n int) []float64 {
	ps := make([]float64, n)
	for k := range ps {
		ps[k] = float64(k+1) / float64(n+1)
	}
	return ps
}

func BenchmarkPoolQuantiles20x99(b *testing.B) {
	ds, w := benchExperts()
	ps := gridProbs(99)
	b.ReportAllocs()
	for b.Loop() {
		p, err := LinearPool(ds, w)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := p.Quantiles(ps); err != nil {
			b.Fatal(err)
		}
	}
}

// benchPanel4 is an invented panel of four experts on a first-year
// failure proportion, one of them far more confident than the rest and
// off their centre: the pool has a spike on a broad hump, no single Beta
// fits it closely, and BestBeta must search beyond its first starts.
func benchPanel4() []ScaledBeta {
	return unitBetas(2.0, 40.6, 4.4, 77.1, 462, 14904, 6.5, 95)
}

func benchBestBeta(b *testing.B, ds []ScaledBeta, w []float64) {
	p, err := LinearPool(ds, w)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	var before, after syscall.Rusage
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &before)
	n := 0
	for b.Loop() {
		if _, err := p.BestBeta(); err != nil {
			b.Fatal(err)
		}
		n++
	}
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &after)
	cpu := time.Duration(after.Utime.Nano()-before.Utime.Nano()) + time.Duration(after.Stime.Nano()-before.Stime.Nano())
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(n), "cpu-ns/op")
}

func BenchmarkPoolBestBeta4(b *testing.B) { benchBestBeta(b, benchPanel4(), nil) }

func BenchmarkPoolBestBeta20(b *testing.B) {
	ds, w := benchExperts()
	benchBestBeta(b, ds, w)
}

func BenchmarkLogPool(b *testing.B) {
	ds, w := benchExperts()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := LogPool(ds, w); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkHDI(b *testing.B) {
	d := Beta{Alpha: 5.4, Beta: 71.2}
	for b.Loop() {
		if _, _, err := HDI(d, 0.95); err != nil {
			b.Fatal(err)
		}
	}
}
