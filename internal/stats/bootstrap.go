package stats

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"
)

// BootstrapTier is one tier's input to BootstrapTotals: its observed
// per-shift minutes and the number of its patients on the projected shift.
type BootstrapTier struct {
	Values   []float64 // observed per-patient shift minutes, not modified
	Patients int       // census of the tier, ≥ 0
}

// bootstrapChunk is the number of draws that share one random stream. The
// split into chunks is fixed, so results do not depend on how many
// goroutines run them.
const bootstrapChunk = 4096

// streamKey is mixed with the chunk index to give each chunk its own second
// PCG seed word; any fixed odd constant would do (this one is 2⁶⁴/φ).
const streamKey = 0x9e3779b97f4a7c15

// BootstrapTotals simulates draws totals of shift care minutes with a
// two-level nonparametric bootstrap. For each draw and each tier k with
// m_k values and n_k patients:
//
//	r_1..r_m  ~ iid Uniform{values of tier k}      (resample the observations)
//	p_1..p_n  ~ iid Uniform{r_1..r_m}              (draw the shift's patients)
//	total     = Σ_k Σ_i p_i
//
// The first level carries the uncertainty of the tier's mean and shape
// (the m_k observations are one sample of many possible), the second the
// patient-to-patient variation. With σ̂² = s²(m−1)/m the plug-in variance,
// a tier's bootstrap total has mean n·ȳ and variance
//
//	n·σ̂²·(1 − 1/m) + n²·σ̂²/m
//
// the counterpart of the analytic model's two terms (slightly smaller for
// small m, as plug-in variances are).
//
// Drawing p_i from the resample is the same as drawing an index j
// uniformly in [0, m) and taking r_j, so r_j is made only when first
// referenced in a draw (a per-tier cache with generation stamps). A draw
// therefore costs one 64-bit random output per patient (its low half picks
// j, its high half r_j when needed) instead of Σ(m_k + n_k) bounded
// integers, with the same distribution as materialising every r_j.
//
// Randomness: draws are split into fixed chunks of 4096; chunk c uses
// math/rand/v2's PCG-DXSM generator (rand.PCG) seeded with
// (seed, splitmix64(c ⊕ 0x9e3779b97f4a7c15)), and bounded integers use
// Lemire's multiply-shift method with rejection. Totals are plain sums in
// a fixed order (no multiply-add that a compiler could fuse), so the same
// seed gives the same totals bit for bit on every platform and for any
// GOMAXPROCS; chunks run on up to min(GOMAXPROCS, 4) goroutines.
//
// It panics if draws < 1, a tier has Patients < 0, or a tier with patients
// has no values (callers validate user input first; see Project).
//
// References: Efron, B. & Tibshirani, R. J. (1993). An Introduction to the
// Bootstrap, ch. 6; Davison, A. C. & Hinkley, D. V. (1997). Bootstrap
// Methods and their Application, section on hierarchical data (resample
// at both levels; section number from memory, §3.8); Lemire, D. (2019).
// Fast random integer generation in an interval. ACM TOMACS 29(1);
// O'Neill, M. E. (2014). PCG, HMC-CS-2014-0905.
func BootstrapTotals(tiers []BootstrapTier, draws int, seed uint64) []float64 {
	if draws < 1 {
		panic("stats: BootstrapTotals needs draws ≥ 1")
	}
	for _, t := range tiers {
		if t.Patients < 0 {
			panic("stats: BootstrapTotals tier with negative patients")
		}
		if t.Patients > 0 && len(t.Values) == 0 {
			panic("stats: BootstrapTotals tier with patients but no values")
		}
		if len(t.Values) > math.MaxUint32 {
			panic("stats: BootstrapTotals tier with too many values")
		}
	}
	return inChunks(draws, func() func(out []float64, c int) {
		w := newBootstrapWorker(tiers)
		return func(out []float64, c int) { w.run(out, seed, uint64(c)) }
	})
}

