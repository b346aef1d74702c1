package elicit

// trigamma is ψ′(x) = Σₖ 1/(x+k)² for x > 0, and pentagamma is
// ψ‴(x) = 6 Σₖ 1/(x+k)⁴: the recurrences ψ′(x) = ψ′(x+1) + 1/x² and
// ψ‴(x) = ψ‴(x+1) + 6/x⁴ carry x to at least polygammaShift, where the
// asymptotic series (Abramowitz & Stegun 1964, 6.4.12 and 6.4.14)
//
//	ψ′(x) ~ 1/x + 1/(2x²) + Σₖ B₂ₖ/x^(2k+1),
//	ψ‴(x) ~ 2/x³ + 3/x⁴ + Σₖ B₂ₖ (2k+1)(2k+2)/x^(2k+3),
//
// with six Bernoulli terms, leaves a relative error below 1e-15. gonum
// has the digamma function but not these two; the tests check them
// against SciPy's polygamma. The global-minimum certificate of the fit
// (fit_global.go) uses them to bound second derivatives of I_x(α, β).
func trigamma(x float64) float64 {
	var s float64
	for x < polygammaShift {
		s += 1 / (x * x)
		x++
	}
	w := 1 / (x * x)
	// B₂ = 1/6, B₄ = −1/30, B₆ = 1/42, B₈ = −1/30, B₁₀ = 5/66, B₁₂ = −691/2730.
	series := 1/x + w/2 + (w/x)*(1.0/6+w*(-1.0/30+w*(1.0/42+w*(-1.0/30+w*(5.0/66+w*(-691.0/2730))))))
	return s + series
}

// pentagamma is ψ‴(x); see trigamma.
func pentagamma(x float64) float64 {
	var s float64
	for x < polygammaShift {
		x2 := x * x
		s += 6 / (x2 * x2)
		x++
	}
	w := 1 / (x * x)
	x3 := w / x
	// B₂ₖ(2k+1)(2k+2) for k = 1…6: 1/6·12, −1/30·30, 1/42·56, −1/30·90,
	// 5/66·132, −691/2730·182.
	series := 2*x3 + 3*w*w + x3*w*(2+w*(-1+w*(4.0/3+w*(-3+w*(10+w*(-691.0*182/2730))))))
	return s + series
}

// polygammaShift is where the asymptotic series take over.
const polygammaShift = 12
