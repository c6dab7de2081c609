package server

import (
	"fmt"
	"net/url"
	"strconv"
	"strings"
	"time"

	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// confirmEndedField is the form field that confirms a census for a dated
// shift that has already ended.
const confirmEndedField = "confirm_ended"

// shiftChoicesVM turns projector.ShiftChoices into the page's large
// choices, marking the one that is date and shift.
func shiftChoicesVM(ward *wardload.Ward, choices []projector.Choice, now time.Time, date, shift string) []web.ShiftChoiceVM {
	var out []web.ShiftChoiceVM
	for _, c := range choices {
		id := strconv.FormatInt(c.Shift.ID, 10)
		rel := "ends in " + formatWait(c.End.Sub(now))
		if c.Starting {
			rel = "starts in " + formatWait(c.Start.Sub(now))
		}
		q := url.Values{"date": {c.Date.String()}, "shift": {id}}
		out = append(out, web.ShiftChoiceVM{
			Label:    fmt.Sprintf("%s, %s (%s)", shiftName(c.Shift), datedShiftTimes(ward, c.Date, c.Start, c.End), rel),
			URL:      censusURL(ward) + "?" + q.Encode(),
			Selected: c.Date.String() == date && id == shift,
		})
	}
	return out
}

// shiftName is how the page names a pattern in a sentence: "Day shift"
// (a pattern already named "… shift" is left alone).
func shiftName(p *wardload.ShiftPattern) string {
	if strings.HasSuffix(strings.ToLower(p.Name), "shift") {
		return p.Name
	}
	return p.Name + " shift"
}

// datedShiftTimes is "Fri 4 Dec 07:30–20:00" in the ward's time zone.
func datedShiftTimes(ward *wardload.Ward, d wardload.Date, start, end time.Time) string {
	if loc, err := ward.Location(); err == nil {
		start, end = start.In(loc), end.In(loc)
	}
	return formatDay(d) + " " + start.Format("15:04") + "–" + end.Format("15:04")
}

// formatDay is "Fri 4 Dec".
func formatDay(d wardload.Date) string {
	return time.Date(d.Year, d.Month, d.Day, 12, 0, 0, 0, time.UTC).Format("Mon 2 Jan")
}

// formatWait is a duration to the minute, rounded down: "20 min",
// "1 h 5 min", "3 h".
func formatWait(d time.Duration) string {
	m := int(d / time.Minute)
	switch {
	case m < 60:
		return strconv.Itoa(m) + " min"
	case m%60 == 0:
		return strconv.Itoa(m/60) + " h"
	}
	return fmt.Sprintf("%d h %d min", m/60, m%60)
}

// saveTarget fills the sentence near Save that names the dated shift a
// save stores, and whether that shift has ended at now.
func saveTarget(vm *web.CensusVM, ward *wardload.Ward, p *wardload.ShiftPattern, date string, now time.Time) {
	day, err := wardload.ParseDate(date)
	loc, lerr := ward.Location()
	if err != nil || lerr != nil {
		return
	}
	start, end, _ := p.Window(day, loc)
	vm.SaveShift = shiftName(p)
	vm.SaveDate = formatDay(day) + " " + strconv.Itoa(day.Year)
	vm.SaveTimes = start.In(loc).Format("15:04") + "–" + end.In(loc).Format("15:04")
	if !end.After(now) {
		vm.Ended = true
		vm.EndedAt = formatDay(wardload.DateOf(end.In(loc))) + " " + end.In(loc).Format("15:04")
	}
}

// shiftEnded reports whether the dated shift ended at or before now; the
// date must be within the projector's window (a date outside it is the
// projector's to refuse, with no question first).
func shiftEnded(d *censusData, day wardload.Date, shiftID int64, now time.Time) bool {
	if day.Before(d.today.AddDays(-projector.MaxDaysBack)) || day.After(d.today.AddDays(projector.MaxDaysAhead)) {
		return false
	}
	loc, err := d.ward.Location()
	if err != nil {
		return false
	}
	for _, p := range d.shifts {
		if p.ID == shiftID {
			_, end, _ := p.Window(day, loc)
			return !end.After(now)
		}
	}
	return false
}
