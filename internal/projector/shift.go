package projector

import (
	"time"

	"wardload/internal/wardload"
)

// Choice is one dated shift the census page offers, with its real start
// and end instants (ShiftPattern.Window).
type Choice struct {
	Date       wardload.Date
	Shift      *wardload.ShiftPattern
	Start, End time.Time
	// Starting is set when the shift has not started yet at now; otherwise
	// it is running.
	Starting bool
}

// CurrentShift returns the dated shift a census entered at now is most
// likely for, in the ward's time zone: of the shifts running at now (a
// night shift that started yesterday evening is still running at 03:00),
// the one that started last, so that during a handover overlap the
// incoming shift is chosen; when none is running, the next one to start.
// Windows are the real ones (ShiftPattern.Window). It returns EINVALID
// "time_zone" for a ward without a valid zone and ENOTFOUND "shift" when
// patterns is empty. The census page uses ShiftChoices, which also offers
// a shift about to start.
func CurrentShift(ward *wardload.Ward, patterns []*wardload.ShiftPattern, now time.Time) (wardload.Date, *wardload.ShiftPattern, error) {
	running, next, err := scanShifts(ward, patterns, now)
	if err != nil {
		return wardload.Date{}, nil, err
	}
	if running != nil {
		return running.Date, running.Shift, nil
	}
	return next.Date, next.Shift, nil
}

// ShiftChoices returns the dated shifts a census entered at now is most
// likely for, most likely first:
//
//   - a shift starting within window after now (the ward's change-over
//     window, Settings.ChangeoverMinutes; real time, so
//     across a daylight-saving change the wall-clock gap differs), then
//     the shift running now (as CurrentShift: the one that started last);
//   - otherwise the shift running now alone;
//   - when none is running, the next one to start alone, however far off.
//
// It returns one or two choices, or the errors of CurrentShift.
func ShiftChoices(ward *wardload.Ward, patterns []*wardload.ShiftPattern, now time.Time, window time.Duration) ([]Choice, error) {
	running, next, err := scanShifts(ward, patterns, now)
	if err != nil {
		return nil, err
	}
	var out []Choice
	if next != nil && (running == nil || next.Start.Sub(now) <= window) {
		out = append(out, *next)
	}
	if running != nil {
		out = append(out, *running)
	}
	return out, nil
}

// scanShifts finds the shift running at now that started last and the next
// one to start (either may be nil, not both).
func scanShifts(ward *wardload.Ward, patterns []*wardload.ShiftPattern, now time.Time) (running, next *Choice, err error) {
	loc, err := ward.Location()
	if err != nil {
		return nil, nil, err
	}
	if len(patterns) == 0 {
		return nil, nil, wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "This ward has no shifts yet.")
	}
	today := Today(now, loc)
	// A shift is at most 24 nominal hours, so one running now started
	// today or yesterday (or, 25 real hours long, the day before); the
	// next to start starts today or tomorrow.
	for offset := -2; offset <= 1; offset++ {
		d := today.AddDays(offset)
		for _, p := range patterns {
			start, end, _ := p.Window(d, loc)
			switch {
			case !start.After(now) && now.Before(end):
				if running == nil || start.After(running.Start) {
					running = &Choice{Date: d, Shift: p, Start: start, End: end}
				}
			case start.After(now):
				if next == nil || start.Before(next.Start) {
					next = &Choice{Date: d, Shift: p, Start: start, End: end, Starting: true}
				}
			}
		}
	}
	return running, next, nil
}
