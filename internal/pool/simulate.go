package pool

import (
	"math"
	"math/rand/v2"
	"slices"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// Limits of a simulation: enough draws that a chance near 1 − cover is
// known to about ±0.4 points at 10,000 draws; at most what a command line
// finishes in seconds.
const (
	MinDraws = 10_000
	MaxDraws = 2_000_000
	MaxRho   = 0.95
)

// streamKey separates the pool's random stream from the projections'.
const streamKey = 0x706f6f6c666c6f74 // "poolflot"

// Simulate returns the float pool when the wards' needs share a common
// correlation rho, by Monte Carlo with a one-factor Gaussian copula. For
// each of `draws` draws, with V, ε_w independent standard normals,
//
//	Z_w    = √ρ·V + √(1−ρ)·ε_w,   U_w = Φ(Z_w)
//	need_w = min{ n : P(need_w ≤ n) ≥ U_w }     (the law's quantile; beyond the table when U_w > 1 − Beyond_w)
//	S      = Σ_w max(0, need_w − staff_w)
//
// and F is the smallest pool with (#draws with S > F or a need beyond its
// table) / draws ≤ 1 − cover. Each ward keeps its own law (the copula
// changes only how the wards move together); ρ is the correlation of the
// latent normals, a stated sensitivity (a hospital-wide surge: winter
// illness, a major incident), not an estimate. At ρ = 0 the result is the
// simulated counterpart of Exact. AnyShortBuffered is simulated with the
// same draws. ShortLow/ShortHigh are the 95% Wilson interval of Short.
//
// Randomness: math/rand/v2's PCG seeded with (seed, streamKey); its
// NormFloat64. Same seed, same result.
//
// References: Gaussian copula, Nelsen, R. B. (2006), An Introduction to
// Copulas, 2nd ed., Springer, §2.3 (from memory); the one-factor form as in
// Vasicek, O. (2002), "The distribution of loan portfolio value", Risk
// 15(12) (from memory); Eppen (1979) and the newsvendor fractile as Exact.
// Preconditions as Exact, and 0 ≤ rho ≤ MaxRho, MinDraws ≤ draws ≤
// MaxDraws; EINVALID naming "rho" or "draws" otherwise.
func Simulate(wards []Ward, cover, rho float64, draws int, seed uint64) (*Result, error) {
	if err := checkWards(wards, cover); err != nil {
		return nil, err
	}
	if !(rho >= 0 && rho <= MaxRho) {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "rho", "The correlation must be between 0 and %g.", MaxRho)
	}
	if draws < MinDraws || draws > MaxDraws {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "draws", "Draws must be between %d and %d.", MinDraws, MaxDraws)
	}
	buffers := make([]int, len(wards))
	sumBuffers := 0
	cdfs := make([][]float64, len(wards))
	for i, w := range wards {
		b, err := Buffer(w, cover)
		if err != nil {
			return nil, err
		}
		buffers[i] = b
		sumBuffers += b
		cdfs[i] = cumulative(w.Need.PMF, w.Need.Beyond)
	}
	const unplaced = math.MaxInt32 // S of a draw with a need beyond its table
	r := rand.New(rand.NewPCG(seed, streamKey))
	a, b := math.Sqrt(rho), math.Sqrt(1-rho)
	sums := make([]int, draws)
	beyond, anyShortBuffered := 0, 0
	for d := range sums {
		v := r.NormFloat64()
		s, out, short := 0, false, false
		for i, w := range wards {
			u := stdNormalCDF(a*v + b*r.NormFloat64())
			k, ok := quantileIndex(cdfs[i], u)
			if !ok {
				out, short = true, true
				continue
			}
			need := w.Need.From + k
			s += max(0, need-w.Staff)
			if need > w.Staff+buffers[i] {
				short = true
			}
		}
		if out {
			beyond++
			s = unplaced
		}
		if short {
			anyShortBuffered++
		}
		sums[d] = s
	}
	if float64(beyond)/float64(draws) > 1-cover+probTol {
		return nil, unreachable("")
	}
	slices.Sort(sums)
	// above(F) = #{S > F}; F is the smallest with above ≤ (1 − cover)·draws.
	limit := (1 - cover) * float64(draws)
	res := &Result{Method: "simulation", Rho: rho, Cover: cover, Draws: draws, ShortFewer: math.NaN(),
		Unplaced: float64(beyond) / float64(draws), Buffers: buffers, SumBuffers: sumBuffers,
		AnyShortBuffered: float64(anyShortBuffered) / float64(draws)}
	above := func(f int) int {
		i, _ := slices.BinarySearch(sums, f+1)
		return draws - i
	}
	for f := 0; ; f++ {
		k := above(f)
		if float64(k) <= limit+probTol*float64(draws) {
			res.Floats, res.ShortDraws = f, k
			res.Short = float64(k) / float64(draws)
			res.ShortLow, res.ShortHigh = stats.WilsonInterval(k, draws)
			break
		}
		res.ShortFewer = float64(k) / float64(draws)
	}
	res.Gain = res.SumBuffers - res.Floats
	return res, nil
}

// cumulative returns the running sums of pmf: P(need ≤ From + i), which
// end at 1 − Beyond; exactly 1 when Beyond is 0, so that rounding in the
// sum never sends a draw beyond the table.
func cumulative(pmf []float64, beyond float64) []float64 {
	c := make([]float64, len(pmf))
	s := 0.0
	for i, p := range pmf {
		s += p
		c[i] = s
	}
	if beyond == 0 {
		c[len(c)-1] = 1
	}
	return c
}

// quantileIndex returns the smallest i with cdf[i] ≥ u, and false when u
// lies above the last (the need is beyond the table).
func quantileIndex(cdf []float64, u float64) (int, bool) {
	i, _ := slices.BinarySearch(cdf, u)
	return i, i < len(cdf)
}

// stdNormalCDF is Φ(z) = ½·erfc(−z/√2).
func stdNormalCDF(z float64) float64 { return stats.NormalUpperTail(-z) }
