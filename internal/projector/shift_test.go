package projector_test

import (
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
