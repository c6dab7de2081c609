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
	p, err := stats.Project(in)
	if err != nil {
		fmt.Println(err)
		return
	}
	// μ = 6·60 + 2·240 = 840; variance_patient = 6·250 + 2·3600 = 8700;
	// variance_estimate = 36·250/5 + 4·3600/3 = 1800 + 4800 = 6600.
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
