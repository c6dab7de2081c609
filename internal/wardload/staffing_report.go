package wardload

import (
	"fmt"
	"slices"
	"time"
)

// StaffedShift is one dated shift of the planned-against-needed report:
// what the projection recommended, what was planned and who worked.
type StaffedShift struct {
	Date        Date
	Hours       float64 // the shift's length, for staff-hours
	Recommended *int    // nil: no projection, or it declined without a floor
	Floor       *int    // the ratio floor the projection used; nil: none
	Planned     *int    // nurses rostered; nil: no plan
	Worked      *int    // nurses who worked (end-of-shift record); nil: not recorded
	CareUndone  bool    // the end-of-shift record says care was left undone or delayed
}

// StaffingWeek sums one ISO week of StaffedShift.
type StaffingWeek struct {
	Week      string // ISO 8601 week, e.g. "2026-W09"
	From, To  Date   // its Monday and Sunday
	Shifts    int    // dated shifts with a recommendation
	Recorded  int    // of those, with the staff who worked recorded
	BelowRec  int    // worked below the recommendation
	BelowFlr  int    // worked below the ratio floor
	Planned   int    // dated shifts with a recommendation and a plan
	PlanBelow int    // planned below the recommendation
	// Staff-hours short and over: Σ max(0, recommended − worked) × hours
	// and Σ max(0, worked − recommended) × hours, over recorded shifts.
	HoursShort, HoursOver float64
	CareUndone            int // recorded shifts with care left undone
}

// StaffingWeeks sums shifts by ISO week (Monday to Sunday), newest week
// first. A shift counts only where it has a recommendation; "below the
// recommendation" and the staff-hours compare the nurses who worked with
// the recommended headcount (both count the nurse in charge), so a week's
// hours short are the nurse-hours the estimate said were needed and were
// not worked (a figure, not a judgement: the estimate defers to clinical
// judgement on the day).
func StaffingWeeks(shifts []StaffedShift) []StaffingWeek {
	byWeek := map[string]*StaffingWeek{}
	for _, s := range shifts {
		if s.Recommended == nil {
			continue
		}
		t := time.Date(s.Date.Year, s.Date.Month, s.Date.Day, 12, 0, 0, 0, time.UTC)
		y, wk := t.ISOWeek()
		key := isoWeek(y, wk)
		w := byWeek[key]
		if w == nil {
			back := (int(t.Weekday()) + 6) % 7 // days since Monday
			monday := s.Date.AddDays(-back)
			w = &StaffingWeek{Week: key, From: monday, To: monday.AddDays(6)}
			byWeek[key] = w
		}
		w.Shifts++
		rec := *s.Recommended
		if s.Planned != nil {
			w.Planned++
			if *s.Planned < rec {
				w.PlanBelow++
			}
		}
		if s.Worked == nil {
			continue
		}
		w.Recorded++
		worked := *s.Worked
		if worked < rec {
			w.BelowRec++
			w.HoursShort += float64(rec-worked) * s.Hours
		} else {
			w.HoursOver += float64(worked-rec) * s.Hours
		}
		if s.Floor != nil && worked < *s.Floor {
			w.BelowFlr++
		}
		if s.CareUndone {
			w.CareUndone++
		}
	}
	out := make([]StaffingWeek, 0, len(byWeek))
	for _, w := range byWeek {
		out = append(out, *w)
	}
	slices.SortFunc(out, func(a, b StaffingWeek) int {
		switch {
		case a.From.Before(b.From):
			return 1
		case b.From.Before(a.From):
			return -1
		}
		return 0
	})
	return out
}

// isoWeek formats an ISO year and week as "2026-W09".
func isoWeek(y, w int) string { return fmt.Sprintf("%04d-W%02d", y, w) }
