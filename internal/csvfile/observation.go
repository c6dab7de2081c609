package csvfile

import (
	"fmt"
	"io"
	"slices"
	"strings"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// The columns of an observation import. A ward's factor names may follow
// as further numeric columns; nothing else is accepted.
var observationColumns = []string{"date", "shift", "tier", "window_hours", "care_minutes"}

// maxRealShiftHours is the longest real shift the model takes (a 24-hour
// pattern over the autumn clock change).
const maxRealShiftHours = 25

// ObservationHeader is the header row of an observation import file for
// ward: the fixed columns, then the ward's factors.
func ObservationHeader(ward *wardload.Ward) []string {
	return append(slices.Clone(observationColumns), ward.FactorNames...)
}

// ReadObservations reads an observation import file for ward. Shifts
// are named by pattern name, tiers by code. A factor cell may be blank
// (not recorded). Every problem is EINVALID with a message naming the file
// line and column. lines[i] is the file line of obs[i], so that a store
// error about "Row N" can be shown as a line of the file.
//
// Any column that is not a known column is refused: a file exported from
// another system may carry a name, record number or birth date, and
// wardload keeps no patient identifiers, so such a file must be cut down
// before import rather than silently trimmed.
func ReadObservations(r io.Reader, ward *wardload.Ward, tiers []*wardload.Tier, shifts []*wardload.ShiftPattern) (obs []*wardload.Observation, lines []int, err error) {
	t, err := Read(r)
	if err != nil {
		return nil, nil, err
	}
	allowed := ObservationHeader(ward)
	for i, h := range t.Header {
		if !slices.Contains(allowed, h) {
			return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "file",
				"line 1, column %d: column %q is not accepted. wardload stores no patient identifiers or free text, so a file may only have the columns %s. Remove the other columns and import again.",
				i+1, clip(h, 40), strings.Join(allowed, ", "))
		}
	}
	for _, c := range observationColumns {
		if t.Index(c) < 0 {
			return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "file",
				"line 1: the column %q is missing. The header must have %s.", c, strings.Join(allowed, ", "))
		}
	}
	tierByCode := map[string]*wardload.Tier{}
	for _, tr := range tiers {
		tierByCode[tr.Code] = tr
	}
	shiftByName := map[string]*wardload.ShiftPattern{}
	for _, sp := range shifts {
		shiftByName[strings.ToLower(sp.Name)] = sp
	}

	// Numbers first, column by column: Floats names line and column.
	window, err := t.Floats("window_hours")
	if err != nil {
		return nil, nil, err
	}
	care, err := t.Floats("care_minutes")
	if err != nil {
		return nil, nil, err
	}
	dates, _ := t.Strings("date")
	shiftNames, _ := t.Strings("shift")
	tierCodes, _ := t.Strings("tier")

	obs = make([]*wardload.Observation, len(t.Records))
	for i := range t.Records {
		line := t.Lines[i]
		cellErr := func(col, format string, args ...any) error {
			return wardload.FieldErrorf(wardload.EINVALID, col, "line %d, column %q: %s", line, col, fmt.Sprintf(format, args...))
		}
		d, err := wardload.ParseDate(dates[i])
		if err != nil {
			return nil, nil, cellErr("date", "%q is not a date; use YYYY-MM-DD, e.g. 2026-03-02.", clip(dates[i], 40))
		}
		sp, ok := shiftByName[strings.ToLower(shiftNames[i])]
		if !ok {
			return nil, nil, cellErr("shift", "%q is not a shift pattern of this ward (%s).", clip(shiftNames[i], 40), shiftList(shifts))
		}
		tr, ok := tierByCode[tierCodes[i]]
		if !ok {
			return nil, nil, cellErr("tier", "%q is not a tier code of this ward (%s).", clip(tierCodes[i], 40), tierList(tiers))
		}
		o := &wardload.Observation{WardID: ward.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d,
			WindowHours: window.Values[i], CareMinutes: care.Values[i]}
		for _, f := range ward.FactorNames {
			c := t.Index(f)
			if c < 0 || strings.TrimSpace(t.Records[i][c]) == "" {
				continue
			}
			// The package's number rules, so a factor reads exactly as
			// the other numeric columns do.
			v, err := t.Float(i, f)
			if err != nil {
				return nil, nil, err
			}
			if o.Factors == nil {
				o.Factors = map[string]float64{}
			}
			o.Factors[f] = v
		}
		if err := o.Validate(); err != nil {
			field := wardload.ErrorField(err)
			if field == "" {
				field = "file"
			}
			return nil, nil, cellErr(field, "%s", wardload.ErrorMessage(err))
		}
		// The model refuses an observation that scales past
		// stats.MaxShiftMinutes for its shift (at most 25 real hours), and
		// values near the float64 limit overflow the review's sums; such a
		// cell is an entry error, refused here rather than stored.
		if !(o.CareMinutes/o.WindowHours*maxRealShiftHours <= stats.MaxShiftMinutes) {
			return nil, nil, cellErr("care_minutes", "%g minutes in %g hours is more than wardload can use (at most %g minutes per hour of the window); check the minutes and the window.",
				o.CareMinutes, o.WindowHours, stats.MaxShiftMinutes/maxRealShiftHours)
		}
		obs[i] = o
	}
	return obs, t.Lines, nil
}

func shiftList(shifts []*wardload.ShiftPattern) string {
	names := make([]string, len(shifts))
	for i, s := range shifts {
		names[i] = s.Name
	}
	return listOrNone(names)
}

func tierList(tiers []*wardload.Tier) string {
	codes := make([]string, len(tiers))
	for i, t := range tiers {
		codes[i] = t.Code
	}
	return listOrNone(codes)
}

func listOrNone(s []string) string {
	if len(s) == 0 {
		return "it has none yet"
	}
	return "it has " + strings.Join(s, ", ")
}

// clip shortens s, quoted in a message, to at most n bytes of valid UTF-8
// (as the server clips what it echoes).
func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return strings.ToValidUTF8(s[:n], "")
}
