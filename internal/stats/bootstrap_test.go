package stats

import (
	"math"
	"runtime"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// One patient from a tier of values 0, 1, 2: every value must be equally
// likely (m = 3 is not a power of two, so a biased bounded-integer step
// would show). 300,000 draws: each count is Binomial(300000, 1/3), SD ≈ 258;
// allow 5 SD.
func TestBootstrapUniformIndex(t *testing.T) {
	totals := BootstrapTotals([]BootstrapTier{{Values: []float64{0, 1, 2}, Patients: 1}}, 300_000, 3)
	var counts [3]int
	for _, v := range totals {
		counts[int(v)]++
	}
	sd := math.Sqrt(300_000 * (1.0 / 3) * (2.0 / 3))
	for v, c := range counts {
		if math.Abs(float64(c)-100_000) > 5*sd {
			t.Errorf("value %d drawn %d times of 300000, want about 100000", v, c)
		}
	}
}

// The two-level bootstrap has known moments. With σ̂² the population
// (divide-by-m) variance of a tier's m values and ȳ their mean, one tier
// with n patients has
//
//	E[total]   = n·ȳ
//	Var[total] = n·σ̂²·(1 − 1/m) + n²·σ̂²/m
//
// (within-resample variance has expectation σ̂²(1 − 1/m); the resample mean
// has variance σ̂²/m and enters every patient). A one-level bootstrap would
// give only n·σ̂², so this checks that patients of one draw really share
// one resample. Tier: m = 5, values 0, 10, 20, 30, 40 (ȳ = 20, σ̂² = 200),
// n = 10: E = 200, Var = 10·200·0.8 + 100·200/5 = 1600 + 4000 = 5600.
// 200,000 draws: the mean's MC SE is √(5600/200000) ≈ 0.167 (allow 5 SE);
// the variance's relative SE is about √(2/200000)·(kurtosis factor) < 1 %,
// allow 4 %.
func TestBootstrapTwoLevelMoments(t *testing.T) {
	const draws = 200_000
	totals := BootstrapTotals([]BootstrapTier{{Values: []float64{0, 10, 20, 30, 40}, Patients: 10}}, draws, 42)
	mean, sd := MeanSD(totals)
	if se := math.Sqrt(5600.0 / draws); math.Abs(mean-200) > 5*se {
		t.Errorf("bootstrap mean %v, want 200 ± %v", mean, 5*se)
	}
	if v := sd * sd; math.Abs(v-5600)/5600 > 0.04 {
		t.Errorf("bootstrap variance %v, want 5600 (one-level would be 2000)", v)
	}
}

func TestBootstrapDeterministic(t *testing.T) {
	tiers := []BootstrapTier{
		{Values: []float64{12, 30, 45.5, 60, 90}, Patients: 7},
		{Values: []float64{100, 150, 240}, Patients: 3},
	}
	const draws = 3*bootstrapChunk + 17 // several chunks, the last one partial
	a := BootstrapTotals(tiers, draws, 99)
	b := BootstrapTotals(tiers, draws, 99)
	if !slices.Equal(a, b) {
		t.Fatal("same seed gave different totals")
	}
	if slices.Equal(a, BootstrapTotals(tiers, draws, 100)) {
		t.Error("different seeds gave identical totals")
	}
	old := runtime.GOMAXPROCS(1)
	c := BootstrapTotals(tiers, draws, 99)
	runtime.GOMAXPROCS(old)
	if !slices.Equal(a, c) {
		t.Error("GOMAXPROCS 1 changed the totals")
	}
	// A tier with no patients consumes no randomness and changes nothing.
	withEmpty := append([]BootstrapTier{{Values: []float64{1, 2}, Patients: 0}}, tiers...)
	if !slices.Equal(a, BootstrapTotals(withEmpty, draws, 99)) {
		t.Error("a census-0 tier changed the totals")
	}
	// Regression pin, not an external reference: these are this
	// implementation's own first totals for seed 99, recorded when
	// MethodVersion was set to "wardload-model/1". If they change, stored
	// projections can no longer be reproduced: bump MethodVersion.
	pin := []float64{931, 668, 1014}
	if !slices.Equal(a[:3], pin) {
		t.Errorf("first totals %v, pinned %v (random stream changed: bump MethodVersion)", a[:3], pin)
	}
}

// Values from R 4.2.2: quantile(c(3.5,1,7,2,2,10,4.25,8), c(.1,.5,.9,.95), type=7).
func TestType7R(t *testing.T) {
	x := []float64{3.5, 1, 7, 2, 2, 10, 4.25, 8}
	slices.Sort(x)
	for _, tc := range []struct{ p, want float64 }{
		{0.1, 1.7000000000000002}, {0.5, 3.875}, {0.9, 8.5999999999999996}, {0.95, 9.2999999999999989},
		{0, 1}, {1, 10}, // ends: R gives min and max
	} {
		if got := type7Selected(x, tc.p); !scalar.EqualWithinAbsOrRel(got, tc.want, 1e-14, 1e-14) {
			t.Errorf("type7(%v) = %.17g, R %.17g", tc.p, got, tc.want)
		}
	}
}

// For an idealised normal sample (the N points Φ⁻¹((i − ½)/N)) the
// order-statistic SE must match the asymptotic SE of a sample quantile,
// √(p(1−p)/N) / φ(z_p) (e.g. Conover 1999 §3.2; from memory), within 2 %.
func TestQuantileSEAsymptotic(t *testing.T) {
	const n = 100_000
	x := make([]float64, n)
	for i := range x {
		x[i] = NormalQuantile((float64(i) + 0.5) / n)
	}
	for _, p := range []float64{0.1, 0.5, 0.9} {
		z := NormalQuantile(p)
		want := math.Sqrt(p*(1-p)/n) / (math.Exp(-z*z/2) / math.Sqrt(2*math.Pi))
		got := quantileSE(x, p)
		if !got.Defined || math.Abs(got.Value-want)/want > 0.02 {
			t.Errorf("quantileSE(p=%v) = %v, asymptotic %v", p, got, want)
		}
	}
	if se := quantileSE([]float64{1, 2, 3}, 0.1); se.Defined {
		t.Errorf("quantileSE with 3 draws at p=0.1 = %v, want undefined", se)
	}
}

func TestBootstrapPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"no draws":         func() { BootstrapTotals(nil, 0, 1) },
		"negative census":  func() { BootstrapTotals([]BootstrapTier{{Values: []float64{1}, Patients: -1}}, 1, 1) },
		"patients, no obs": func() { BootstrapTotals([]BootstrapTier{{Patients: 2}}, 1, 1) },
	} {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Error("no panic")
				}
			}()
			f()
		})
	}
}

