package server

import (
	"fmt"
	"hash/fnv"
	"strconv"

	"wardload/internal/stats"
	"wardload/web"
)

// separationReps is the number of bootstrap replicates per pair of
// tiers, whatever the tiers hold: a replicate costs O(1) (the resample's
// median is drawn from its order statistics, stats.MedianShiftTest), so a
// year of observations costs no more than a week. The Monte Carlo error
// of an interval end, the 2.5% or 97.5% quantile of B replicates, is about
// √(p(1−p)/B)/f(q); for a near-normal bootstrap distribution with
// standard deviation σ that is √(0.025·0.975/2000)/φ(1.96)·σ ≈ 0.06σ,
// about 3% of the interval's half-width (1.96σ). With the 200 replicates
// a year of data used to get it was about 10%.
const separationReps = 2000

// separationVM tests whether the tiers with observations differ in care
// time (Kruskal–Wallis) and, for each pair of neighbouring tiers in display
// order, whether the higher tier's median is clearly above (a 95%
// bootstrap interval of the difference of medians). The bootstrap is
// seeded from the ward and the window, so the page reads the same on every
// load. Nil with fewer than two tiers with observations or no spread.
func separationVM(d *reviewData, trs []*tierReview) *web.SeparationVM {
	var groups [][]float64
	var with []*tierReview
	for _, tr := range trs {
		if len(tr.values) > 0 {
			groups = append(groups, tr.values)
			with = append(with, tr)
		}
	}
	kw, err := stats.KruskalWallisTest(groups)
	if err != nil {
		return nil
	}
	vm := &web.SeparationVM{Caution: stats.SeparationCaution}
	p := "p < 0.001"
	if kw.P >= 0.001 {
		p = "p = " + strconv.FormatFloat(kw.P, 'f', 3, 64)
	}
	verdict := "the tiers differ in care time more than chance would explain"
	if kw.P >= 0.05 {
		verdict = "the tiers do not differ clearly in care time"
	}
	vm.Overall = fmt.Sprintf("Across %d tiers and %d observations, %s (Kruskal–Wallis H = %.1f, %d degrees of freedom, %s; ε² = %.2f, the share of the ranks' spread that lies between tiers).",
		kw.Groups, kw.N, verdict, kw.H, kw.DF, p, kw.EpsilonSquared)
	h := fnv.New64a()
	fmt.Fprintf(h, "separation|%s|%s|%s", d.ward.Code, d.params.from, d.params.to)
	seed := h.Sum64()
	small := false
	for i := 1; i < len(with); i++ {
		lo, up := with[i-1], with[i]
		m, err := stats.MedianShiftTest(lo.values, up.values, 0.95, separationReps, seed+uint64(i))
		if err != nil {
			continue
		}
		if len(lo.values) < 10 || len(up.values) < 10 {
			small = true
		}
		vm.Pairs = append(vm.Pairs, stats.SeparationVerdict(lo.tier.Label, up.tier.Label, m, "min"))
	}
	vm.Method = "Kruskal–Wallis rank test with the tie correction (χ² approximation); for neighbouring tiers, the difference " +
		"of median care minutes per patient per shift with a 95% percentile bootstrap interval (tiers resampled separately)."
	if small {
		vm.Method += " A tier with fewer than 10 observations makes its interval rough."
	}
	return vm
}
