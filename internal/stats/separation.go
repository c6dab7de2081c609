package stats

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/wardload"
)

// KruskalWallis is the Kruskal–Wallis rank test that several samples come
// from one distribution, here: that acuity tiers do not differ in care
// time.
type KruskalWallis struct {
	H      float64 // tie-corrected statistic
	DF     int     // groups − 1
	P      float64 // upper tail of χ²_DF at H
	Ties   float64 // the tie correction C (1: no ties)
	N      int     // values in all groups
	Groups int     // groups with at least one value
	// EpsilonSquared is the effect size ε² = H / (N − 1): the share of the
	// ranks' variance that lies between tiers, from 0 (no separation) to
	// 1 (Tomczak, M. & Tomczak, E. (2014), Trends in Sport Sciences 1(21),
	// 19–25, eq. 4; Kelley, T. L. (1935)).
	EpsilonSquared float64
}

// KruskalWallisTest ranks all values together (ties get the mean of the
// ranks they span) and computes, with R_i the rank sum of group i of n_i
// values and N = Σ n_i,
//
//	H = [12 / (N(N+1)) · Σ R_i²/n_i − 3(N+1)] / C,   C = 1 − Σ_t (t³ − t) / (N³ − N)
//
// over groups with values (t: the size of each group of tied values), and
// refers H to χ² with (groups − 1) degrees of freedom (Kruskal, W. H. &
// Wallis, W. A. (1952), JASA 47(260), 583–621; Hollander, M. & Wolfe, D.
// A. (1973), Nonparametric Statistical Methods, §6.1). The χ²
// approximation is what R's kruskal.test uses; it is rough below about 5
// values per group. Empty groups are left out. EINVALID with fewer than
// two non-empty groups, or with all values equal (no ranks to compare).
func KruskalWallisTest(groups [][]float64) (KruskalWallis, error) {
	var all []float64
	var sizes []int
	for _, g := range groups {
		if len(g) == 0 {
			continue
		}
		for _, v := range g {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return KruskalWallis{}, wardload.Errorf(wardload.EINVALID, "Care minutes must be finite numbers.")
			}
		}
		all = append(all, g...)
		sizes = append(sizes, len(g))
	}
	if len(sizes) < 2 {
		return KruskalWallis{}, wardload.Errorf(wardload.EINVALID, "Comparing tiers needs observations in at least two tiers.")
	}
	n := float64(len(all))
	ranks := midRanks(all)
	var sum float64
	at := 0
	for _, size := range sizes {
		r := 0.0
		for _, v := range ranks[at : at+size] {
			r += v
		}
		sum += r * r / float64(size)
		at += size
	}
	sorted := slices.Sorted(slices.Values(all))
	var tie float64
	for i := 0; i < len(sorted); {
		j := i
		for j+1 < len(sorted) && sorted[j+1] == sorted[i] {
			j++
		}
		t := float64(j - i + 1)
		tie += t*t*t - t
		i = j + 1
	}
	c := 1 - tie/(n*n*n-n)
	if c <= 0 {
		return KruskalWallis{}, wardload.Errorf(wardload.EINVALID, "All care minutes are equal, so the tiers cannot be compared.")
	}
	h := (12/(n*(n+1))*sum - 3*(n+1)) / c
	h = max(h, 0) // rounding can leave −1e−15 when every group has the same ranks
	df := len(sizes) - 1
	return KruskalWallis{
		H: h, DF: df, Ties: c, N: len(all), Groups: len(sizes),
		P:              distuv.ChiSquared{K: float64(df)}.Survival(h),
		EpsilonSquared: h / (n - 1),
	}, nil
}

// MedianShift is the difference of medians between two tiers (upper −
// lower) with a bootstrap confidence interval.
type MedianShift struct {
	Lower, Upper float64 // the two tiers' medians
	Difference   float64 // Upper − Lower
	Low, High    float64 // percentile bootstrap interval of the difference
	Level        float64
	Reps         int
}

