// Package stats is wardload's statistics core: quartiles by named
// convention, tier summaries with Tukey fences, histogram bin rules and the
// relationship between two columns (and, in other files, the workload
// model). It is pure: no I/O, no clock, only the standard library, gonum
// and the domain package. Programmer errors (NaN in the input, unsorted
// input where sorted is required) panic; situations user data can cause
// (no values, one value, a constant column) give *wardload.Error with code
// EINVALID or a result marked undefined, never NaN.
package stats

import (
	"math"
	"strconv"

	"wardload/internal/wardload"
)

// Number is a result that may be undefined, such as the standard deviation
// of one value. It marshals to a JSON number or null, so an undefined
// result is never shown as 0 or NaN.
type Number struct {
	Value   float64
	Defined bool
}

// Defined returns a defined Number.
func Defined(v float64) Number { return Number{Value: v, Defined: true} }

// Undefined is the undefined Number.
var Undefined = Number{}

// Ptr returns the value's address, or nil when undefined.
func (n Number) Ptr() *float64 {
	if !n.Defined {
		return nil
	}
	v := n.Value
	return &v
}

// MarshalJSON writes the number at full precision, or null.
func (n Number) MarshalJSON() ([]byte, error) {
	if !n.Defined {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, n.Value, 'g', -1, 64), nil
}

// String formats the number with up to 6 significant digits, or "undefined".
func (n Number) String() string {
	if !n.Defined {
		return "undefined"
	}
	return strconv.FormatFloat(n.Value, 'g', 6, 64)
}

// MeanSD returns the arithmetic mean and the sample standard deviation of x
// (estimator with n − 1, Bessel's correction):
//
//	mean = Σ xᵢ / n
//	sd   = √( (Σ dᵢ² − (Σ dᵢ)²/n) / (n − 1) ),  dᵢ = xᵢ − mean
//
// computed in two passes with the correction term of the "corrected
// two-pass algorithm" (Chan, Golub & LeVeque 1983, "Algorithms for
// computing the sample variance", The American Statistician 37(3)), which
// stays accurate when the mean is large relative to the spread (NIST StRD
// NumAcc4). The one-pass Σx² − n·x̄² form is never used: it cancels
// catastrophically. The mean is refined by (Σ dᵢ)/n from the second pass.
//
// MeanSD panics if len(x) < 2 (the SD is undefined; callers check n) or if
// x contains NaN or ±Inf.
func MeanSD(x []float64) (mean, sd float64) {
	if len(x) < 2 {
		panic("stats: MeanSD needs at least two values")
	}
	var sum float64
	for _, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			panic("stats: MeanSD: value is NaN or infinite")
		}
		sum += v
	}
	mean, ss, _ := moments(x, sum)
	return mean, math.Sqrt(ss / float64(len(x)-1))
}

// moments is the second pass of MeanSD given the first pass's sum: it
// returns the refined mean and Σ(xᵢ − mean)² with the correction applied.
func moments(x []float64, sum float64) (mean, ss, comp float64) {
	n := float64(len(x))
	m := sum / n
	var s1, s2 float64
	for _, v := range x {
		d := v - m
		s1 += d
		s2 += d * d
	}
	ss = s2 - s1*s1/n
	if ss < 0 { // rounding on a constant column
		ss = 0
	}
	return m + s1/n, ss, s1
}

// errNoValues is the user-data error for an empty column or tier.
func errNoValues() error {
	return wardload.Errorf(wardload.EINVALID, "There are no values to summarize.")
}
