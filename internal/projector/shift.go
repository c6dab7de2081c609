package projector

import (
	"time"

	"wardload/internal/wardload"
)

// CurrentShift returns the dated shift a census entered at now is most
// likely for, in the ward's time zone: of the shifts running at now (a
// night shift that started yesterday evening is still running at 03:00),
// the one that started last, so that during a handover overlap the
// incoming shift is chosen; when none is running, the next one to start.
// Windows are the real ones (ShiftPattern.Window). It returns EINVALID
// "time_zone" for a ward without a valid zone and ENOTFOUND "shift" when
// patterns is empty.
func CurrentShift(ward *wardload.Ward, patterns []*wardload.ShiftPattern, now time.Time) (wardload.Date, *wardload.ShiftPattern, error) {
	loc, err := ward.Location()
	if err != nil {
		return wardload.Date{}, nil, err
	}
	if len(patterns) == 0 {
		return wardload.Date{}, nil, wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "This ward has no shifts yet.")
	}
	today := Today(now, loc)
	var (
		runDate, nextDate   wardload.Date
		running, next       *wardload.ShiftPattern
		runStart, nextStart time.Time
	)
	// A shift is at most 24 nominal hours, so one running now started
	// today or yesterday (or, 25 real hours long, the day before).
	for offset := -2; offset <= 1; offset++ {
		d := today.AddDays(offset)
		for _, p := range patterns {
			start, end, _ := p.Window(d, loc)
			switch {
			case !start.After(now) && now.Before(end):
				if running == nil || start.After(runStart) {
					running, runDate, runStart = p, d, start
				}
			case start.After(now):
				if next == nil || start.Before(nextStart) {
					next, nextDate, nextStart = p, d, start
				}
			}
		}
	}
	if running != nil {
		return runDate, running, nil
	}
	return nextDate, next, nil
}
