package projector

import (
	"context"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// MovementLookbackDays is how far back the end-of-shift records that give
// a shift pattern's admissions and discharges reach: half a year, long
// enough for stats.MinMovementRecords of a once-a-day shift within two
// weeks and for weekday rates within two months, short enough that a
// ward's changed case mix shows within months (common practice, no
// source).
const MovementLookbackDays = 182

// movement gathers the model's census movement for a dated shift: the
// newest revision of each end-of-shift record of the shift pattern dated
// from MovementLookbackDays before the date to the day before it, and the
// planned counts. The model decides what it can use of them.
func (s *Service) movement(ctx context.Context, wardID int64, date wardload.Date, shiftID int64, planned wardload.PlannedMovement, beds int) (*stats.MovementInput, error) {
	from, to := date.AddDays(-MovementLookbackDays), date.AddDays(-1)
	recs, _, err := s.Store.FindShiftRecords(ctx, wardload.ShiftRecordFilter{
		WardID: &wardID, ShiftID: &shiftID, From: &from, To: &to, LatestOnly: true,
	})
	if err != nil {
		return nil, err
	}
	in := &stats.MovementInput{History: make([]stats.MovementRecord, 0, len(recs)), Beds: beds,
		PlannedAdmissions: planned.Admissions, PlannedDischarges: planned.Discharges}
	// Oldest first, so the stored input reads as a history.
	for i := len(recs) - 1; i >= 0; i-- {
		r := recs[i]
		in.History = append(in.History, stats.MovementRecord{Date: r.Date.String(), Admissions: r.Admissions, Discharges: r.Discharges})
	}
	return in, nil
}
