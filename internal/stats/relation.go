package stats

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/wardload"
)

// Relation describes the relationship between two numeric columns x and y.
// Values that the data cannot determine (r of a constant column, the
// residual SD of two points) are undefined, never 0 or NaN.
type Relation struct {
	N           int
	PearsonR    Number
	SpearmanRho Number
	Intercept   Number // least-squares line y = Intercept + Slope·x
	Slope       Number
	RSquared    Number
	ResidualSD  Number // √(SSE/(n − 2))
	// Flagged lists the indices of the pairs whose x or y lies strictly
	// outside the inner Tukey fences of its column (hinges, as Summarize);
	// nil with fewer than 4 pairs. PearsonRWithout is r without them,
	// undefined when none are flagged or fewer than 3 pairs remain.
	Flagged         []int
	PearsonRWithout Number
	Warnings        []string
}

// Rules of thumb behind the warnings (common practice, no single source).
const (
	fewPairs        = 10   // fewer pairs than this: "too few points"
	influenceChange = 0.1  // |r − r without fence-flagged points| at least this: influence warning
	curvatureAlpha  = 0.05 // significance of the x² term
	curvatureShare  = 0.10 // and x² must remove at least this share of the straight line's SSE
)

// Relate returns the relationship between x and y:
//
//	Sxx = Σ(xᵢ − x̄)²,  Syy = Σ(yᵢ − ȳ)²,  Sxy = Σ(xᵢ − x̄)(yᵢ − ȳ)
//	Pearson r    = Sxy / √(Sxx·Syy)          undefined if Sxx or Syy is 0
//	Spearman ρ   = Pearson r of the ranks, tied values getting the mean
//	               of their ranks (mid-ranks)
//	slope        = Sxy / Sxx,  intercept = ȳ − slope·x̄   undefined if Sxx = 0
//	R²           = r²                         undefined if r is
//	residual SD  = √(SSE / (n − 2)),  SSE = Σ(yᵢ − intercept − slope·xᵢ)²
//	               undefined if Sxx = 0 or n < 3
//
// Sums are taken about the means (two-pass), as in Pearson (1896) and the
// least-squares normal equations; Spearman (1904) for ρ.
//
// Warnings, in plain language, are added for:
//   - fewer than 10 pairs (rule of thumb);
//   - curvature: the extra-sum-of-squares F-test for adding x² to the line
//     (Draper & Smith, Applied Regression Analysis, 3rd ed. 1998, ch. 6;
//     cited from memory) has p < 0.05 and x² removes at least 10% of the
//     line's SSE, so tiny but "significant" curvature in big files is not
//     flagged;
//   - influence: some pairs have x or y strictly outside the inner Tukey
//     fences (hinges, as Summarize) and r without them differs by at least
//     0.1, changes sign, or becomes undefined;
//   - undefined results (a constant column);
//   - always: correlation is not causation.
//
// It panics if len(x) != len(y) or a value is NaN or ±Inf; no pairs is
// EINVALID.
func Relate(x, y []float64) (*Relation, error) {
	if len(x) != len(y) {
		panic("stats: Relate: x and y differ in length")
	}
	for i := range x {
		if x[i]-x[i] != 0 || y[i]-y[i] != 0 {
			panic("stats: Relate: value is NaN or infinite")
		}
	}
	n := len(x)
	if n == 0 {
		return nil, wardload.Errorf(wardload.EINVALID, "There are no pairs of values to relate.")
	}
	rel := &Relation{N: n}
	fit := leastSquares(x, y)
	rel.PearsonR = fit.r
	if fit.sxx > 0 {
		rel.Slope = Defined(fit.slope)
		rel.Intercept = Defined(fit.intercept)
		if n >= 3 {
			rel.ResidualSD = Defined(math.Sqrt(fit.sse / float64(n-2)))
		}
	}
	if fit.r.Defined {
		rel.RSquared = Defined(fit.r.Value * fit.r.Value)
		rel.SpearmanRho = leastSquares(midRanks(x), midRanks(y)).r
	}

	if n < fewPairs {
		rel.Warnings = append(rel.Warnings, fmt.Sprintf("Only %d pairs: with fewer than %d, r and the line can change a lot with one more point.", n, fewPairs))
	}
	switch {
	case fit.sxx == 0 && fit.syy == 0:
		rel.Warnings = append(rel.Warnings, "Both columns are constant, so correlation and the line are undefined.")
	case fit.sxx == 0:
		rel.Warnings = append(rel.Warnings, "The x column is constant, so correlation and the line are undefined.")
	case fit.syy == 0:
		rel.Warnings = append(rel.Warnings, "The y column is constant, so correlation is undefined (the line is flat).")
	}
	if fit.sxx > 0 && fit.sse > 0 {
		if w := curvature(x, y, fit.sse); w != "" {
			rel.Warnings = append(rel.Warnings, w)
		}
	}
	rel.Flagged, rel.PearsonRWithout = fenceFlagged(x, y)
	if w := influence(n, len(rel.Flagged), fit.r, rel.PearsonRWithout); w != "" {
		rel.Warnings = append(rel.Warnings, w)
	}
	rel.Warnings = append(rel.Warnings, "Correlation is not causation: a relationship here does not show that one column drives the other.")
	return rel, nil
}

type lineFit struct {
	sxx, syy         float64
	r                Number
	slope, intercept float64
	sse              float64
}

