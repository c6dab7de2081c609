package stats

import (
	"math"
	"slices"
)

// horizonAcc accumulates BacktestCensus's figures at one horizon.
type horizonAcc struct {
	checked, compared, scaled int
	in, pit                   []float64
	absErr, absNaive, absAvg  float64
	scaledErr                 float64
}

// add scores one observed count y against its draws and benchmarks.
func (a *horizonAcc) add(y int, draws []int32, levels []float64, hasNaive bool, naive, avg, scale float64) {
	if a.in == nil {
		a.in, a.pit = make([]float64, len(levels)), make([]float64, len(levels))
	}
	sorted := slices.Clone(draws)
	slices.Sort(sorted)
	n := float64(len(sorted))
	below, _ := slices.BinarySearch(sorted, int32(y))  // draws < y
	upto, _ := slices.BinarySearch(sorted, int32(y)+1) // draws ≤ y
	fLo, fHi := float64(below)/n, float64(upto)/n
	a.checked++
	for i, l := range levels {
		lo, hi := countQuantile(sorted, (1-l)/2), countQuantile(sorted, (1+l)/2)
		if y >= lo && y <= hi {
			a.in[i]++
		}
		a.pit[i] += pitBandShare(fLo, fHi, (1-l)/2, (1+l)/2)
	}
	if !hasNaive {
		return
	}
	med := float64(countQuantile(sorted, 0.5))
	e := math.Abs(float64(y) - med)
	a.compared++
	a.absErr += e
	a.absNaive += math.Abs(float64(y) - naive)
	a.absAvg += math.Abs(float64(y) - avg)
	if scale > 0 {
		a.scaled++
		a.scaledErr += e / scale
	}
}

// finish turns the sums into a CensusHorizon.
func (a *horizonAcc) finish(h, levels int) CensusHorizon {
	r := CensusHorizon{Horizon: h, Checked: a.checked, Compared: a.compared, Scaled: a.scaled,
		Coverage: make([]float64, levels), PITCoverage: make([]float64, levels)}
	if a.checked > 0 {
		for i := range levels {
			r.Coverage[i] = a.in[i] / float64(a.checked)
			r.PITCoverage[i] = a.pit[i] / float64(a.checked)
		}
	}
	if a.compared > 0 {
		c := float64(a.compared)
		r.MAE, r.MAENaive, r.MAEAverage = a.absErr/c, a.absNaive/c, a.absAvg/c
		if a.absNaive > 0 {
			r.RelMAE = a.absErr / a.absNaive
		}
	}
	if a.scaled > 0 {
		r.MASE = a.scaledErr / float64(a.scaled)
	}
	return r
}

// censusBenchmarks holds, per tier and shift, the fitted history's counts
// by day, their mean (the fixed average census) and the in-sample
// seasonal-naive scale of MASE.
type censusBenchmarks struct {
	byDay map[occKey][]int
	mean  map[string][]float64
	sc    map[string][]float64
}

func newCensusBenchmarks(train []censusRecord) *censusBenchmarks {
	b := &censusBenchmarks{byDay: map[occKey][]int{}, mean: map[string][]float64{}, sc: map[string][]float64{}}
	n, pairs := map[string]float64{}, map[string]float64{}
	for _, r := range train {
		b.byDay[occKey{r.day, r.shift}] = r.counts
	}
	for _, r := range train {
		if b.mean[r.shift] == nil {
			b.mean[r.shift] = make([]float64, len(r.counts))
			b.sc[r.shift] = make([]float64, len(r.counts))
		}
		n[r.shift]++
		prev := b.byDay[occKey{r.day - 7, r.shift}]
		if prev != nil {
			pairs[r.shift]++
		}
		for k, c := range r.counts {
			b.mean[r.shift][k] += float64(c)
			if prev != nil {
				b.sc[r.shift][k] += math.Abs(float64(c - prev[k]))
			}
		}
	}
	for s := range b.mean {
		for k := range b.mean[s] {
			b.mean[s][k] /= n[s]
			if pairs[s] > 0 {
				b.sc[s][k] /= pairs[s]
			}
		}
	}
	return b
}

// naive is the seasonal-naive forecast of tier k on t from origin: the
// same shift on t's weekday in the newest week up to the origin, or up to
// three weeks before it when that day has no census.
func (b *censusBenchmarks) naive(k int, t censusTarget, origin int) (float64, bool) {
	d := t.day - 7*((t.day-origin+6)/7)
	for range 4 {
		if c := b.byDay[occKey{d, t.shift}]; c != nil {
			return float64(c[k]), true
		}
		d -= 7
	}
	return 0, false
}

func (b *censusBenchmarks) average(k int, shift string) float64 { return b.mean[shift][k] }

func (b *censusBenchmarks) scale(k int, shift string) float64 { return b.sc[shift][k] }
