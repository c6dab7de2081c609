package projector_test

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// TestCalibrate: a ward whose every Early shift of 20 weeks had all its
// patients timed (census = observations per tier) is backtested on shift
// totals; a shift whose census differs is not counted as a total; the
// result reaches the projection as its calibration. Invented lognormal
// data, for properties only.
func TestCalibrate(t *testing.T) {
	h := seedHand(t)
	r := rand.New(rand.NewPCG(4, 4))
	var obs []*wardload.Observation
	first := h.shiftDate.AddDays(-7 * 20)
	for d := range 7 * 20 {
		date := first.AddDays(d)
		b := 0.15 * r.NormFloat64()
		counts := []wardload.TierCount{}
		for k, tier := range []*wardload.Tier{h.a, h.b, h.c} {
			n := 1 + r.IntN(3)
			counts = append(counts, wardload.TierCount{TierID: tier.ID, Patients: n})
			for range n {
				obs = append(obs, &wardload.Observation{WardID: h.ward.ID, TierID: tier.ID, ShiftID: h.early.ID, Date: date,
					WindowHours: 8, CareMinutes: math.Exp(3.5 + 0.5*float64(k) + b + 0.4*r.NormFloat64())})
			}
		}
		if d == 7*20-3 {
			counts[0].Patients++ // one patient not timed: not a shift total
		}
		must(t, h.st.CreateCensus(ctx, &wardload.Census{WardID: h.ward.ID, Date: date, ShiftID: h.early.ID, Counts: counts}))
	}
	_, err := h.st.CreateObservations(ctx, obs)
	must(t, err)
	s := h.service()
	res, err := s.Calibrate(ctx, h.ward.ID, h.shiftDate)
	must(t, err)
	// 12 weeks of Early shifts, less the one not fully timed and the 7
	// dates (12 to 19 March but the 17th, whose one is excluded) where
	// seedHand's own Early observations make the counts differ from the
	// census. seedHand's lone Late observation has no history: skipped.
	if want := 7*12 - 1 - 7; res.Totals.Checked != want || res.Skipped != 1 {
		t.Errorf("checked %d shift totals (skipped %d), want %d (1)", res.Totals.Checked, res.Skipped, want)
	}
	if c := res.Calibration(); c.Basis != "shift totals" || c.Warn(0.9) {
		t.Errorf("calibration %+v: %s", c, res.Sentence)
	}
	again, err := s.Calibrate(ctx, h.ward.ID, h.shiftDate)
	must(t, err)
	if again != res {
		t.Error("the same history was backtested twice (no cache hit)")
	}
	_, p, err := s.Prepare(ctx, h.ward.ID, h.shiftDate, h.early.ID, h.counts(2, 2, 1))
	must(t, err)
	if !strings.Contains(p.Result, `"basis":"shift totals"`) || p.DecidedBy == stats.DecidedByInsufficient {
		t.Errorf("projection lacks the calibration or declined: %s", p.DecidedBy)
	}
}
