// How pages show times and numbers, so every page shows them alike.

package server

import (
	"math"
	"strconv"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// formatAt shows an instant in UTC to the minute; pages that show audit
// or token times say they are UTC.
func formatAt(t time.Time) string {
	return t.UTC().Format("2006-01-02 15:04 UTC")
}

// formatLocal shows an instant in the ward's time zone to the minute,
// naming the zone.
func formatLocal(t time.Time, ward *wardload.Ward) string {
	if loc, err := ward.Location(); err == nil {
		t = t.In(loc)
	}
	return t.Format("2006-01-02 15:04") + " (" + ward.TimeZone + ")"
}

// formatDecimal shows a stored number in the shortest form that reads
// back exactly, so a saved form shows what was typed (12, 7.5).
func formatDecimal(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// minutes formats care minutes, "–" when undefined.
func minutes(n stats.Number) string {
	if !n.Defined || math.IsNaN(n.Value) {
		return "–"
	}
	return strconv.FormatFloat(n.Value, 'f', 1, 64)
}

// oneDecimal is how the page shows nurse-hours it does not share with the
// export: to one decimal, never "-0.0".
func oneDecimal(v float64) string {
	s := strconv.FormatFloat(v, 'f', 1, 64)
	if s == "-0.0" {
		return "0.0"
	}
	return s
}