// inChunks fills draws values in fixed chunks of bootstrapChunk, chunk c
// into out[c·4096 : …], on up to min(GOMAXPROCS, 4) goroutines; worker is
// called once per goroutine for its own fill function (its own scratch
// space). The split does not depend on the goroutines, so each chunk's
// own random stream gives the same values for any GOMAXPROCS.
func inChunks(draws int, worker func() func(out []float64, c int)) []float64 {
	out := make([]float64, draws)
	chunks := (draws + bootstrapChunk - 1) / bootstrapChunk
	workers := min(runtime.GOMAXPROCS(0), 4, chunks)
	next := make(chan int, chunks)
	for c := range chunks {
		next <- c
	}
	close(next)
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			fill := worker()
			for c := range next {
				lo := c * bootstrapChunk
				fill(out[lo:min(lo+bootstrapChunk, draws)], c)
			}
		})
	}
	wg.Wait()
	return out
}

// tierCache is one tier's lazily materialised resample: cache[j] holds r_j
// when stamp[j] equals the current draw's generation.
type tierCache struct {
	values   []float64
	patients int
	m        uint32
	cache    []float64
	stamp    []uint32
}

type bootstrapWorker struct {
	tiers []tierCache
}

func newBootstrapWorker(tiers []BootstrapTier) *bootstrapWorker {
	w := &bootstrapWorker{}
	for _, t := range tiers {
		if t.Patients == 0 {
			continue // contributes nothing and consumes no randomness
		}
		m := len(t.Values)
		w.tiers = append(w.tiers, tierCache{
			values: t.Values, patients: t.Patients, m: uint32(m),
			cache: make([]float64, m), stamp: make([]uint32, m),
		})
	}
	return w
}

// run fills out with the totals of one chunk. The bounded-integer step is
// written out in the loop; TestBootstrapDeterministic pins the first
// totals. (Until December 2026 the generator was a copy of rand.PCG's
// step kept in registers; it gave the same sequence, and the stdlib
// generator measured no slower in BenchmarkBootstrapTotals.)
func (w *bootstrapWorker) run(out []float64, seed, chunk uint64) {
	g := rand.NewPCG(seed, splitmix64(chunk^streamKey))
	for k := range w.tiers {
		clear(w.tiers[k].stamp) // generations restart at 1 in every chunk
	}
	for d := range out {
		gen := uint32(d + 1)
		total := 0.0
		for k := range w.tiers {
			t := &w.tiers[k]
			// Locals, so the slice headers are not reloaded after every store.
			m, stamp, cache, values := t.m, t.stamp, t.cache, t.values
			for range t.patients {
				// One 64-bit output: the low half picks the patient's slot j
				// in the resample, the high half (used only if r_j is not
				// made yet in this draw) picks which observation r_j is.
				u := g.Uint64()
				p := uint64(uint32(u)) * uint64(m)
				if uint32(p) < m {
					p = rejectLow(g, p, m)
				}
				j := uint32(p >> 32)
				if stamp[j] != gen {
					q := (u >> 32) * uint64(m)
					if uint32(q) < m {
						q = rejectLow(g, q, m)
					}
					cache[j] = values[q>>32]
					stamp[j] = gen
				}
				total += cache[j]
			}
		}
		out[d] = total
	}
}

// splitmix64 is the SplitMix64 finaliser (Steele, Lea & Flood 2014), used to
// turn a chunk index into a well-mixed second seed word.
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// QuantileMethodSimulated names how Simulation quantiles are computed.
const QuantileMethodSimulated = "Hyndman-Fan type 7; Monte Carlo SE of a quantile = half the distance between the order statistics at ranks N·p ∓ √(N·p·(1−p)); of the mean = sd/√N"

// simQuantiles are the probabilities Simulation reports besides the cover
// level, in the order of its fields P10, P50 and P90.
var simQuantiles = [3]float64{0.1, 0.5, 0.9}

// summariseTotals reads the simulation summary off the totals, which it
// reorders: instead of sorting all N totals it selects only the order
// statistics the type 7 quantiles and their standard errors need
// (multiSelect in quantile.go, an introselect), which is several times
// faster for N = 100,000. The mean is taken first, in draw order.
func summariseTotals(totals []float64, seed uint64, cover float64) Simulation {
	s, _ := summariseTotalsWith(totals, seed, cover, nil)
	return s
}

