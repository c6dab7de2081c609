package projector_test

import (
	"slices"
	"testing"
	"time"

	"wardload/internal/projector"
	"wardload/internal/wardload"
)

func TestCurrentShift(t *testing.T) {
	ward := &wardload.Ward{Code: "w", Name: "W", TimeZone: "Europe/London"}
	loc, err := ward.Location()
	must(t, err)
	// Day 07:30 and Night 19:30, 12.5 hours each: they overlap 30 minutes at each handover.
	dayP := &wardload.ShiftPattern{ID: 1, Name: "Day", StartMinute: 450, NominalHours: 12.5}
	nightP := &wardload.ShiftPattern{ID: 2, Name: "Night", StartMinute: 1170, NominalHours: 12.5}
	early := &wardload.ShiftPattern{ID: 3, Name: "Early", StartMinute: 420, NominalHours: 8}
	at := func(s string) time.Time {
		tm, err := time.ParseInLocation("2006-01-02 15:04", s, loc)
		must(t, err)
		return tm
	}
	for _, tc := range []struct {
		name     string
		patterns []*wardload.ShiftPattern
		now      time.Time
		date     string
		shift    string
	}{
		{"night started yesterday", []*wardload.ShiftPattern{dayP, nightP}, at("2026-06-10 03:00"), "2026-06-09", "Night"},
		{"midday", []*wardload.ShiftPattern{dayP, nightP}, at("2026-06-10 12:00"), "2026-06-10", "Day"},
		{"evening handover: incoming night", []*wardload.ShiftPattern{dayP, nightP}, at("2026-06-10 19:45"), "2026-06-10", "Night"},
		{"morning handover: incoming day", []*wardload.ShiftPattern{dayP, nightP}, at("2026-06-10 07:45"), "2026-06-10", "Day"},
		{"day starts at its start", []*wardload.ShiftPattern{dayP, nightP}, at("2026-06-10 07:30"), "2026-06-10", "Day"},
		{"gap: next shift tomorrow", []*wardload.ShiftPattern{early}, at("2026-06-10 16:00"), "2026-06-11", "Early"},
		{"gap: next shift today", []*wardload.ShiftPattern{early}, at("2026-06-10 06:00"), "2026-06-10", "Early"},
		// Across the spring change the night of 28 March ends at 08:00 wall
		// clock as usual (11.5 real hours), so at 07:45 it is still running.
		{"spring night still running", []*wardload.ShiftPattern{nightP}, at("2026-03-29 07:45"), "2026-03-28", "Night"},
		// The time zone, not UTC, decides the date: 00:30 in London on
		// 11 June is 23:30 UTC on the 10th; the night is of the 10th.
		{"zone decides", []*wardload.ShiftPattern{dayP, nightP}, at("2026-06-11 00:30").UTC(), "2026-06-10", "Night"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			d, p, err := projector.CurrentShift(ward, tc.patterns, tc.now)
			must(t, err)
			if d.String() != tc.date || p.Name != tc.shift {
				t.Errorf("at %v: %s %s, want %s %s", tc.now, d, p.Name, tc.date, tc.shift)
			}
		})
	}
	if _, _, err := projector.CurrentShift(ward, nil, at("2026-06-10 12:00")); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("no patterns: %v", err)
	}
	if _, _, err := projector.CurrentShift(&wardload.Ward{TimeZone: "Mars/Base"}, []*wardload.ShiftPattern{dayP}, at("2026-06-10 12:00")); wardload.ErrorField(err) != "time_zone" {
		t.Errorf("bad zone: %v", err)
	}
}

