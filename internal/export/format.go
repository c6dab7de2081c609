package export

import (
	"fmt"
	"io"

	"wardload/internal/wardload"
)

// Format is a file format of the roster export. The CLI, the API and the
// shift list download all choose it here, so the three give the same
// bytes under the same content type.
type Format string

// The export's formats.
const (
	CSV  Format = "csv"
	JSON Format = "json"
)

// ParseFormat returns the format named s, exactly "csv" or "json".
func ParseFormat(s string) (Format, bool) {
	switch f := Format(s); f {
	case CSV, JSON:
		return f, true
	}
	return "", false
}

// ContentType is the media type an HTTP response of the format carries.
func (f Format) ContentType() string {
	if f == CSV {
		return "text/csv; charset=utf-8"
	}
	return "application/json; charset=utf-8"
}

// Write writes rows in format f: WriteCSV or WriteJSON.
func Write(w io.Writer, f Format, ward *wardload.Ward, from, to wardload.Date, tiers []*wardload.Tier, rows []Row) error {
	switch f {
	case CSV:
		return WriteCSV(w, tiers, rows)
	case JSON:
		return WriteJSON(w, ward, from, to, tiers, rows)
	}
	return fmt.Errorf("export: unknown format %q", f)
}