// MedianShiftTest estimates median(upper) − median(lower) (type 7
// medians) and its percentile bootstrap interval at the given level:
// each of reps replicates resamples each tier with replacement to its own
// size, independently, and takes the difference of the resampled medians;
// the interval is the type 7 quantiles (1 ∓ level)/2 of the replicates
// (Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap,
// §13.3, the two-sample design of §8.3). The replicates use math/rand/v2's
// PCG seeded with (seed, 1): the same input and seed give the same
// interval. A replicate's medians are drawn from the order statistics of
// the resample (resampledMedian), exactly as resampling would give them
// but in O(1), so the cost is O(n log n + reps) whatever the tier sizes. With few values per tier the medians' bootstrap distribution
// is lumpy and the interval is rough; callers should say so below about
// 10 values. EINVALID when a tier has no values, reps < 100 or the level
// is outside (0, 1).
func MedianShiftTest(lower, upper []float64, level float64, reps int, seed uint64) (MedianShift, error) {
	if len(lower) == 0 || len(upper) == 0 {
		return MedianShift{}, wardload.Errorf(wardload.EINVALID, "Both tiers need observations.")
	}
	if reps < 100 || !(level > 0 && level < 1) {
		return MedianShift{}, wardload.Errorf(wardload.EINVALID, "The bootstrap needs at least 100 replicates and a level between 0 and 1.")
	}
	m := MedianShift{Lower: medianOf(lower), Upper: medianOf(upper), Level: level, Reps: reps}
	m.Difference = m.Upper - m.Lower
	r := rand.New(rand.NewPCG(seed, 1))
	lo, up := slices.Sorted(slices.Values(lower)), slices.Sorted(slices.Values(upper))
	diffs := make([]float64, reps)
	for i := range diffs {
		// Resample the lower tier first, then the upper one.
		a := resampledMedian(r, lo)
		diffs[i] = resampledMedian(r, up) - a
	}
	slices.Sort(diffs)
	m.Low = HFQuantile(7, (1-level)/2, diffs)
	m.High = HFQuantile(7, (1+level)/2, diffs)
	return m, nil
}

// resampledMedian draws the type 7 median of one bootstrap resample of
// sorted (n values drawn with replacement) without drawing the resample,
// in O(1): only two of its order statistics matter. A drawn index is
// ⌊n·V⌋ with V uniform on (0, 1), which keeps order, so the resample's
// (k+1)-th smallest index is ⌊n·V₍ₖ₊₁₎⌋, where V₍ₖ₊₁₎ ~ Beta(k+1, n−k) is
// the (k+1)-th smallest of n uniforms; given it, the next one is
// V₍ₖ₊₁₎ + (1 − V₍ₖ₊₁₎)·(1 − U^(1/(n−k−1))), the smallest of the n−k−1
// uniforms above it (David, H. A. & Nagaraja, H. N. (2003), Order
// Statistics, 3rd ed., §2.2 and §2.5). The median so drawn has exactly
// the distribution of the resample's median; TestResampledMedianExact
// checks that against all nⁿ resamples of small samples with ties.
func resampledMedian(r *rand.Rand, sorted []float64) float64 {
	n := len(sorted)
	h := float64(n-1) * 0.5
	k := int(h) // 0-based order statistics k and k+1
	at := func(v float64) float64 { return sorted[min(int(float64(n)*v), n-1)] }
	if n == 1 {
		return sorted[0]
	}
	v := distuv.Beta{Alpha: float64(k + 1), Beta: float64(n - k), Src: r}.Rand()
	xk := at(v)
	if h == float64(k) {
		return xk
	}
	next := v + (1-v)*(1-math.Pow(r.Float64(), 1/float64(n-k-1)))
	return xk + (h-float64(k))*(at(next)-xk)
}

// SeparationCaution is said wherever tier separation is shown.
const SeparationCaution = "These tests say only whether the tiers differ in timed care minutes. " +
	"Whether the acuity tiers are valid is a clinical judgement, not a statistical one."

// SeparationVerdict says in one sentence what a median shift between two
// adjacent tiers shows, naming them and the unit.
func SeparationVerdict(lower, upper string, m MedianShift, unit string) string {
	level := fmt.Sprintf("%.0f%%", 100*m.Level)
	switch {
	case m.Low > 0:
		return fmt.Sprintf("%s needs clearly more care time than %s: median %+.0f %s (%s interval %+.0f to %+.0f).",
			upper, lower, m.Difference, unit, level, m.Low, m.High)
	case m.High < 0:
		return fmt.Sprintf("%s needs clearly less care time than %s although it is the higher tier: median %+.0f %s (%s interval %+.0f to %+.0f).",
			upper, lower, m.Difference, unit, level, m.Low, m.High)
	default:
		return fmt.Sprintf("%s and %s no longer differ clearly in care time: median %+.0f %s (%s interval %+.0f to %+.0f includes 0).",
			lower, upper, m.Difference, unit, level, m.Low, m.High)
	}
}