func TestBootstrapInputNotModified(t *testing.T) {
	v := []float64{5, 1, 4}
	BootstrapTotals([]BootstrapTier{{Values: v, Patients: 5}}, 100, 1)
	if !slices.Equal(v, []float64{5, 1, 4}) {
		t.Errorf("values modified: %v", v)
	}
}

// Selecting order statistics must give exactly what sorting gives.
func TestSummariseTotalsSelectionMatchesSort(t *testing.T) {
	for _, n := range []int{1, 2, 7, 25, 1000, 100_003} {
		totals := BootstrapTotals([]BootstrapTier{{Values: []float64{3, 1, 4, 1, 5, 9, 2, 6}, Patients: 5}}, n, uint64(n))
		sorted := slices.Clone(totals)
		slices.Sort(sorted)
		got := summariseTotals(slices.Clone(totals), 5, 0.75)
		for _, c := range []struct {
			name string
			got  float64
			p    float64
			se   Number
		}{{"p10", got.P10, 0.1, got.P10SE}, {"p50", got.P50, 0.5, got.P50SE}, {"p90", got.P90, 0.9, got.P90SE}, {"cover", got.Cover, 0.75, got.CoverSE}} {
			if want := type7Selected(sorted, c.p); c.got != want {
				t.Errorf("n=%d %s = %v, sorted gives %v", n, c.name, c.got, want)
			}
			if want := quantileSE(sorted, c.p); c.se != want {
				t.Errorf("n=%d %s SE = %v, sorted gives %v", n, c.name, c.se, want)
			}
		}
		if got.Draws != n || got.Seed != 5 || got.MeanSE.Defined != (n >= 2) {
			t.Errorf("n=%d summary header %+v", n, got)
		}
	}
}

// The lazy resample must give exactly the two-level distribution. For one
// tier with values 0, 1, 5 (m = 3) and n = 2 patients, enumerate all 27
// resamples r and all 9 index pairs (j1, j2): P(total) is exact. 300,000
// draws: each frequency must lie within 5 binomial SE of its probability.
func TestBootstrapExactDistribution(t *testing.T) {
	values := []float64{0, 1, 5}
	exact := map[float64]float64{}
	for r0 := range 3 {
		for r1 := range 3 {
			for r2 := range 3 {
				r := []float64{values[r0], values[r1], values[r2]}
				for j1 := range 3 {
					for j2 := range 3 {
						exact[r[j1]+r[j2]] += 1.0 / (27 * 9)
					}
				}
			}
		}
	}
	const draws = 300_000
	got := map[float64]float64{}
	for _, v := range BootstrapTotals([]BootstrapTier{{Values: values, Patients: 2}}, draws, 11) {
		got[v] += 1.0 / draws
	}
	for total, p := range exact {
		se := math.Sqrt(p * (1 - p) / draws)
		if math.Abs(got[total]-p) > 5*se {
			t.Errorf("P(total = %v): simulated %.5f, exact %.5f (SE %.5f)", total, got[total], p, se)
		}
	}
	for total := range got {
		if _, ok := exact[total]; !ok {
			t.Errorf("impossible total %v simulated", total)
		}
	}
}
