package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"wardload/internal/wardload"
)

// The compound of a small census and a two-point care time, against exact
// enumeration (invented numbers, chosen so that the sum can be written
// out): C ∈ {0, 1, 2} with P = 0.2, 0.5, 0.3, each patient's care 30 or
// 90 minutes with probability ½ each, independent. Then T = Σ_{i≤C} X_i
// takes 0, 30, 90, 60, 120, 180 with
//
//	P(T=0)   = 0.2
//	P(T=30)  = 0.5·½ = 0.25,        P(T=90)  = 0.25
//	P(T=60)  = 0.3·¼ = 0.075,       P(T=120) = 0.15,   P(T=180) = 0.075
//
// and, by the law of total variance with E[T | C] = 60·C,
// Var(60·C) = 3600·Var C = 3600·0.49 = 1764 and
// E[Var(T | C)] = 900·E C = 900·1.1 = 990, so the census share is
// 1764/2754 = 0.6405. Checked with 200,000 draws: each P(T ≤ x) within
// 4 binomial standard errors, the share within 0.01.
func TestCompoundTotalsExact(t *testing.T) {
	const draws = 200_000
	r := rand.New(rand.NewPCG(11, 3))
	counts := [][]int32{make([]int32, draws)}
	for d := range draws {
		switch u := r.Float64(); {
		case u < 0.2:
			counts[0][d] = 0
		case u < 0.7:
			counts[0][d] = 1
		default:
			counts[0][d] = 2
		}
	}
	totals, means := compoundTotals(counts, []float64{60}, 5, func(r *rand.Rand, c []int) float64 {
		s := 0.0
		for range c[0] {
			s += []float64{30, 90}[r.IntN(2)]
		}
		return s
	})
	exact := map[float64]float64{0: 0.2, 30: 0.25, 60: 0.075, 90: 0.25, 120: 0.15, 180: 0.075}
	cum := 0.0
	for _, x := range []float64{0, 30, 60, 90, 120, 180} {
		cum += exact[x]
		k := 0
		for _, v := range totals {
			if v <= x {
				k++
			}
		}
		got := float64(k) / draws
		if se := math.Sqrt(cum * (1 - cum) / draws); math.Abs(got-cum) > 4*se+1e-12 {
			t.Errorf("P(T ≤ %g) = %.4f, exact %.4f (4 SE %.4f)", x, got, cum, 4*se)
		}
	}
	_, sdT := MeanSD(totals)
	_, sdM := MeanSD(means)
	if share := sdM * sdM / (sdT * sdT); math.Abs(share-1764.0/2754) > 0.01 {
		t.Errorf("census share %.4f, exact %.4f", share, 1764.0/2754)
	}
}

// careInput invents care observations for a shift pattern: per tier a
// lognormal with the given median and log SD, n observations of a full
// 12-hour shift, undated.
func careInput(seed uint64, n int, medians, sds []float64, codes []string) ProjectionInput {
	r := rand.New(rand.NewPCG(seed, 9))
	in := ProjectionInput{ShiftHours: 12, DirectCareFraction: 0.8, Levels: []float64{0.8, 0.9}, Cover: 0.9,
		Floor: &FloorSpec{PatientsPerNurse: 6}}
	for k, code := range codes {
		t := TierSample{Code: code}
		for range n {
			t.CareMinutes = append(t.CareMinutes, math.Round(medians[k]*math.Exp(sds[k]*r.NormFloat64())*10)/10)
			t.WindowHours = append(t.WindowHours, 12)
		}
		in.Tiers = append(in.Tiers, t)
	}
	return in
}

