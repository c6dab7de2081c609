package storetest

import (
	"context"
	"testing"

	"wardload/internal/wardload"
)

// BenchImport times CreateObservations on s with batches of rows invented
// observations of one ward (two tiers, two shifts, a factor on every row),
// the store's side of an import, and reports rows per second. Each
// iteration is a new batch on top of the ones before.
func BenchImport(b *testing.B, s wardload.Store, rows int) {
	ctx := wardload.WithActor(context.Background(), testActor)
	w := &wardload.Ward{Code: "bench", Name: "Bench", TimeZone: "UTC", FactorNames: []string{"dependency"}}
	if err := s.CreateWard(ctx, w); err != nil {
		b.Fatal(err)
	}
	var tiers [2]*wardload.Tier
	var shifts [2]*wardload.ShiftPattern
	for i := range 2 {
		tiers[i] = &wardload.Tier{WardID: w.ID, Code: []string{"t1", "t2"}[i], Label: []string{"T1", "T2"}[i], DisplayOrder: i}
		if err := s.CreateTier(ctx, tiers[i]); err != nil {
			b.Fatal(err)
		}
		shifts[i] = &wardload.ShiftPattern{WardID: w.ID, Name: []string{"Day", "Night"}[i], StartMinute: 420 + 720*i, NominalHours: 12}
		if err := s.CreateShiftPattern(ctx, shifts[i]); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportAllocs()
	for b.Loop() {
		b.StopTimer()
		obs := make([]*wardload.Observation, rows)
		for i := range obs {
			obs[i] = &wardload.Observation{WardID: w.ID, TierID: tiers[i%2].ID, ShiftID: shifts[i/2%2].ID,
				Date: wardload.Date{Year: 2026, Month: 3, Day: 1 + i%28}, WindowHours: 4, CareMinutes: float64(i % 90),
				EnteredBy: testActor.UserID, Factors: map[string]float64{"dependency": float64(i % 5)}}
		}
		b.StartTimer()
		if _, err := s.CreateObservations(ctx, obs); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(rows*b.N)/b.Elapsed().Seconds(), "rows/s")
}