// summariseTotalsWith is summariseTotals that also returns the type 7
// quantiles of totals at each of extra.
func summariseTotalsWith(totals []float64, seed uint64, cover float64, extra []float64) (Simulation, []float64) {
	s := Simulation{Draws: len(totals), Seed: seed, QuantileMethod: QuantileMethodSimulated}
	if len(totals) >= 2 {
		mean, sd := MeanSD(totals)
		s.Mean, s.MeanSE = mean, Defined(sd/math.Sqrt(float64(len(totals))))
	} else {
		s.Mean = totals[0]
	}
	ps := append(simQuantiles[:], cover)
	var ks []int
	for _, p := range extra {
		j, _ := type7Pos(len(totals), p)
		ks = append(ks, j, min(j+1, len(totals)-1))
	}
	for _, p := range ps {
		j, _ := type7Pos(len(totals), p)
		ks = append(ks, j, min(j+1, len(totals)-1))
		if lo, hi, ok := seRanks(len(totals), p); ok {
			ks = append(ks, lo, hi)
		}
	}
	slices.Sort(ks)
	multiSelect(totals, 0, slices.Compact(ks), 2*bits.Len(uint(len(totals))))
	dst := [len(simQuantiles) + 1]struct {
		q  *float64
		se *Number
	}{{&s.P10, &s.P10SE}, {&s.P50, &s.P50SE}, {&s.P90, &s.P90SE}, {&s.Cover, &s.CoverSE}}
	for i, p := range ps {
		*dst[i].q, *dst[i].se = type7Selected(totals, p), quantileSE(totals, p)
	}
	q := make([]float64, len(extra))
	for i, p := range extra {
		q[i] = type7Selected(totals, p)
	}
	return s, q
}

// type7Pos returns the 0-based index j and weight g of the Hyndman & Fan
// (1996) type 7 quantile of n values (R's default):
//
//	h = (n−1)·p,  j = ⌊h⌋,  g = h − j,  Q(p) = x₍ⱼ₎ + g·(x₍ⱼ₊₁₎ − x₍ⱼ₎)
func type7Pos(n int, p float64) (j int, g float64) {
	h := float64(float64(n-1) * p) // rounded before the subtraction below: no fused multiply-add
	j = int(h)
	return j, h - float64(j)
}

// type7Selected is the type 7 p-quantile of x, in which the order
// statistics at type7Pos's j and j+1 must be in place (x sorted, or
// selected). The product is converted explicitly so that no platform fuses
// it into a multiply-add: simulated quantiles stay bit-identical everywhere.
func type7Selected(x []float64, p float64) float64 {
	j, g := type7Pos(len(x), p)
	if j >= len(x)-1 {
		return x[len(x)-1]
	}
	return x[j] + float64(g*(x[j+1]-x[j]))
}

// seRanks returns the 0-based indices of the order statistics at 1-based
// ranks ⌊N·p − √(N·p·(1−p))⌋ and ⌈N·p + √(N·p·(1−p))⌉, and false when
// either falls outside 1..N.
func seRanks(n int, p float64) (lo, hi int, ok bool) {
	fn := float64(n)
	half := math.Sqrt(fn * p * (1 - p))
	np := float64(fn * p)
	lo = int(math.Floor(np - half))
	hi = int(math.Ceil(np + half))
	if lo < 1 || hi > n {
		return 0, 0, false
	}
	return lo - 1, hi - 1, true
}

// quantileSE is the Monte Carlo standard error of the p-quantile of N
// simulated values x (with seRanks' order statistics in place), from the
// distribution-free order-statistic interval: the number of values below
// the true quantile is Binomial(N, p), so the order statistics at ranks
// N·p ∓ √(N·p·(1−p)) bracket it with about 68 % probability, and half
// their distance estimates one standard error. Undefined when either rank
// falls outside 1..N (too few draws). Reference: Conover, W. J. (1999).
// Practical Nonparametric Statistics, 3rd ed., §3.2 (quantile confidence
// intervals; from memory).
func quantileSE(x []float64, p float64) Number {
	lo, hi, ok := seRanks(len(x), p)
	if !ok {
		return Undefined
	}
	return Defined((x[hi] - x[lo]) / 2)
}

// rejectLow finishes Lemire's (2019) bounded-integer method: prod is x·n
// for a 32-bit x whose low word fell under n. If that low word is also
// under 2³² mod n the product is biased and x is redrawn (from the low half
// of a fresh output of g) until it is not. Returns the accepted product,
// whose high word is the uniform integer in [0, n). Rare (probability <
// n/2³²), so kept out of the loop body.

func rejectLow(g *rand.PCG, prod uint64, n uint32) uint64 {
	thresh := -n % n
	for uint32(prod) < thresh {
		prod = uint64(uint32(g.Uint64())) * uint64(n)
	}
	return prod
}
