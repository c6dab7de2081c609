package simstudy

import (
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sort"
	"sync"
)

// truthChunk is the number of truth draws that share one random stream.
const truthChunk = 8192

// Truth is a large Monte Carlo sample of the next shift's total care
// minutes under a scenario, sorted once: e^b · Σ_k Σ_{i≤n_k} Y_ki with a
// fresh shift effect b ~ N(0, ShiftSD²) and the distributions at the
// projected date (drift factor 1).
type Truth struct {
	totals []float64 // ascending
}

// NewTruth draws n totals of s. Chunk c of truthChunk draws uses PCG seeded
// with (seed, c), so the sample does not depend on GOMAXPROCS.
func NewTruth(s *Scenario, n int, seed uint64) *Truth {
	totals := make([]float64, n)
	chunks := (n + truthChunk - 1) / truthChunk
	next := make(chan int, chunks)
	for c := range chunks {
		next <- c
	}
	close(next)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), chunks) {
		wg.Go(func() {
			for c := range next {
				r := rand.New(rand.NewPCG(seed, uint64(c)))
				for d := c * truthChunk; d < min((c+1)*truthChunk, n); d++ {
					totals[d] = s.drawTotal(r)
				}
			}
		})
	}
	wg.Wait()
	slices.Sort(totals)
	return &Truth{totals: totals}
}

// drawTotal draws one true shift total.
func (s *Scenario) drawTotal(r *rand.Rand) float64 {
	total := 0.0
	for _, t := range s.Tiers {
		for range t.Patients {
			total += t.Dist.Draw(r)
		}
	}
	if s.ShiftSD > 0 {
		total *= math.Exp(s.ShiftSD * r.NormFloat64())
	}
	return total
}

// Len is the number of draws.
func (t *Truth) Len() int { return len(t.totals) }

// Exceed is the true shortfall at a capacity: the share of totals strictly
// above it (a shift whose care exactly fills the capacity is not short).
func (t *Truth) Exceed(capacity float64) float64 {
	i := sort.Search(len(t.totals), func(i int) bool { return t.totals[i] > capacity })
	return float64(len(t.totals)-i) / float64(len(t.totals))
}

// Quantile is the lower empirical p-quantile of the totals (Hyndman & Fan
// type 1), for reports and tests.
func (t *Truth) Quantile(p float64) float64 {
	i := int(math.Ceil(p*float64(len(t.totals)))) - 1
	return t.totals[min(max(i, 0), len(t.totals)-1)]
}

// exceedSlack absorbs the rounding of 1 − cover (1 − 0.9 is
// 0.09999999999999998), so a shortfall of exactly 10% meets a 90% cover.
const exceedSlack = 1e-12

// PerNurse is the direct care minutes one care-giving nurse gives in a
// shift: shift hours × 60 × the direct-care fraction.
const PerNurse = ShiftHours * 60 * DirectCareFraction

// Capacity is the direct care minutes of a headcount on s: the nurse in
// charge who does not count gives none (InCharge).
func (s *Scenario) Capacity(headcount int) float64 {
	return float64(max(0, headcount-s.InCharge())) * PerNurse
}

// Oracle is the smallest headcount N whose true shortfall
// Exceed(Capacity(N)) is at most 1 − cover: the smallest care-giving count
// that meets the cover, plus the nurse in charge where that nurse gives no
// direct care.
func (t *Truth) Oracle(s *Scenario, cover float64) int {
	n := s.InCharge()
	for t.Exceed(s.Capacity(n)) > 1-cover+exceedSlack {
		n++
	}
	return n
}
