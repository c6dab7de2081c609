package stats

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"wardload/internal/wardload"
)

// Hand-computed (small integers, checkable on paper):
//
//	tier a: y = 10, 20, 30   mean 20, s² = (100+0+100)/2 = 100, n = 2, m = 3
//	tier b: y = 50, 70       mean 60, s² = (100+100)/1 = 200,   n = 3, m = 2
//	tier c: no observations, n = 0 → contributes nothing
//
//	E[T]              = 2·20 + 3·60           = 220
//	variance_patient  = 2·100 + 3·200         = 800
//	variance_estimate = 4·100/3 + 9·200/2     = 133.33… + 900 = 1033.33…
//
// R 4.2.2 (testdata/projection_reference.R) agrees: 220 800 1033.3333333333333.
func TestWorkloadMomentsHand(t *testing.T) {
	mu, vp, ve, tiers := WorkloadMoments(
		[]string{"a", "b", "c"}, []int{2, 3, 0},
		[][]float64{{10, 20, 30}, {50, 70}, nil})
	// s² is recovered as sd·sd after MeanSD's square root: allow a few ulps.
	if mu != 220 || !scalar.EqualWithinRel(vp, 800, 1e-14) || !scalar.EqualWithinRel(ve, 3100.0/3, 1e-14) {
		t.Fatalf("mu, vp, ve = %v, %v, %v; want 220, 800, 1033.33…", mu, vp, ve)
	}
	want := []TierMoments{
		{Code: "a", Patients: 2, Observations: 3, MeanMinutes: Defined(20), SDMinutes: Defined(10),
			ExpectedMinutes: 40, VariancePatient: 200, VarianceEstimate: 400.0 / 3},
		{Code: "b", Patients: 3, Observations: 2, MeanMinutes: Defined(60), SDMinutes: Defined(math.Sqrt(200)),
			ExpectedMinutes: 180, VariancePatient: 600, VarianceEstimate: 900},
		{Code: "c"},
	}
	for k, w := range want {
		g := tiers[k]
		if g.Code != w.Code || g.Patients != w.Patients || g.Observations != w.Observations ||
			g.MeanMinutes.Defined != w.MeanMinutes.Defined || g.SDMinutes.Defined != w.SDMinutes.Defined ||
			!scalar.EqualWithinRel(g.MeanMinutes.Value, w.MeanMinutes.Value, 1e-15) ||
			!scalar.EqualWithinRel(g.SDMinutes.Value, w.SDMinutes.Value, 1e-15) ||
			!scalar.EqualWithinRel(g.ExpectedMinutes, w.ExpectedMinutes, 1e-15) ||
			!scalar.EqualWithinRel(g.VariancePatient, w.VariancePatient, 1e-14) ||
			!scalar.EqualWithinRel(g.VarianceEstimate, w.VarianceEstimate, 1e-14) {
			t.Errorf("tier %d = %+v, want %+v", k, g, w)
		}
	}
}

// A census-0 tier with a single observation has a mean but no SD, and is
// allowed (it needs no spread because it contributes nothing).
func TestWorkloadMomentsUnusedSingleObservation(t *testing.T) {
	mu, vp, ve, tiers := WorkloadMoments([]string{"x"}, []int{0}, [][]float64{{42}})
	if mu != 0 || vp != 0 || ve != 0 {
		t.Errorf("unused tier contributed %v, %v, %v", mu, vp, ve)
	}
	if !tiers[0].MeanMinutes.Defined || tiers[0].MeanMinutes.Value != 42 || tiers[0].SDMinutes.Defined {
		t.Errorf("tier = %+v; want mean 42 and undefined SD", tiers[0])
	}
}

