// Package export writes a ward's projections for a roster planner, as CSV
// (RFC 4180) and as JSON with the same rows, columns and digits. The shift
// list download, `wardload export projections` and the projections API
// all use it, so the three give identical content.
//
// Every export carries the caution that its figures are estimates which
// defer to local staffing law, collective agreements and licensed clinical
// judgement, and the ratio floor used for each row.
//
// Free-text CSV cells that start like a spreadsheet formula get a leading
// single quote (see TextCell); number cells and the JSON are never changed.
package export

import (
	"context"
	"slices"
	"strconv"
	"time"

	"wardload/internal/wardload"
)

// MaxDays is the longest date range one export covers (inclusive), so a
// typing error in a year cannot ask for decades of rows.
const MaxDays = 366

// Row is one ward × dated shift: its newest projection. Figures the
// model could not stand behind are nil: a declined projection
// (DataSufficient false, DecidedBy stats.DecidedByInsufficient) has no
// expected hours, band, headcount at cover or shortfall, and no
// recommendation either when no ratio floor is configured.
type Row struct {
	Ward           string        // ward code
	Date           wardload.Date // the dated shift's date
	Shift          string        // shift name when projected
	Start, End     time.Time     // in the ward's time zone
	ShiftHours     float64       // real hours of the dated shift
	CensusRevision int
	TotalPatients  int
	Census         []int // patients per tier, in the order of Rows' tiers
	CoverLevel     float64
	DataSufficient bool     // false: the care-time part declined (method 2)
	Insufficient   []string // why it declined, one sentence per tier
	// ExpectedNurseHours is at the expected total care minutes.
	ExpectedNurseHours *float64
	// BandLevel is the two-sided level of the band (the cover level);
	// BandMethod names it (BandPredictive, BandNormal).
	BandLevel          *float64
	BandMethod         string
	BandLowNurseHours  *float64
	BandHighNurseHours *float64
	NursesCover        *int   // headcount needed at the cover level
	Floor              *int   // nil: no ratio floor configured for the shift
	FloorRule          string // the floor used, in words; NoFloor when none
	Recommended        *int   // nil: no recommendation
	DecidedBy          string
	Shortfall          *Shortfall // at the recommended headcount
	// Movement is census movement during the shift (method version 4;
	// nil for earlier projections, which held the census fixed).
	Movement *Movement
	// Actual is the newest end-of-shift record of the dated shift (nil:
	// none yet): what happened, beside what was projected.
	Actual        *wardload.ShiftRecord
	MethodVersion string
	GeneratedAt   time.Time // when the projection was made, in the ward's time zone
	Caution       string
}

// Rows returns the newest projection (wardload.ProjectionFilter.LatestOnly)
// of each dated shift of ward from from to to inclusive, oldest first
// (date, then shift start): a roster is read forward in time. It also
// returns the ward's tiers, whose order Row.Census follows. Returns
// EINVALID "from" or "to" for a missing date, an end before the start or
// a range over MaxDays.
func Rows(ctx context.Context, st wardload.Store, ward *wardload.Ward, from, to wardload.Date) ([]*wardload.Tier, []Row, error) {
	if from.IsZero() {
		return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "from", "The first date is required.")
	}
	if to.IsZero() {
		return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "to", "The last date is required.")
	}
	if to.Before(from) {
		return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "to", "The last date %s is before the first date %s.", to, from)
	}
	if !to.Before(from.AddDays(MaxDays)) {
		return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "to", "An export covers at most %d days.", MaxDays)
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, nil, err
	}
	tiers, err := st.FindTiers(ctx, ward.ID)
	if err != nil {
		return nil, nil, err
	}
	ps, _, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &ward.ID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return nil, nil, err
	}
	slices.Reverse(ps) // the store gives newest first
	records, _, err := st.FindShiftRecords(ctx, wardload.ShiftRecordFilter{WardID: &ward.ID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return nil, nil, err
	}
	type dated struct {
		date  wardload.Date
		shift int64
	}
	actual := make(map[dated]*wardload.ShiftRecord, len(records))
	for _, rec := range records {
		actual[dated{rec.Date, rec.ShiftID}] = rec
	}
	rows := make([]Row, 0, len(ps))
	for _, p := range ps {
		res, err := DecodeResult(p)
		if err != nil {
			return nil, nil, err
		}
		r := newRow(ward, loc, p, res)
		r.Actual = actual[dated{p.Date, p.ShiftID}]
		byTier := map[int64]int{}
		for _, tc := range p.Counts {
			byTier[tc.TierID] = tc.Patients
		}
		for _, t := range tiers {
			r.Census = append(r.Census, byTier[t.ID])
		}
		rows = append(rows, r)
	}
	return tiers, rows, nil
}

// NoFloor is Row.FloorRule when no ratio floor was configured for the shift.
const NoFloor = "No ratio floor is configured in wardload for this shift."

// FormatHours formats hours and nurse-hours as the export writes them:
// fixed, two decimals (hundredths of an hour, 36 seconds, are finer than
// any roster), with "-0.00" written as "0.00". Pages that show exported
// figures should use it so that they show the same digits.
func FormatHours(v float64) string {
	s := strconv.FormatFloat(v, 'f', 2, 64)
	if s == "-0.00" {
		return "0.00"
	}
	return s
}

// FormatProbability formats a probability or its interval bound as the
// export writes it: four significant digits (0.08355, 1e-05). That is
// finer than the simulation's own error, which the Wilson interval beside
// each share states, and a tiny bound reads 1e-05 rather than 0.
func FormatProbability(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

// FormatLevel formats a probability such as the cover level in the
// shortest form that reads back exactly (0.9, not 0.90).
func FormatLevel(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// FormatTime formats an instant as ISO 8601 / RFC 3339 with a numeric
// offset, to the second: "+00:00" rather than "Z" in UTC, so a planner
// reading the columns always finds an offset of the same shape.
func FormatTime(t time.Time) string { return t.Format(timeLayout) }

const timeLayout = "2006-01-02T15:04:05-07:00"
