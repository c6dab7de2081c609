package stats

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// NormalQuantile returns the p-quantile of the standard normal distribution,
//
//	z = Φ⁻¹(p),   Φ(z) = ½·erfc(−z/√2)
//
// computed with gonum's mathext.NormalQuantile (Wichura 1988, algorithm AS 241,
// PPND16, relative error about 1e-16), so no rounded table constant enters
// the bands. NormalQuantile(0) is −Inf and NormalQuantile(1) is +Inf.
//
// It panics if p is NaN or outside [0, 1]: callers validate user input first.
//
// Reference: Wichura, M. J. (1988). Algorithm AS 241: The percentage points
// of the normal distribution. Applied Statistics 37(3), 477–484.
func NormalQuantile(p float64) float64 {
	if math.IsNaN(p) || p < 0 || p > 1 {
		panic("stats: NormalQuantile probability outside [0, 1]")
	}
	return mathext.NormalQuantile(p)
}

// NormalUpperTail returns the probability that a standard normal variable
// exceeds z,
//
//	Q(z) = 1 − Φ(z) = ½·erfc(z/√2)
//
// written with erfc rather than 1 − Φ so that small upper-tail probabilities
// keep their relative precision. NaN in gives NaN out.
//
// Reference: Abramowitz, M. & Stegun, I. A. (1964). Handbook of Mathematical
// Functions, formula 26.2.29 (from memory).
func NormalUpperTail(z float64) float64 {
	return 0.5 * math.Erfc(z/math.Sqrt2)
}

// TwoSidedZ returns the multiplier z of a central normal band holding the
// two-sided probability level,
//
//	z = Φ⁻¹((1 + level) / 2)
//
// so that μ ± z·σ covers level of a Normal(μ, σ²) variable.
//
// It panics unless 0 < level < 1.
func TwoSidedZ(level float64) float64 {
	if !(level > 0 && level < 1) {
		panic("stats: TwoSidedZ level outside (0, 1)")
	}
	return NormalQuantile((1 + level) / 2)
}
