package wardload

import (
	"context"
	"math"
	"strings"
	"time"
)

// ShiftPattern is a recurring shift of a ward, e.g. "Night" from 19:30 for
// 12 nominal hours. Nominal hours are wall-clock hours; the real length of a
// dated shift can differ across a daylight-saving change (see Window).
type ShiftPattern struct {
	ID           int64
	WardID       int64
	Name         string    // unique within the ward, e.g. "Day", "Night"
	StartMinute  int       // local start, minutes after midnight (0..1439)
	NominalHours float64   // wall-clock length, > 0 and ≤ 24
	RetiredAt    time.Time `json:",omitzero"` // zero while in use; see retire.go
}

// Validate checks the pattern's own fields.
func (p *ShiftPattern) Validate() error {
	if p.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if n := strings.TrimSpace(p.Name); n == "" || len(n) > 40 {
		return FieldErrorf(EINVALID, "name", "Shift name is required (at most 40 characters).")
	}
	if !plainText(p.Name, "") {
		return FieldErrorf(EINVALID, "name", "Shift name must be one line of text, without control characters.")
	}
	if !startsAlnum(p.Name) {
		return FieldErrorf(EINVALID, "name", "Shift name must begin with a letter or digit.")
	}
	if p.StartMinute < 0 || p.StartMinute >= 24*60 {
		return FieldErrorf(EINVALID, "start", "Shift start must be a time of day between 00:00 and 23:59.")
	}
	if !(p.NominalHours > 0 && p.NominalHours <= 24) || math.IsNaN(p.NominalHours) {
		return FieldErrorf(EINVALID, "hours", "Shift length must be more than 0 and at most 24 hours.")
	}
	// Whole minutes only: a shift of 7.4999 hours is a typing error.
	if m := p.NominalHours * 60; math.Abs(m-math.Round(m)) > 1e-9 {
		return FieldErrorf(EINVALID, "hours", "Shift length must be a whole number of minutes.")
	}
	return nil
}

// StartClock returns the start as "HH:MM".
func (p *ShiftPattern) StartClock() string {
	return time.Date(2000, 1, 1, p.StartMinute/60, p.StartMinute%60, 0, 0, time.UTC).Format("15:04")
}

// ParseClock parses "HH:MM" (24-hour) into minutes after midnight.
func ParseClock(s string) (int, error) {
	t, err := time.Parse("15:04", strings.TrimSpace(s))
	if err != nil {
		return 0, FieldErrorf(EINVALID, "start", "Time %q is not a valid HH:MM time.", s)
	}
	return t.Hour()*60 + t.Minute(), nil
}

// Window returns the real start and end instants of this shift on date d in
// loc, and its real length in hours. The end is the wall-clock start plus
// the nominal hours, so a 12-hour night shift over the spring change lasts
// 11 real hours and over the autumn change 13. A start time that does not
// exist on that date (inside a spring gap) is moved forward as Go's
// time.Date does.
func (p *ShiftPattern) Window(d Date, loc *time.Location) (start, end time.Time, hours float64) {
	start = d.At(p.StartMinute/60, p.StartMinute%60, loc)
	nominal := int(math.Round(p.NominalHours * 60))
	end = time.Date(d.Year, d.Month, d.Day, 0, p.StartMinute+nominal, 0, 0, loc)
	return start, end, end.Sub(start).Hours()
}

// ShiftPatternUpdate holds the fields of a pattern that may change.
type ShiftPatternUpdate struct {
	Name         *string
	StartMinute  *int
	NominalHours *float64
	Retired      *bool // true retires the pattern, false reinstates it
}

// Apply returns a copy of p with upd applied at now, or EINVALID naming
// the field if the result is not a valid pattern. p is not changed.
func (upd ShiftPatternUpdate) Apply(p *ShiftPattern, now time.Time) (*ShiftPattern, error) {
	out := *p
	out.RetiredAt = retireAt(out.RetiredAt, upd.Retired, now)
	setIf(&out.Name, upd.Name)
	setIf(&out.StartMinute, upd.StartMinute)
	setIf(&out.NominalHours, upd.NominalHours)
	return validated(&out)
}

// ShiftService manages the shift patterns of wards.
type ShiftService interface {
	// CreateShiftPattern returns EINVALID, ENOTFOUND (ward) or ECONFLICT (name taken in the ward).
	CreateShiftPattern(ctx context.Context, p *ShiftPattern) error
	// FindShiftPatternByID returns ENOTFOUND if there is no such pattern.
	FindShiftPatternByID(ctx context.Context, id int64) (*ShiftPattern, error)
	// FindShiftPatterns returns the ward's patterns, retired ones
	// included, ordered by StartMinute.
	FindShiftPatterns(ctx context.Context, wardID int64) ([]*ShiftPattern, error)
	// UpdateShiftPattern returns ENOTFOUND, EINVALID or ECONFLICT;
	// retiring the ward's last active pattern is EINVALID naming
	// "retired" (CheckShiftRetire).
	UpdateShiftPattern(ctx context.Context, id int64, upd ShiftPatternUpdate) (*ShiftPattern, error)
}
