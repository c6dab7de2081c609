package wardload_test

import (
	"testing"
	"time"

	"wardload/internal/wardload"
)

// The real length of a dated shift follows the ward's wall clock. Europe/London
// changed from GMT to BST at 01:00 UTC on 29 March 2026 and back at 01:00 UTC
// on 25 October 2026 (EU/UK rule: last Sunday of March and of October; the
// dates are checked against Go's tz database in the test itself).
func TestShiftWindowAcrossDaylightSaving(t *testing.T) {
	loc, err := time.LoadLocation("Europe/London")
	if err != nil {
		t.Fatal(err)
	}
	night := &wardload.ShiftPattern{WardID: 1, Name: "Night", StartMinute: 19*60 + 30, NominalHours: 12}
	tests := []struct {
		date      string
		wantHours float64
		wantEnd   string // local wall clock
	}{
		{"2026-03-14", 12, "2026-03-15T07:30:00Z"}, // GMT both ends
		{"2026-03-28", 11, "2026-03-29T07:30:00+01:00"},
		{"2026-10-24", 13, "2026-10-25T07:30:00Z"},
		{"2026-07-01", 12, "2026-07-02T07:30:00+01:00"},
	}
	for _, tt := range tests {
		d, err := wardload.ParseDate(tt.date)
		if err != nil {
			t.Fatal(err)
		}
		start, end, hours := night.Window(d, loc)
		if hours != tt.wantHours {
			t.Errorf("%s: night shift lasts %v h, want %v", tt.date, hours, tt.wantHours)
		}
		if got := end.Format(time.RFC3339); got != tt.wantEnd {
			t.Errorf("%s: ends %s, want %s", tt.date, got, tt.wantEnd)
		}
		if got := start.Format("15:04"); got != "19:30" {
			t.Errorf("%s: starts %s local, want 19:30", tt.date, got)
		}
	}

	// A day shift on the change day itself, wholly after the change, is unaffected.
	day := &wardload.ShiftPattern{WardID: 1, Name: "Day", StartMinute: 7*60 + 30, NominalHours: 12.5}
	d, _ := wardload.ParseDate("2026-03-29")
	if _, _, h := day.Window(d, loc); h != 12.5 {
		t.Errorf("day shift on 2026-03-29 lasts %v h, want 12.5", h)
	}
	// In a zone without daylight saving every night is 12 hours.
	if _, _, h := night.Window(d, time.UTC); h != 12 {
		t.Errorf("UTC night lasts %v h, want 12", h)
	}
}

func TestShiftPatternValidate(t *testing.T) {
	tests := []struct {
		name  string
		p     wardload.ShiftPattern
		field string
	}{
		{"ok", wardload.ShiftPattern{WardID: 1, Name: "Day", StartMinute: 450, NominalHours: 12.5}, ""},
		{"no name", wardload.ShiftPattern{WardID: 1, Name: " ", StartMinute: 450, NominalHours: 8}, "name"},
		{"start past midnight", wardload.ShiftPattern{WardID: 1, Name: "X", StartMinute: 1440, NominalHours: 8}, "start"},
		{"zero hours", wardload.ShiftPattern{WardID: 1, Name: "X", StartMinute: 0, NominalHours: 0}, "hours"},
		{"over a day", wardload.ShiftPattern{WardID: 1, Name: "X", StartMinute: 0, NominalHours: 24.5}, "hours"},
		{"part minute", wardload.ShiftPattern{WardID: 1, Name: "X", StartMinute: 0, NominalHours: 7.4999}, "hours"},
	}
	for _, tt := range tests {
		err := tt.p.Validate()
		if tt.field == "" {
			if err != nil {
				t.Errorf("%s: unexpected error %v", tt.name, err)
			}
			continue
		}
		if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != tt.field {
			t.Errorf("%s: got %v, want EINVALID on %s", tt.name, err, tt.field)
		}
	}
}

func TestParseClock(t *testing.T) {
	if m, err := wardload.ParseClock("19:30"); err != nil || m != 1170 {
		t.Errorf("ParseClock(19:30) = %d, %v", m, err)
	}
	for _, bad := range []string{"24:00", "7.30", "", "19:3"} {
		if _, err := wardload.ParseClock(bad); wardload.ErrorCode(err) != wardload.EINVALID {
			t.Errorf("ParseClock(%q) err = %v, want EINVALID", bad, err)
		}
	}
	p := wardload.ShiftPattern{StartMinute: 7*60 + 5}
	if got := p.StartClock(); got != "07:05" {
		t.Errorf("StartClock = %s", got)
	}
}