// Cross-check with the domain brief §1.6 illustrative numbers, which are a
// [D] derivation in the brief (not an external source): tiers (n, μ h, σ h)
// = (10, 1.5, 0.6), (8, 3.0, 1.2), (4, 6.0, 2.5), 30 observations per tier.
// Brief: E[T] = 63.0 h, SD = 6.33 h, with parameter uncertainty 6.91 h,
// 90th percentile / 10.2 usable hours = 7.04 → 8 nurses. R 4.2.2 computing
// the same formula (testdata/projection_reference.R): 63, 6.3340350488452462,
// 6.9083524326233769, 7.0444519485649364.
//
// Samples with exactly that mean and SD: 15 values at μ − a and 15 at μ + a
// with a = σ·√(29/30), since then s² = 30·a²/29 = σ².
func TestWorkloadMomentsDomainBrief(t *testing.T) {
	spec := []struct{ n, mu, sigma float64 }{{10, 1.5, 0.6}, {8, 3.0, 1.2}, {4, 6.0, 2.5}}
	var codes []string
	var patients []int
	var values [][]float64
	for k, s := range spec {
		a := s.sigma * math.Sqrt(29.0/30)
		y := make([]float64, 30)
		for i := range y {
			y[i] = 60 * (s.mu - a)
			if i%2 == 1 {
				y[i] = 60 * (s.mu + a)
			}
		}
		codes = append(codes, string(rune('a'+k)))
		patients = append(patients, int(s.n))
		values = append(values, y)
	}
	mu, vp, ve, _ := WorkloadMoments(codes, patients, values)
	hours := func(minutes float64) float64 { return minutes / 60 }
	checks := []struct {
		name      string
		got, want float64
		brief     float64
	}{
		{"E[T] h", hours(mu), 63, 63.0},
		{"SD h (patients only)", hours(math.Sqrt(vp)), 6.3340350488452462, 6.33},
		{"SD h (with estimate)", hours(math.Sqrt(vp + ve)), 6.9083524326233769, 6.91},
		{"q90 nurses at 10.2 h", hours(mu+NormalQuantile(0.9)*math.Sqrt(vp+ve)) / 10.2, 7.0444519485649364, 7.04},
	}
	for _, c := range checks {
		if !scalar.EqualWithinRel(c.got, c.want, 1e-12) {
			t.Errorf("%s = %.17g, R = %.17g", c.name, c.got, c.want)
		}
		if math.Abs(c.got-c.brief) > 0.005 {
			t.Errorf("%s = %.4f, brief (to 2 decimals) %.2f", c.name, c.got, c.brief)
		}
	}
	if got := ceilNurses(hours(mu+NormalQuantile(0.9)*math.Sqrt(vp+ve)) / 10.2); got != 8 {
		t.Errorf("rounded q90 nurses = %d, brief 8", got)
	}
}

// Constant-rate scaling: 10 minutes in a 4-hour window is 20 in 8 hours,
// 30 minutes in 12 hours is 20 in 8.
func TestShiftMinutes(t *testing.T) {
	care, window := []float64{10, 30, 16}, []float64{4, 12, 8}
	got := ShiftMinutes(care, window, 8)
	want := []float64{20, 20, 16}
	for i := range want {
		if !scalar.EqualWithinRel(got[i], want[i], 1e-15) {
			t.Errorf("y[%d] = %v, want %v", i, got[i], want[i])
		}
	}
	if care[0] != 10 || window[0] != 4 {
		t.Error("ShiftMinutes modified its input")
	}
}

func TestModelPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"ShiftMinutes length":        func() { ShiftMinutes([]float64{1}, nil, 8) },
		"WorkloadMoments length":     func() { WorkloadMoments([]string{"a"}, []int{1, 2}, nil) },
		"WorkloadMoments one value":  func() { WorkloadMoments([]string{"a"}, []int{1}, [][]float64{{5}}) },
		"WorkloadMoments negative n": func() { WorkloadMoments([]string{"a"}, []int{-1}, [][]float64{{5, 6}}) },
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

func TestCeilNurses(t *testing.T) {
	tests := []struct {
		x    float64
		want int
	}{
		{0, 0},
		{7, 7},
		{7.0000000001, 7}, // float noise: 1e-10 relative is inside the 1e-9 tolerance
		{7 + 1e-7, 8},     // a real excess, however small, still rounds up
		{6.999, 7},
		{0.1, 1},
		{1.1453031655690669, 2},
		{-0.4, 0}, // a normal quantile below zero needs no nurses
	}
	for _, tc := range tests {
		if got := ceilNurses(tc.x); got != tc.want {
			t.Errorf("ceilNurses(%.17g) = %d, want %d", tc.x, got, tc.want)
		}
	}
}

func TestFloorFor(t *testing.T) {
	floors := []wardload.RatioFloor{
		{ShiftID: 1, PatientsPerNurse: 4, ChargeNurseCounts: true},
		{ShiftID: 1, TierID: 30, PatientsPerNurse: 2, ChargeNurseCounts: true},
		{ShiftID: 1, TierID: 99, PatientsPerNurse: 1, ChargeNurseCounts: true}, // tier not in the projection
		{ShiftID: 2, PatientsPerNurse: 6},
	}
	codes := map[int64]string{10: "t1", 30: "t3"}
	got := FloorFor(floors, 1, codes)
	if got == nil || got.PatientsPerNurse != 4 || !got.ChargeNurseCounts ||
		len(got.TierPatientsPerNurse) != 1 || got.TierPatientsPerNurse["t3"] != 2 {
		t.Errorf("shift 1: %+v", got)
	}
	if got := FloorFor(floors, 2, codes); got == nil || got.PatientsPerNurse != 6 || got.ChargeNurseCounts || got.TierPatientsPerNurse != nil {
		t.Errorf("shift 2: %+v", got)
	}
	if got := FloorFor(floors, 3, codes); got != nil {
		t.Errorf("shift 3 has no floor, got %+v", got)
	}
	// One floor saying the nurse in charge is extra is enough to add one.
	mixed := append(floors[:2:2], wardload.RatioFloor{ShiftID: 1, TierID: 10, PatientsPerNurse: 3})
	if got := FloorFor(mixed, 1, codes); got.ChargeNurseCounts {
		t.Errorf("mixed charge-nurse rules: %+v, want ChargeNurseCounts false", got)
	}
}
