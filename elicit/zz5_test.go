package elicit

import (
	"fmt"
	"math"
	"testing"
	"time"
)

func TestZZ5(t *testing.T) {
	for _, j := range []Judgement{
		{[]float64{0.05, 0.5, 0.95}, []float64{0.01, 0.04, 0.12}, 0, 1},
		{[]float64{0.25, 0.5, 0.75}, []float64{0.02, 0.5, 0.98}, 0, 1},
		{[]float64{0.1, 0.5, 0.9}, []float64{0.001, 0.02, 0.15}, 0, 1},
		{[]float64{0.1, 0.5, 0.9}, []float64{0.85, 0.98, 0.999}, 0, 1},
		{[]float64{0.05, 0.5, 0.95}, []float64{0.28, 0.30, 0.32}, 0, 1},
		{[]float64{0.25, 0.5, 0.75}, []float64{0.1, 0.11, 0.9}, 0, 1},
		{[]float64{0.02, 0.5, 0.55, 0.98}, []float64{4.1341e-08, 0.00029683, 0.00031181, 0.049176}, 0, 1},
	} {
		q := newLSQ(j.unit(), j.Probs)
		t0 := time.Now()
		st := q.momentStart()
		th, s := q.localFit(st)
		e1 := q.evals
		q.sseJac(th)
		_, ok := q.certify(th, s)
		e2 := q.evals
		res := q.fitGlobal([][2]float64{st})
		fmt.Printf("%v: a=%.4g b=%.4g S=%.4g cert=%v evals fit %d cert %d; global a=%.4g b=%.4g S=%.5g cert=%v bnb=%v evals %d  %v\n", j.Values, math.Exp(th[0]), math.Exp(th[1]), s, ok, e1, e2-e1, math.Exp(res.th[0]), math.Exp(res.th[1]), res.s, res.certified, res.bnb, q.evals-e2, time.Since(t0))
	}
}
