package stats

import (
	"fmt"
	"math"
)

// wilsonZ is Φ⁻¹(0.975), the multiplier of a 95% interval (R 4.2.2:
// qnorm(0.975) = 1.959963984540054).
const wilsonZ = 1.959963984540054

// WilsonInterval returns the 95% Wilson score interval of a binomial
// proportion with k successes in n trials,
//
//	(p̂ + z²/2n ∓ z·√(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n)
//
// which, unlike p̂ ± z·√(p̂(1−p̂)/n), never collapses to a width of 0 at
// k = 0 or k = n. It panics unless 0 ≤ k ≤ n and n ≥ 1.
//
// Reference: Wilson, E. B. (1927). Probable inference, the law of
// succession, and statistical inference. JASA 22, 209–212; Brown, Cai &
// DasGupta (2001), Statistical Science 16(2), 101–133, eq. (4).
func WilsonInterval(k, n int) (low, high float64) {
	if n < 1 || k < 0 || k > n {
		panic("stats: WilsonInterval needs 0 ≤ k ≤ n, n ≥ 1")
	}
	fn := float64(n)
	p := float64(k) / fn
	z2 := wilsonZ * wilsonZ
	centre := p + z2/(2*fn)
	half := wilsonZ * math.Sqrt(p*(1-p)/fn+z2/(4*fn*fn))
	d := 1 + z2/fn
	low, high = max(0, (centre-half)/d), min(1, (centre+half)/d)
	if k == 0 {
		low = 0
	}
	if k == n {
		high = 1
	}
	return low, high
}

// Calibration summarises a ward's rolling-origin backtest (see Backtest)
// for a projection: how many past shifts' totals fell at or under the
// predictive quantile at Level.
type Calibration struct {
	Weeks  int     `json:"weeks"`
	Shifts int     `json:"shifts"` // shift occurrences checked
	Inside int     `json:"inside"` // of them, at or under the Level quantile
	Level  float64 `json:"level"`
	Basis  string  `json:"basis"` // "shift totals" or "single observations"
}

// CalibrationMinShifts: fewer checked shifts say too little to warn on.
const CalibrationMinShifts = 20

// Warn reports whether the backtest's hit rate is more than 5 points below
// cover (and rests on at least CalibrationMinShifts shifts).
func (c *Calibration) Warn(cover float64) bool {
	return c.Shifts >= CalibrationMinShifts && float64(c.Inside)/float64(c.Shifts) < cover-0.05
}

// Sentence says the backtest in words.
func (c *Calibration) Sentence(cover float64) string {
	if c.Shifts == 0 {
		return fmt.Sprintf("No past shift in the last %d weeks could be checked against its projection.", c.Weeks)
	}
	s := fmt.Sprintf("In the last %d weeks, %s of %d checked %s were at or under the %s level projected from the weeks before them; expected %s.",
		c.Weeks, percentText(float64(c.Inside)/float64(c.Shifts)), c.Shifts, c.Basis, percentText(c.Level), percentText(c.Level))
	if c.Warn(cover) {
		s += " That is more than 5 points short: on this ward the projections have under-estimated care time; treat the recommendation with caution and review the tiers."
	}
	return s
}
