package elicit

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
// that the kernel can be normalised. For normalised weights and αᵢ, βᵢ > 0
// that holds in exact arithmetic, but the weighted sum of subnormal
// parameters can underflow to 0; LogPool then returns an *InputError with
// RuleLogPoolValid rather than an invalid Beta.
func LogPool(dists []ScaledBeta, weights []float64) (ScaledBeta, error) {
	w, err := poolWeights(dists, weights)
	if err != nil {
		return ScaledBeta{}, err
	}
	var a, b float64
	for i, d := range dists {
		a += w[i] * d.Alpha
		b += w[i] * d.Beta.Beta
	}
	if !(a > 0) {
		return ScaledBeta{}, inputErr("alpha", RuleLogPoolValid, "pooled alpha %v", a)
	}
	if !(b > 0) {
		return ScaledBeta{}, inputErr("beta", RuleLogPoolValid, "pooled beta %v", b)
	}
	return ScaledBeta{Beta: Beta{Alpha: a, Beta: b}, Lower: dists[0].Lower, Upper: dists[0].Upper}, nil
}
