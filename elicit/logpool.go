package elicit

import "math"

// LogPool returns the logarithmic opinion pool of dists, the normalised
// weighted geometric mean of the densities, f(x) ∝ Πᵢ fᵢ(x)^wᵢ (Genest &
// Zidek 1986, "Combining probability distributions: a critique and an
// annotated bibliography", Statist. Sci. 1: 114–148). For Betas on shared
// bounds the product is again a Beta kernel, with
//
//	α = Σᵢ wᵢ(αᵢ − 1) + 1,  β = Σᵢ wᵢ(βᵢ − 1) + 1.
//
// Weights are checked and normalised as by LinearPool (nil means equal
// weights). With Σ wᵢ = 1 the formula is α = Σᵢ wᵢαᵢ, which is how it is
// computed: the form with αᵢ − 1 loses every digit of an αᵢ far below 1
// to cancellation. The pool exists only when α and β are positive, so
// that the kernel can be normalised. With normalised weights α is a
// convex combination of the αᵢ, so it lies between the smallest and the
// largest of them and within [MinShape, MaxShape] like them; the rounding
// of the sum is kept inside that interval (min and max below), which is
// where the exact value lies.
func LogPool(dists []ScaledBeta, weights []float64) (ScaledBeta, error) {
	w, err := poolWeights(dists, weights)
	if err != nil {
		return ScaledBeta{}, err
	}
	var a, b float64
	aLo, aHi := math.Inf(1), math.Inf(-1)
	bLo, bHi := math.Inf(1), math.Inf(-1)
	for i, d := range dists {
		a += w[i] * d.Alpha
		b += w[i] * d.Beta.Beta
		if w[i] > 0 {
			aLo, aHi = math.Min(aLo, d.Alpha), math.Max(aHi, d.Alpha)
			bLo, bHi = math.Min(bLo, d.Beta.Beta), math.Max(bHi, d.Beta.Beta)
		}
	}
	a = math.Min(math.Max(a, aLo), aHi)
	b = math.Min(math.Max(b, bLo), bHi)
	if !(a > 0) {
		return ScaledBeta{}, inputErr("alpha", RuleLogPoolValid, "pooled alpha %v", a)
	}
	if !(b > 0) {
		return ScaledBeta{}, inputErr("beta", RuleLogPoolValid, "pooled beta %v", b)
	}
	return ScaledBeta{Beta: Beta{Alpha: a, Beta: b}, Lower: dists[0].Lower, Upper: dists[0].Upper}, nil
}
