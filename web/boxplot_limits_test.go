package web

import (
	"math"
	"testing"
)

// Care minutes near the float64 limits passed import (finite, ≥ 0) and made
// the review page's axis loop forever: 1.7e308 rounds up to a top of +Inf,
// and "v <= +Inf" never ends, so the tick slice grew until the server ran
// out of memory (seen on the running server, stack in NewBoxAxis). Without
// the guard this test does not return; it exhausts memory and the test
// binary dies, which fails the run.
func TestNewBoxAxisFloatLimits(t *testing.T) {
	for _, hi := range []float64{1.7e308, math.MaxFloat64, 9e307} {
		a := NewBoxAxis(hi)
		if !a.Empty && (math.IsInf(a.Hi, 0) || len(a.Ticks) > 12) {
			t.Errorf("NewBoxAxis(%g) = top %g, %d ticks", hi, a.Hi, len(a.Ticks))
		}
	}
	// A subnormal maximum underflows the step to 0.
	for _, hi := range []float64{math.SmallestNonzeroFloat64, 1e-320} {
		a := NewBoxAxis(hi)
		if !a.Empty && !(a.Hi > 0 && len(a.Ticks) > 1) {
			t.Errorf("NewBoxAxis(%g) = %+v", hi, a)
		}
	}
	for _, hi := range []float64{math.NaN(), math.Inf(1)} {
		if !NewBoxAxis(hi).Empty {
			t.Errorf("NewBoxAxis(%g) not empty", hi)
		}
	}
}
