package wardload

import (
	"cmp"
	"fmt"
	"time"
)

// Date is a civil (calendar) date with no time zone: the date a shift is
// rostered on, as the ward names it. A night shift starting on 3 March
// belongs to Date 3 March even though it ends on the 4th.
type Date struct {
	Year  int
	Month time.Month
	Day   int
}

// ParseDate parses "YYYY-MM-DD". It returns EINVALID for anything else,
// including impossible dates such as 2026-02-30.
func ParseDate(s string) (Date, error) {
	t, err := time.Parse("2006-01-02", s)
	if err != nil {
		return Date{}, Errorf(EINVALID, "Date %q is not a valid date (use YYYY-MM-DD).", s)
	}
	return DateOf(t), nil
}

// DateOf returns the civil date of t in t's own location.
func DateOf(t time.Time) Date {
	y, m, d := t.Date()
	return Date{y, m, d}
}

// String formats the date as YYYY-MM-DD. Imports format a date per row,
// so the usual case is written by hand rather than through fmt.
func (d Date) String() string {
	if d.Year < 0 || d.Year > 9999 || d.Month < 0 || d.Month > 99 || d.Day < 0 || d.Day > 99 {
		return fmt.Sprintf("%04d-%02d-%02d", d.Year, d.Month, d.Day)
	}
	m, day := int(d.Month), d.Day
	b := [10]byte{byte('0' + d.Year/1000), byte('0' + d.Year/100%10), byte('0' + d.Year/10%10), byte('0' + d.Year%10), '-',
		byte('0' + m/10), byte('0' + m%10), '-', byte('0' + day/10), byte('0' + day%10)}
	return string(b[:])
}

// IsZero reports whether d is the zero Date.
func (d Date) IsZero() bool { return d == Date{} }

// At returns the instant of local wall-clock time h:m on this date in loc.
func (d Date) At(hour, minute int, loc *time.Location) time.Time {
	return time.Date(d.Year, d.Month, d.Day, hour, minute, 0, 0, loc)
}

// AddDays returns the date n days later (earlier when n < 0).
func (d Date) AddDays(n int) Date {
	return DateOf(time.Date(d.Year, d.Month, d.Day+n, 12, 0, 0, 0, time.UTC))
}

// Before reports whether d is before o.
func (d Date) Before(o Date) bool { return d.compare(o) < 0 }

// After reports whether d is after o.
func (d Date) After(o Date) bool { return d.compare(o) > 0 }

// compare orders by year, month and day: for years 0–9999 the order of
// the YYYY-MM-DD texts, without formatting them (imports compare a date
// per row).
func (d Date) compare(o Date) int {
	switch {
	case d.Year != o.Year:
		return cmp.Compare(d.Year, o.Year)
	case d.Month != o.Month:
		return cmp.Compare(d.Month, o.Month)
	}
	return cmp.Compare(d.Day, o.Day)
}