func TestShiftChoices(t *testing.T) {
	ward := &wardload.Ward{Code: "w", Name: "W", TimeZone: "Europe/London"}
	loc, err := ward.Location()
	must(t, err)
	// Day 07:30 and Night 19:30, 12.5 hours each.
	dayP := &wardload.ShiftPattern{ID: 1, Name: "Day", StartMinute: 450, NominalHours: 12.5}
	nightP := &wardload.ShiftPattern{ID: 2, Name: "Night", StartMinute: 1170, NominalHours: 12.5}
	// Evening 16:00 for 8.5 hours ends at 00:30; Midnight starts at 00:00
	// of the next date, so at 23:00 the starting shift is tomorrow's.
	evening := &wardload.ShiftPattern{ID: 3, Name: "Evening", StartMinute: 960, NominalHours: 8.5}
	midnight := &wardload.ShiftPattern{ID: 4, Name: "Midnight", StartMinute: 0, NominalHours: 8}
	// Early 03:00 on the spring change (29 March 2026, London 01:00 GMT →
	// 02:00 BST) starts at 02:00 UTC: 90 real minutes before is 00:30 on
	// the wall clock, 150 wall-clock minutes earlier.
	early := &wardload.ShiftPattern{ID: 5, Name: "Early", StartMinute: 180, NominalHours: 8}
	at := func(s string) time.Time {
		tm, err := time.ParseInLocation("2006-01-02 15:04", s, loc)
		must(t, err)
		return tm
	}
	dn := []*wardload.ShiftPattern{dayP, nightP}
	for _, tc := range []struct {
		name     string
		patterns []*wardload.ShiftPattern
		now      time.Time
		want     []string // "date shift starting|running"
	}{
		// Across one ordinary day with Day 07:30 and Night 19:30.
		{"05:59 night only", dn, at("2026-06-10 05:59"), []string{"2026-06-09 Night running"}},
		{"06:00 window opens", dn, at("2026-06-10 06:00"), []string{"2026-06-10 Day starting", "2026-06-09 Night running"}},
		{"07:00 day first", dn, at("2026-06-10 07:00"), []string{"2026-06-10 Day starting", "2026-06-09 Night running"}},
		{"07:29 day first", dn, at("2026-06-10 07:29"), []string{"2026-06-10 Day starting", "2026-06-09 Night running"}},
		{"07:30 day started", dn, at("2026-06-10 07:30"), []string{"2026-06-10 Day running"}},
		{"12:00 day only", dn, at("2026-06-10 12:00"), []string{"2026-06-10 Day running"}},
		{"18:00 night first", dn, at("2026-06-10 18:00"), []string{"2026-06-10 Night starting", "2026-06-10 Day running"}},
		{"19:30 night started", dn, at("2026-06-10 19:30"), []string{"2026-06-10 Night running"}},
		{"03:00 night of yesterday", dn, at("2026-06-11 03:00"), []string{"2026-06-10 Night running"}},
		// Crossing midnight: the starting shift belongs to tomorrow's date.
		{"23:00 tomorrow's midnight shift first", []*wardload.ShiftPattern{evening, midnight}, at("2026-06-10 23:00"), []string{"2026-06-11 Midnight starting", "2026-06-10 Evening running"}},
		{"00:15 overlap: latest started", []*wardload.ShiftPattern{evening, midnight}, at("2026-06-11 00:15"), []string{"2026-06-11 Midnight running"}},
		{"22:29 window not open", []*wardload.ShiftPattern{evening, midnight}, at("2026-06-10 22:29"), []string{"2026-06-10 Evening running"}},
		// Spring change: the window is real time, not wall clock.
		{"spring 00:30 is 90 real minutes before", []*wardload.ShiftPattern{nightP, early}, at("2026-03-29 00:30"), []string{"2026-03-29 Early starting", "2026-03-28 Night running"}},
		{"spring 00:29 is 91 real minutes before", []*wardload.ShiftPattern{nightP, early}, at("2026-03-29 00:29"), []string{"2026-03-28 Night running"}},
		{"spring 07:00 night still running", dn, at("2026-03-29 07:00"), []string{"2026-03-29 Day starting", "2026-03-28 Night running"}},
		// Autumn change (25 October 2026): the night lasts 13 real hours.
		{"autumn 07:00", dn, at("2026-10-25 07:00"), []string{"2026-10-25 Day starting", "2026-10-24 Night running"}},
		// Nothing running: the next shift alone, even beyond the window.
		{"gap: next far off", []*wardload.ShiftPattern{early}, at("2026-06-10 16:00"), []string{"2026-06-11 Early starting"}},
		// The time zone decides the date: 00:30 in London is 23:30 UTC.
		{"zone decides", dn, at("2026-06-11 00:30").UTC(), []string{"2026-06-10 Night running"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			cs, err := projector.ShiftChoices(ward, tc.patterns, tc.now, wardload.DefaultChangeoverMinutes*time.Minute)
			must(t, err)
			var got []string
			for _, c := range cs {
				state := "running"
				if c.Starting {
					state = "starting"
				}
				got = append(got, c.Date.String()+" "+c.Shift.Name+" "+state)
				start, end, _ := c.Shift.Window(c.Date, loc)
				if !c.Start.Equal(start) || !c.End.Equal(end) {
					t.Errorf("%s: window %v–%v, want %v–%v", got[len(got)-1], c.Start, c.End, start, end)
				}
				if c.Starting != c.Start.After(tc.now) || (!c.Starting && !tc.now.Before(c.End)) {
					t.Errorf("%s at %v: start %v end %v", got[len(got)-1], tc.now, c.Start, c.End)
				}
			}
			if !slices.Equal(got, tc.want) {
				t.Errorf("at %v: %q, want %q", tc.now, got, tc.want)
			}
		})
	}
	if _, err := projector.ShiftChoices(ward, nil, at("2026-06-10 12:00"), time.Hour); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("no patterns: %v", err)
	}
	if _, err := projector.ShiftChoices(&wardload.Ward{TimeZone: "Mars/Base"}, dn, at("2026-06-10 12:00"), time.Hour); wardload.ErrorField(err) != "time_zone" {
		t.Errorf("bad zone: %v", err)
	}
}

// TestShiftChoicesWindow checks the ward's change-over window: the
// starting shift is offered first from exactly window before its start
// (07:30 Day), and a window of 0 offers only the running shift.
func TestShiftChoicesWindow(t *testing.T) {
	ward := &wardload.Ward{Code: "w", Name: "W", TimeZone: "Europe/London"}
	loc, err := ward.Location()
	must(t, err)
	dn := []*wardload.ShiftPattern{
		{ID: 1, Name: "Day", StartMinute: 450, NominalHours: 12},
		{ID: 2, Name: "Night", StartMinute: 1170, NominalHours: 12},
	}
	for _, tc := range []struct {
		clock   string
		minutes int
		want    string // the first choice's shift
		choices int
	}{
		{"07:00", 30, "Day", 2},
		{"06:59", 30, "Night", 1},
		{"07:29", 0, "Night", 1},
		{"03:30", 240, "Day", 2},
		{"03:29", 240, "Night", 1},
	} {
		now, err := time.ParseInLocation("2006-01-02 15:04", "2026-06-10 "+tc.clock, loc)
		must(t, err)
		cs, err := projector.ShiftChoices(ward, dn, now, time.Duration(tc.minutes)*time.Minute)
		must(t, err)
		if len(cs) != tc.choices || cs[0].Shift.Name != tc.want {
			t.Errorf("%s with a %d-minute window: %d choices, first %s; want %d, first %s", tc.clock, tc.minutes, len(cs), cs[0].Shift.Name, tc.choices, tc.want)
		}
	}
}
