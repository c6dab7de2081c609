package stats

import "testing"

// BenchmarkProjection is the performance target of the one-shift
// projection as a census save runs it: the projector's default 20,000
// draws, 40 patients in 4 tiers of 60 observations, at most 30 ms per
// projection on the project's 2-core machine (bench/projection.sh checks
// the figure). Version 2 draws one lognormal value per patient and draw;
// math.Exp is most of the time.
func BenchmarkProjection(b *testing.B) {
	in := benchInput(20_000)
	for b.Loop() {
		if _, err := Project(in); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkProjection100k is the same at 100,000 draws, the figure version
// 1 was measured at (12.9 ms then, with its bootstrap).
func BenchmarkProjection100k(b *testing.B) {
	in := benchInput(100_000)
	for b.Loop() {
		if _, err := Project(in); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkProjectionV1 keeps the frozen version 1 measurable.
func BenchmarkProjectionV1(b *testing.B) {
	in := benchInput(100_000)
	for b.Loop() {
		if _, err := ProjectV1(in); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkBootstrapTotals isolates the simulation from the sort and summary.
func BenchmarkBootstrapTotals(b *testing.B) {
	in := benchInput(100_000)
	tiers := make([]BootstrapTier, len(in.Tiers))
	for k, t := range in.Tiers {
		tiers[k] = BootstrapTier{Values: ShiftMinutes(t.CareMinutes, t.WindowHours, in.ShiftHours), Patients: t.Patients}
	}
	for b.Loop() {
		BootstrapTotals(tiers, in.Draws, in.Seed)
	}
}
