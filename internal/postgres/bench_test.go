package postgres_test

import (
	"context"
	"os"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// BenchmarkCreateObservations imports 1000 invented rows per iteration.
func BenchmarkCreateObservations(b *testing.B) {
	url := os.Getenv("WARDLOAD_TEST_DATABASE_URL")
	if url == "" {
		b.Skip("set WARDLOAD_TEST_DATABASE_URL to run PostgreSQL benchmarks")
	}
	ctx := context.Background()
	s, _ := MustOpenStore(b, url, time.Now)
	w := &wardload.Ward{Code: "b1", Name: "Bench", TimeZone: "UTC", FactorNames: []string{"dependency"}}
	if err := s.CreateWard(ctx, w); err != nil {
		b.Fatal(err)
	}
	tier := &wardload.Tier{WardID: w.ID, Code: "t1", Label: "T1"}
	shift := &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 420, NominalHours: 12}
	if err := s.CreateTier(ctx, tier); err != nil {
		b.Fatal(err)
	}
	if err := s.CreateShiftPattern(ctx, shift); err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		obs := make([]*wardload.Observation, 1000)
		for i := range obs {
			obs[i] = &wardload.Observation{WardID: w.ID, TierID: tier.ID, ShiftID: shift.ID,
				Date: wardload.Date{Year: 2026, Month: 3, Day: 1 + i%28}, WindowHours: 4, CareMinutes: float64(i % 90),
				Factors: map[string]float64{"dependency": float64(i % 5)}}
		}
		if _, err := s.CreateObservations(ctx, obs); err != nil {
			b.Fatal(err)
		}
	}
}