// leastSquares fits y = a + b·x about the means (two-pass).
func leastSquares(x, y []float64) lineFit {
	n := float64(len(x))
	var sx, sy float64
	for i := range x {
		sx += x[i]
		sy += y[i]
	}
	mx, my := sx/n, sy/n
	var f lineFit
	var sxy float64
	for i := range x {
		dx, dy := x[i]-mx, y[i]-my
		f.sxx += dx * dx
		f.syy += dy * dy
		sxy += dx * dy
	}
	if f.sxx > 0 && f.syy > 0 {
		r := sxy / math.Sqrt(f.sxx*f.syy)
		f.r = Defined(math.Max(-1, math.Min(1, r)))
	}
	if f.sxx > 0 {
		f.slope = sxy / f.sxx
		f.intercept = my - f.slope*mx
		for i := range x {
			e := y[i] - f.intercept - f.slope*x[i]
			f.sse += e * e
		}
	}
	return f
}

// midRanks returns the 1-based ranks of x, ties sharing the mean of the
// ranks they span.
func midRanks(x []float64) []float64 {
	idx := make([]int, len(x))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, b int) int {
		switch {
		case x[a] < x[b]:
			return -1
		case x[a] > x[b]:
			return 1
		}
		return 0
	})
	r := make([]float64, len(x))
	for i := 0; i < len(idx); {
		j := i
		for j+1 < len(idx) && x[idx[j+1]] == x[idx[i]] {
			j++
		}
		mid := float64(i+j)/2 + 1
		for k := i; k <= j; k++ {
			r[idx[k]] = mid
		}
		i = j + 1
	}
	return r
}

// curvature returns a warning if adding x² to the line fits clearly better
// (see Relate), given the line's SSE.
func curvature(x, y []float64, sseLine float64) string {
	n := len(x)
	if n < 4 || distinct(x) < 3 {
		return ""
	}
	// Centre and scale x so that the x² column is not nearly collinear
	// with x; the fitted values, hence the SSE, do not change.
	mean, sd := MeanSD(x)
	a := mat.NewDense(n, 3, nil)
	for i, v := range x {
		z := (v - mean) / sd
		a.Set(i, 0, 1)
		a.Set(i, 1, z)
		a.Set(i, 2, z*z)
	}
	var qr mat.QR
	qr.Factorize(a)
	var beta mat.Dense
	if err := qr.SolveTo(&beta, false, mat.NewDense(n, 1, slices.Clone(y))); err != nil {
		return ""
	}
	var sseQuad float64
	for i := range x {
		e := y[i] - (beta.At(0, 0) + beta.At(1, 0)*a.At(i, 1) + beta.At(2, 0)*a.At(i, 2))
		sseQuad += e * e
	}
	gain := sseLine - sseQuad
	if gain <= 0 || gain/sseLine < curvatureShare {
		return ""
	}
	p := 0.0
	if sseQuad > 0 {
		f := gain / (sseQuad / float64(n-3))
		p = distuv.F{D1: 1, D2: float64(n - 3)}.Survival(f)
	}
	if p >= curvatureAlpha {
		return ""
	}
	ps := fmt.Sprintf("p = %.2g", p)
	if p < 0.001 {
		ps = "p < 0.001"
	}
	return fmt.Sprintf("The pattern looks curved, not straight: a curve with an x² term explains %.0f%% of what the straight line leaves unexplained (F-test %s). r and the line describe a straight-line trend only.", 100*gain/sseLine, ps)
}

func distinct(x []float64) int {
	var seen []float64
	for _, v := range x {
		if !slices.Contains(seen, v) {
			seen = append(seen, v)
			if len(seen) == 3 {
				break
			}
		}
	}
	return len(seen)
}

// fenceFlagged returns the indices of the pairs with x or y strictly
// outside the inner fences, and r without them (see Relation.Flagged).
func fenceFlagged(x, y []float64) ([]int, Number) {
	if len(x) < 4 {
		return nil, Number{}
	}
	sx, _ := Summarize(x, DefaultQuartiles)
	sy, _ := Summarize(y, DefaultQuartiles)
	flagged := make([]bool, len(x))
	var idx []int
	for _, s := range []*Summary{sx, sy} {
		for _, o := range s.Outliers {
			if !flagged[o.Index] {
				flagged[o.Index] = true
				idx = append(idx, o.Index)
			}
		}
	}
	slices.Sort(idx)
	if len(idx) == 0 || len(x)-len(idx) < 3 {
		return idx, Number{}
	}
	var kx, ky []float64
	for i := range x {
		if !flagged[i] {
			kx = append(kx, x[i])
			ky = append(ky, y[i])
		}
	}
	return idx, leastSquares(kx, ky).r
}

// influence returns a warning if the count flagged pairs of n change r
// by influenceChange or more (see Relate); without is r without them.
// Fewer than 3 pairs left say nothing either way.
func influence(n, count int, r, without Number) string {
	if count == 0 || n-count < 3 || (!r.Defined && !without.Defined) {
		return ""
	}
	switch {
	case r.Defined && !without.Defined:
		return fmt.Sprintf("%d pair(s) outside the Tukey fences decide the result: without them r is undefined (a column becomes constant), with them r = %.3f.", count, r.Value)
	case !r.Defined && without.Defined:
		return fmt.Sprintf("%d pair(s) outside the Tukey fences decide the result: without them r = %.3f.", count, without.Value)
	case r.Defined && (math.Abs(r.Value-without.Value) >= influenceChange || r.Value*without.Value < 0):
		return fmt.Sprintf("%d pair(s) outside the Tukey fences strongly influence the result: r = %.3f with them, %.3f without them.", count, r.Value, without.Value)
	}
	return ""
}
