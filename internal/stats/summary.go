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

// MarshalJSON writes the number at full precision, or null.
func (n Number) MarshalJSON() ([]byte, error) {
	if !n.Defined {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, n.Value, 'g', -1, 64), nil
}

// UnmarshalJSON reads what MarshalJSON writes, so a stored result can be
// decoded again: null is undefined, a number is defined.
func (n *Number) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*n = Undefined
		return nil
	}
	v, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		return err
	}
	*n = Defined(v)
	return nil
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
	mean, ss := moments(x, sum)
	return mean, math.Sqrt(ss / float64(len(x)-1))
}

// moments is the second pass of MeanSD given the first pass's sum: it
// returns the refined mean and Σ(xᵢ − mean)² with the correction applied.
func moments(x []float64, sum float64) (mean, ss float64) {
	m := sum / float64(len(x))
	var s1, s2 float64
	for _, v := range x {
		d := v - m
		s1 += d
		s2 += float64(d * d) // explicit conversion forbids a fused multiply-add, so results are bit-identical on every platform
	}
	return corrected(m, s1, s2, len(x))
}

// corrected is the final step of the corrected two-pass algorithm, shared
// by moments and Summarize: from the first-pass mean m and the second
// pass's s1 = Σ dᵢ and s2 = Σ dᵢ² over n values it returns the refined mean
// m + s1/n and Σ(xᵢ − mean)² = s2 − s1²/n, never below 0.
func corrected(m, s1, s2 float64, n int) (mean, ss float64) {
	fn := float64(n)
	ss = s2 - s1*s1/fn
	if ss < 0 { // rounding on a constant column
		ss = 0
	}
	return m + s1/fn, ss
}

// errNoValues is the user-data error for an empty column or tier.
func errNoValues() error {
	return wardload.Errorf(wardload.EINVALID, "There are no values to summarize.")
}

// Fences are a lower and an upper cut-off.
type Fences struct {
	Lower float64
	Upper float64
}

// Outlier kinds.
const (
	OutlierMild    = "mild"    // outside an inner fence, not outside an outer one
	OutlierExtreme = "extreme" // outside an outer fence
)

// Outlier is a value strictly outside the inner fences. Index is its
// 0-based position in the input slice.
type Outlier struct {
	Index int
	Value float64
	Kind  string
}

// Summary describes one sample, e.g. the care minutes of one tier.
type Summary struct {
	Quartiles   string // convention of Q1, Median, Q3
	N           int
	Min, Max    float64
	Q1, Median  float64
	Q3, IQR     float64
	InnerFences Fences // Q1 − 1.5·IQR, Q3 + 1.5·IQR
	OuterFences Fences // Q1 − 3·IQR,   Q3 + 3·IQR
	Outliers    []Outlier
	Mean        float64
	SD          Number // n − 1; undefined for n = 1
	SE          Number // SD/√n; undefined for n = 1
	Bins        Binning
}

// Summarize returns the summary of x with quartiles under convention (see
// QuartilesOf):
//
//	IQR          = Q3 − Q1
//	inner fences = Q1 − 1.5·IQR, Q3 + 1.5·IQR
//	outer fences = Q1 − 3·IQR,   Q3 + 3·IQR
//	outlier      x < lower inner or x > upper inner (a value equal to a
//	             fence is not outside it); "extreme" when also outside an
//	             outer fence, else "mild"
//	mean, SD     as MeanSD (SD with n − 1)
//	SE           = SD / √n
//	bins         BinsFor(n, IQR, min, max)
//
// Fences and the mild/extreme names follow Tukey (1977), Exploratory Data
// Analysis, ch. 2; with hinges they flag the same points as R's
// boxplot.stats(x)$out. Outliers are listed in input order.
//
// For n = 1 every quartile, the mean and the fences equal the value, there
// are no outliers and SD and SE are undefined. An empty x or an unknown
// convention is EINVALID. x is not modified and never held twice: the
// quartiles come from orderStats (sampled selection, O(n)); mean, SD and
// the fence test take one more pass, and listing the outliers a third
// only when there are any. It panics if x contains NaN or ±Inf.
func Summarize(x []float64, convention string) (*Summary, error) {
	if !wardload.ValidQuartiles(convention) {
		return nil, errConvention(convention)
	}
	n := len(x)
	if n == 0 {
		return nil, errNoValues()
	}
	q, sc := quartilesScan(x, convention)
	lo, hi, sum := sc.min, sc.max, sc.sum
	iqr := q.Q3 - q.Q1
	s := &Summary{
		Quartiles: convention, N: n, Min: lo, Max: hi,
		Q1: q.Q1, Median: q.Median, Q3: q.Q3, IQR: iqr,
		InnerFences: Fences{q.Q1 - 1.5*iqr, q.Q3 + 1.5*iqr},
		OuterFences: Fences{q.Q1 - 3*iqr, q.Q3 + 3*iqr},
		Bins:        BinsFor(n, iqr, lo, hi),
	}
	// Second pass: deviations from the first-pass mean (corrected two-pass,
	// as MeanSD) and a count of the outliers, so that their list is
	// allocated once at its size instead of growing by copies.
	m := sum / float64(n)
	var s1, s2 float64
	in, out := s.InnerFences, s.OuterFences
	count := 0
	for _, v := range x {
		d := v - m
		s1 += d
		s2 += float64(d * d) // explicit conversion forbids a fused multiply-add, so results are bit-identical on every platform
		if v < in.Lower || v > in.Upper {
			count++
		}
	}
	if count > 0 {
		s.Outliers = make([]Outlier, 0, count)
		for i, v := range x {
			if v < in.Lower || v > in.Upper {
				kind := OutlierMild
				if v < out.Lower || v > out.Upper {
					kind = OutlierExtreme
				}
				s.Outliers = append(s.Outliers, Outlier{Index: i, Value: v, Kind: kind})
			}
		}
	}
	mean, ss := corrected(m, s1, s2, n)
	s.Mean = mean
	if n > 1 {
		sd := math.Sqrt(ss / float64(n-1))
		s.SD = Defined(sd)
		s.SE = Defined(sd / math.Sqrt(float64(n)))
	}
	return s, nil
}
