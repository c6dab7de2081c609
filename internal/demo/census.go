package demo

import (
	"context"
	"fmt"
	"time"

	"wardload/internal/wardload"
)

// correctionEvery is how often (in dated shifts) the demo enters a
// corrected census, so that revisions show in the history.
const correctionEvery = 23

// createCensus enters one census per dated shift, by charge nurse 1 on
// days and charge nurse 2 on nights. The ward runs nearly full, a little
// emptier at weekends, and the night count drifts from the day's by a
// patient or two (admissions and discharges).
//
// Each entry is stored with its workload projection where the lookback
// allows one (see saveCensus), so that the shift list has history.
func (s *seeder) createCensus(ctx context.Context, first, last wardload.Date) error {
	loc, err := s.ward.Location()
	if err != nil {
		return err
	}
	n := 0
	for d := first; !d.After(last); d = d.AddDays(1) {
		weekday := time.Date(d.Year, d.Month, d.Day, 12, 0, 0, 0, time.UTC).Weekday()
		empty := s.rng.IntN(3)
		if weekday == time.Saturday || weekday == time.Sunday {
			empty += s.rng.IntN(3)
		}
		total := beds - empty
		for si := range shiftSpecs {
			if si > 0 {
				total = min(beds, max(beds-6, total+s.rng.IntN(3)-1))
			}
			by := s.users[chargeNames[si%len(chargeNames)]].ID
			c := &wardload.Census{WardID: s.ward.ID, Date: d, ShiftID: s.shifts[si].ID, Counts: s.split(total), EnteredBy: by}
			if _, err := s.saveCensus(ctx, c, loc); err != nil {
				return fmt.Errorf("create census %s %s: %w", d, shiftSpecs[si].name, err)
			}
			n++
			if n%correctionEvery == 0 {
				// A patient was counted in the wrong tier: move one up.
				fixed := &wardload.Census{WardID: c.WardID, Date: d, ShiftID: c.ShiftID, Counts: moveOneUp(c.Counts), EnteredBy: by}
				if _, err := s.saveCensus(ctx, fixed, loc); err != nil {
					return fmt.Errorf("correct census %s %s: %w", d, shiftSpecs[si].name, err)
				}
			}
		}
	}
	return nil
}

// split assigns total patients to tiers at random by the tiers' shares.
func (s *seeder) split(total int) []wardload.TierCount {
	counts := make([]wardload.TierCount, len(s.tiers))
	for i, t := range s.tiers {
		counts[i].TierID = t.ID
	}
	for range total {
		u, acc := s.rng.Float64(), 0.0
		i := 0
		for ; i < len(tierSpecs)-1; i++ {
			acc += tierSpecs[i].share
			if u < acc {
				break
			}
		}
		counts[i].Patients++
	}
	return counts
}

// moveOneUp returns a copy of counts with one patient moved from the
// lowest non-empty tier to the next tier up.
func moveOneUp(counts []wardload.TierCount) []wardload.TierCount {
	out := append([]wardload.TierCount(nil), counts...)
	for i := 0; i < len(out)-1; i++ {
		if out[i].Patients > 0 {
			out[i].Patients--
			out[i+1].Patients++
			break
		}
	}
	return out
}
