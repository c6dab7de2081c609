package simstudy

import (
	"testing"

	"wardload/internal/stats"
)

// BenchmarkForecastCensusWard is one ward's forecast: 30 weeks of history
// on three shifts and two tiers, 6 weeks ahead, 4000 draws.
func BenchmarkForecastCensusWard(b *testing.B) {
	sc := CensusScenarios()[1]
	hist := GenerateCensus(sc, 1)
	for b.Loop() {
		if _, err := stats.ForecastCensus(stats.CensusForecastInput{History: hist, From: "2026-08-03", Beds: sc.Beds, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
