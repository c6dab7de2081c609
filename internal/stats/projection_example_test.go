package stats_test

import (
	"fmt"

	"wardload/internal/stats"
)

// A night shift of 12 hours with two tiers (invented numbers). Tier "low"
// was timed over 12-hour windows; "high" over 6-hour windows, which Project
// scales to the shift (and warns about).
func ExampleProject() {
	in := stats.ProjectionInput{
		Tiers: []stats.TierSample{
			{Code: "low", Patients: 6, CareMinutes: []float64{50, 70, 60, 80, 40}, WindowHours: []float64{12, 12, 12, 12, 12}},
			{Code: "high", Patients: 2, CareMinutes: []float64{90, 120, 150}, WindowHours: []float64{6, 6, 6}},
			{Code: "none", Patients: 0},
		},
		ShiftHours: 12, DirectCareFraction: 0.75,
		Levels: []float64{0.9}, Cover: 0.9, Draws: 10_000, Seed: 1,
		Floor: &stats.FloorSpec{PatientsPerNurse: 8, ChargeNurseCounts: true},
	}
	p, err := stats.ProjectV1(in)
	if err != nil {
		fmt.Println(err)
		return
	}
	// By hand: "high" scaled to 12 h is 180, 240, 300 (mean 240, variance
	// 3600); "low" has mean 60, variance 250. μ = 6·60 + 2·240 = 840;
	// variance_patient = 6·250 + 2·3600 = 8700; variance_estimate =
	// 36·250/5 + 4·3600/3 = 1800 + 4800 = 6600; sd = √15300 = 123.69.
	// Band and nurses from R 4.2.2 (R --version: 4.2.2 Patched (2022-11-10
	// r83330)), v = 15300:
	//   840 + c(-1, 1) * qnorm(0.95) * sqrt(v)   = 636.5428427 1043.4571573
	//   840 / (60 * 0.75 * 12)                   = 1.555555556 → 2
	//   (840 + qnorm(0.9) * sqrt(v)) / (60 * 0.75 * 12) = 1.849109582 → 2
	// Floor by hand: ⌈8 / 8⌉ = 1, the charge nurse counting towards it. The
	// recommendation is the simulated 90 % cover (seed 1: 960 min, 1.778
	// nurses → 2), which beats the floor; that figure has no outside source,
	// only this seed.
	fmt.Printf("expected %.0f min, variance %.0f + %.0f, sd %.1f\n",
		p.ExpectedMinutes, p.VariancePatient, p.VarianceEstimate, p.SDMinutes)
	fmt.Printf("90%% band %.1f .. %.1f min\n", p.Bands[0].Low, p.Bands[0].High)
	fmt.Printf("nurses at mean %.3f → %d, at 90%% cover (normal) %.3f → %d\n",
		p.Nurses.ExpectedUnrounded, p.Nurses.Expected, p.Nurses.CoverUnrounded, p.Nurses.Cover)
	fmt.Printf("floor %d, recommended %d (%s)\n", *p.Nurses.Floor, p.Nurses.Recommended, p.Nurses.DecidedBy)
	// Output:
	// expected 840 min, variance 8700 + 6600, sd 123.7
	// 90% band 636.5 .. 1043.5 min
	// nurses at mean 1.556 → 2, at 90% cover (normal) 1.849 → 2
	// floor 1, recommended 2 (cover)
}