// With the census known (every draw the same counts) nothing of the
// spread comes from the census, and the cover minutes are Project's for
// that census, within the Monte Carlo error of two independent 20,000-draw
// 90% quantiles (about 1% each; 4% allowed).
func TestWorkloadShiftKnownCensus(t *testing.T) {
	care := careInput(1, 200, []float64{90, 240}, []float64{0.5, 0.6}, []string{"t1", "t2"})
	const draws = 20_000
	counts := [][]int32{slices.Repeat([]int32{10}, draws), slices.Repeat([]int32{4}, draws)}
	ws, err := workloadShift(care, []string{"t1", "t2"}, counts, "2026-03-02", 3)
	if err != nil {
		t.Fatal(err)
	}
	if !ws.CensusShare.Defined || ws.CensusShare.Value != 0 {
		t.Errorf("census share %v with a known census, want 0", ws.CensusShare)
	}
	fixed := care
	fixed.Tiers = slices.Clone(care.Tiers)
	fixed.Tiers[0].Patients, fixed.Tiers[1].Patients = 10, 4
	fixed.Draws, fixed.Seed = draws, 4
	p, err := Project(fixed)
	if err != nil {
		t.Fatal(err)
	}
	if d := ws.CoverMinutes.Value/p.CoverMinutes.Value - 1; math.Abs(d) > 0.04 {
		t.Errorf("cover minutes %.0f, Project %.0f (%.1f%%)", ws.CoverMinutes.Value, p.CoverMinutes.Value, 100*d)
	}
	if *ws.Nurses.Floor != *p.Nurses.Floor {
		t.Errorf("floor %d, Project %d", *ws.Nurses.Floor, *p.Nurses.Floor)
	}
}

// A ward with known truth: census t1 ~ Poisson(8, ×1.5 on Mondays), t2 ~
// Poisson(3) on two shifts, care per patient lognormal with medians 90 and
// 240 minutes and log SDs 0.5 and 0.6 (invented). Over 12 independent
// histories (8 weeks of census, 300 observations a tier and shift), the
// forecast for the week after must hold its level: the true chance of
// more care than the 90% cover minutes (before whole nurses round it up),
// averaged over every history and dated shift, within 0.07 to 0.12, and
// the true chance of a shortfall at the recommended headcount, averaged
// the same way, at most (1 − cover) + 0.02. (One history's fitted model
// can be off by chance, so a single dated shift may be worse; the worst
// is logged.) The truth is simulated afresh from the known laws,
// 5,000 shifts per target.
func TestForecastWorkloadKnownTruth(t *testing.T) {
	codes := []string{"t1", "t2"}
	medians, sds := []float64{90, 240}, []float64{0.5, 0.6}
	r := rand.New(rand.NewPCG(77, 1))
	const histories, truthDraws = 12, 5000
	worst, shortMean, beyond, n := 0.0, 0.0, 0.0, 0
	for h := range uint64(histories) {
		hist := poissonHistory("2026-01-05", 8*7, []string{"Day", "Night"}, 8, 3, 100+h, nil)
		care := map[string]ProjectionInput{
			"Day":   careInput(200+h, 300, medians, sds, codes),
			"Night": careInput(300+h, 300, medians, sds, codes),
		}
		in := WorkloadForecastInput{Census: CensusForecastInput{History: hist, From: "2026-03-02", Weeks: 1, Beds: 40, Seed: h, Draws: 2000}, Care: care}
		fc, err := ForecastWorkload(in)
		if err != nil {
			t.Fatal(err)
		}
		if len(fc.Shifts) != 7*2 {
			t.Fatalf("%d shifts, want 14", len(fc.Shifts))
		}
		for _, s := range fc.Shifts {
			if s.Nurses.Recommended == nil || !s.DataSufficient {
				t.Fatalf("%s %s: no recommendation: %v", s.Date, s.Shift, s.Insufficient)
			}
			if *s.Nurses.Recommended < *s.Nurses.Floor {
				t.Errorf("%s %s: recommended %d below the floor %d", s.Date, s.Shift, *s.Nurses.Recommended, *s.Nurses.Floor)
			}
			if !s.CensusShare.Defined || s.CensusShare.Value <= 0 || s.CensusShare.Value >= 1 {
				t.Errorf("%s %s: census share %v", s.Date, s.Shift, s.CensusShare)
			}
			for j := 1; j < len(s.Bands); j++ {
				if s.Bands[j].Low > s.Bands[j-1].Low || s.Bands[j].High < s.Bands[j-1].High {
					t.Errorf("%s %s: bands not nested %+v", s.Date, s.Shift, s.Bands)
				}
			}
			mu1 := 8.0
			if s.Weekday == "Monday" {
				mu1 = 12
			}
			capacity := float64(*s.Nurses.Recommended-s.Nurses.InCharge) * 12 * 60 * 0.8
			short, over := 0, 0
			for range truthDraws {
				total := 0.0
				for k, mu := range []float64{mu1, 3} {
					for range poisson(r, mu) {
						total += medians[k] * math.Exp(sds[k]*r.NormFloat64())
					}
				}
				if total > capacity {
					short++
				}
				if total > s.CoverMinutes.Value {
					over++
				}
			}
			worst = max(worst, float64(short)/truthDraws)
			shortMean += float64(short) / truthDraws
			beyond += float64(over) / truthDraws
			n++
		}
	}
	beyond /= float64(n)
	shortMean /= float64(n)
	if beyond < 0.07 || beyond > 0.12 {
		t.Errorf("true chance of care beyond the 90%% cover minutes %.3f on average, want 0.07 to 0.12", beyond)
	}
	if shortMean > 1-0.9+0.02 {
		t.Errorf("true shortfall chance %.3f on average at the recommended headcount, want at most 0.12", shortMean)
	}
	t.Logf("over %d histories × 14 shifts: true chance beyond the 90%% cover minutes %.3f on average; at the recommended headcount %.3f on average, %.3f at worst", histories, beyond, shortMean, worst)
}

