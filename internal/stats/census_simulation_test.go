package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Hamilton's largest-remainder method, worked by hand: 5,3,2 into 7 beds
// is 3.5, 2.1, 1.4 → 3,2,1 and the one bed left to the largest remainder
// (0.5): 4,2,1. Three equal remainders go to the lower tiers first.
func TestCapToBeds(t *testing.T) {
	for _, tc := range []struct {
		in, want []int32
		beds     int
		capped   bool
	}{
		{[]int32{5, 3, 2}, []int32{4, 2, 1}, 7, true},
		{[]int32{1, 1, 1}, []int32{1, 1, 0}, 2, true},
		{[]int32{0, 9, 0}, []int32{0, 4, 0}, 4, true},
		{[]int32{2, 2}, []int32{2, 2}, 4, false},
	} {
		y := append([]int32(nil), tc.in...)
		if got := capToBeds(y, tc.beds); got != tc.capped || !equalInt32(y, tc.want) {
			t.Errorf("capToBeds(%v, %d) = %v, %v; want %v, %v", tc.in, tc.beds, y, got, tc.want, tc.capped)
		}
	}
}

func equalInt32(a, b []int32) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// The compound of the count draws and the bed cap against exact
// enumeration: two tiers with known means (no parameter uncertainty),
// y1 ~ Poisson(2), y2 ~ Poisson(1.5), 3 beds. P(capped y1 = j) is the sum
// of Poisson(2)(a)·Poisson(1.5)(b) over the (a, b) that capToBeds maps to
// j (a, b < 40 holds all but 1e-30 of the mass). 200,000 draws: each
// frequency is compared within 4.5 binomial SEs (a false alarm about 1 in
// 10⁵ per cell).
func TestCensusCapExact(t *testing.T) {
	f := &censusFit{models: []*tierModel{fixedMean(0, 2), fixedMean(1, 1.5)}}
	targets := []censusTarget{{day: 0, weekday: 1, shift: "D"}}
	const draws = 200_000
	s := f.simulate(targets, 3, draws, 11)
	exact := make([]float64, 4)
	p1, p2 := distuv.Poisson{Lambda: 2}, distuv.Poisson{Lambda: 1.5}
	for a := range 40 {
		for b := range 40 {
			y := []int32{int32(a), int32(b)}
			capToBeds(y, 3)
			exact[y[0]] += p1.Prob(float64(a)) * p2.Prob(float64(b))
		}
	}
	freq := make([]float64, 4)
	for _, v := range s.tier(0, 0) {
		if v > 3 {
			t.Fatalf("capped draw %d above 3 beds", v)
		}
		freq[v]++
	}
	for j := range freq {
		freq[j] /= draws
		se := math.Sqrt(exact[j] * (1 - exact[j]) / draws)
		if math.Abs(freq[j]-exact[j]) > 4.5*se {
			t.Errorf("P(y1 = %d): simulated %.5f, exact %.5f (SE %.5f)", j, freq[j], exact[j], se)
		}
	}
}

// fixedMean is a Poisson tier model with mean mu and no parameter
// uncertainty (Cov = 0).
func fixedMean(k int, mu float64) *tierModel {
	return &tierModel{tier: k, family: FamilyQuasiPoisson, weekdays: []int{1}, shifts: []string{"D"},
		zero: map[cellKey]bool{}, fit: &CountFit{Beta: []float64{math.Log(mu), 0}, Dispersion: 1},
		chol: mat.NewTriDense(2, mat.Lower, nil)}
}

// The count draws' first two moments: Var y = φμ for φ > 1 (gamma–Poisson)
// and Binomial(⌈μ/(1−φ)⌉, …) for φ < 1 (μ = 5, φ = 0.5: Binomial(10, 0.5),
// variance exactly 2.5); NB2 μ + μ²/θ. 100,000 draws; the mean within 4.5
// SEs and the variance within 4.5 SEs of the sample variance, SE from the
// fourth moment approximated as (σ²)²·(2/(n−1) + κ/n) with κ ≤ 1.5 here.
func TestCensusDrawMoments(t *testing.T) {
	for _, tc := range []struct {
		name             string
		m                *tierModel
		mu, mean, varian float64
	}{
		{"phi 2.5", &tierModel{family: FamilyQuasiPoisson, fit: &CountFit{Dispersion: 2.5}}, 5, 5, 12.5},
		{"phi 0.5", &tierModel{family: FamilyQuasiPoisson, fit: &CountFit{Dispersion: 0.5}}, 5, 5, 2.5},
		{"nb2 theta 4", &tierModel{family: FamilyNegBin2, fit: &CountFit{Dispersion: 1, Theta: 4}}, 6, 6, 6 + 36.0/4},
	} {
		r := rand.New(rand.NewPCG(1, 2))
		const n = 100_000
		var s, ss float64
		for range n {
			y := tc.m.drawCount(r, tc.mu, tc.m.fit.Dispersion)
			s += y
			ss += y * y
		}
		mean := s / n
		v := (ss - n*mean*mean) / (n - 1)
		if math.Abs(mean-tc.mean) > 4.5*math.Sqrt(tc.varian/n) {
			t.Errorf("%s: mean %.4f, want %g", tc.name, mean, tc.mean)
		}
		if se := tc.varian * math.Sqrt(2.0/(n-1)+1.5/n); math.Abs(v-tc.varian) > 4.5*se {
			t.Errorf("%s: variance %.4f, want %g (SE %.4f)", tc.name, v, tc.varian, se)
		}
	}
}
