package server

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// yearObservations is how many observations BenchmarkReviewPage adds to
// the demo ward: a year of a busy ward's timed care, about 140 a day.
const yearObservations = 52 * 7 * 140

// BenchmarkReviewPage serves the weekly review of a ward holding a year
// of observations (the demo ward plus 50,960 invented log-normal ones)
// for the whole year (?weeks=52) and for the ward's usual eight weeks,
// in-process, session check included, and the year view right after a
// change to the ward's data (weeks=52/after-change: the backtest is
// recomputed too). The target is at most 150 ms server time for
// the year (bench/review.sh judges the median of both year views).
func BenchmarkReviewPage(b *testing.B) {
	p := newBenchPage(b)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "bench"})
	st := p.s.store
	ward, err := st.FindWardByCode(ctx, demo.WardCode)
	if err != nil {
		b.Fatal(err)
	}
	tiers, _ := st.FindTiers(ctx, ward.ID)
	shifts, _ := st.FindShiftPatterns(ctx, ward.ID)
	rng := rand.New(rand.NewPCG(2026, 12))
	last := wardload.DateOf(time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC))
	var batch []*wardload.Observation
	for i := range yearObservations {
		ti := i % len(tiers)
		batch = append(batch, &wardload.Observation{WardID: ward.ID, TierID: tiers[ti].ID, ShiftID: shifts[i%len(shifts)].ID,
			Date: last.AddDays(-(i / 140)), WindowHours: shifts[i%len(shifts)].NominalHours,
			CareMinutes: math.Round(60 * float64(ti+1) * math.Exp(0.5*rng.NormFloat64()))})
		if len(batch) == 10_000 || i == yearObservations-1 {
			if _, err := st.CreateObservations(ctx, batch); err != nil {
				b.Fatal(err)
			}
			batch = batch[:0]
		}
	}
	u, err := st.FindUserByName(ctx, "demo.manager")
	if err != nil {
		b.Fatal(err)
	}
	cookie := MustSession(b, p.s, u.ID)
	// The first view after a change: one new observation (not timed)
	// moves the ward's data version, so the page recomputes the backtest
	// as well as everything else; nothing it shows is cached.
	b.Run("weeks=52/after-change", func(b *testing.B) {
		path := fmt.Sprintf("/wards/%s/review?weeks=52", ward.Code)
		b.ReportAllocs()
		for i := 0; b.Loop(); i++ {
			b.StopTimer()
			o := &wardload.Observation{WardID: ward.ID, TierID: tiers[0].ID, ShiftID: shifts[0].ID, Date: last.AddDays(-i % 60),
				WindowHours: shifts[0].NominalHours, CareMinutes: 55}
			if _, err := st.CreateObservations(ctx, []*wardload.Observation{o}); err != nil {
				b.Fatal(err)
			}
			b.StartTimer()
			p.get(b, path, cookie)
		}
	})
	for _, weeks := range []int{52, 8} {
		path := fmt.Sprintf("/wards/%s/review?weeks=%d", ward.Code, weeks)
		p.get(b, path, cookie)
		b.Run(fmt.Sprintf("weeks=%d", weeks), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				p.get(b, path, cookie)
			}
		})
	}
}