// The same seed gives the same forecast.
func TestForecastWorkloadSeeded(t *testing.T) {
	codes := []string{"t1", "t2"}
	hist := poissonHistory("2026-01-05", 8*7, []string{"Day", "Night"}, 8, 3, 21, nil)
	care := careInput(2, 300, []float64{90, 240}, []float64{0.5, 0.6}, codes)
	in := WorkloadForecastInput{Census: CensusForecastInput{History: hist, From: "2026-03-02", Weeks: 1, Beds: 40, Seed: 5, Draws: 1000},
		Care: map[string]ProjectionInput{"Day": care, "Night": care}}
	a, err := ForecastWorkload(in)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := ForecastWorkload(in)
	for i := range a.Shifts {
		if a.Shifts[i].CoverMinutes != b.Shifts[i].CoverMinutes || *a.Shifts[i].Nurses.Recommended != *b.Shifts[i].Nurses.Recommended {
			t.Errorf("shift %d differs between two runs with one seed", i)
		}
	}
	in.Census.Seed = 6
	c, _ := ForecastWorkload(in)
	if c.Shifts[0].CoverMinutes == a.Shifts[0].CoverMinutes {
		t.Error("another seed gives the same cover minutes")
	}
}

// poisson draws a Poisson count by Knuth's product of uniforms (fine for
// the small means here).
func poisson(r *rand.Rand, mu float64) int {
	l, k, p := math.Exp(-mu), 0, 1.0
	for {
		p *= r.Float64()
		if p <= l {
			return k
		}
		k++
	}
}

func TestForecastWorkloadBadInput(t *testing.T) {
	hist := poissonHistory("2026-01-05", 8*7, []string{"Day", "Night"}, 8, 3, 21, nil)
	codes := []string{"t1", "t2"}
	day := careInput(2, 300, []float64{90, 240}, []float64{0.5, 0.6}, codes)
	base := CensusForecastInput{History: hist, From: "2026-03-02", Weeks: 1, Beds: 40, Seed: 5, Draws: 1000}
	_, err := ForecastWorkload(WorkloadForecastInput{Census: base, Care: map[string]ProjectionInput{"Day": day}})
	if field := wardload.ErrorField(err); field != "shift" {
		t.Errorf("no care input for Night: %v (field %q)", err, field)
	}
	few := careInput(2, 3, []float64{90, 240}, []float64{0.5, 0.6}, codes)
	fc, err := ForecastWorkload(WorkloadForecastInput{Census: base, Care: map[string]ProjectionInput{"Day": few, "Night": few}})
	if err != nil {
		t.Fatal(err)
	}
	s := fc.Shifts[0]
	if s.DataSufficient || len(s.Insufficient) != 2 || s.Nurses.DecidedBy != DecidedByInsufficient || s.Nurses.Recommended == nil || *s.Nurses.Recommended != *s.Nurses.Floor {
		t.Errorf("3 observations a tier: %+v", s)
	}
}
