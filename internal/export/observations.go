package export

import (
	"context"
	"encoding/csv"
	"io"
	"slices"
	"strconv"

	"wardload/internal/wardload"
)

// The observation export writes a ward's care observations as CSV in the
// layout the observation import reads (date, shift, tier, window_hours,
// care_minutes, then the ward's factors), so that a file exported from one
// installation can be imported into another, and so that `wardload
// summarize` can be run on exactly what the review page summarises.

// observationColumns are the import's fixed columns, in its order.
var observationColumns = []string{"date", "shift", "tier", "window_hours", "care_minutes"}

// reviewColumns are added when the review state is asked for. The import
// refuses them (it stores no free text it did not ask for), so a file
// with them must have them removed before it is imported again.
var reviewColumns = []string{"excluded", "excluded_reason", "excluded_by", "excluded_at"}

// observationPage is how many observations are read per store call, so
// that memory stays bounded whatever the ward's history.
var observationPage = 5000

// ObservationQuery says which observations of a ward to export.
type ObservationQuery struct {
	From, To *wardload.Date // inclusive; nil: unbounded
	// Review adds excluded observations and the review-state columns.
	Review bool
}

// ObservationHeader returns the header row of an observation export of
// ward: the import's columns, the ward's factors, and, with review, the
// review-state columns.
func ObservationHeader(ward *wardload.Ward, review bool) []string {
	h := append(slices.Clone(observationColumns), ward.FactorNames...)
	if review {
		h = append(h, reviewColumns...)
	}
	return h
}

// WriteObservations writes ward's observations selected by q to w as
// CSV (RFC 4180, CRLF line ends), oldest first (by date, then the order
// they were stored), and returns how many rows it wrote. Without q.Review
// only observations included in the model are written, which are the ones
// the review page summarises.
//
// Shifts are written by pattern name and tiers by code, as the import
// reads them; numbers keep every digit stored (shortest form that
// round-trips); a factor not recorded is an empty cell. The exclusion
// reason is free text, so it passes through TextCell like every text cell
// of the projection export; excluded_by is the user's sign-in name and
// excluded_at is RFC 3339 in the ward's time zone.
//
// Rows are read a page at a time. A page boundary is an offset, so rows
// stored while the export runs with an earlier date than the page being
// read can be skipped or repeated; export a closed period (--to before
// today) when that matters.
func WriteObservations(ctx context.Context, w io.Writer, st wardload.Store, ward *wardload.Ward, q ObservationQuery) (int, error) {
	loc, err := ward.Location()
	if err != nil {
		return 0, err
	}
	tiers, err := st.FindTiers(ctx, ward.ID)
	if err != nil {
		return 0, err
	}
	shifts, err := st.FindShiftPatterns(ctx, ward.ID)
	if err != nil {
		return 0, err
	}
	tierCode := make(map[int64]string, len(tiers))
	for _, t := range tiers {
		tierCode[t.ID] = t.Code
	}
	shiftName := make(map[int64]string, len(shifts))
	for _, s := range shifts {
		shiftName[s.ID] = s.Name
	}
	userName := map[int64]string{}
	nameOf := func(id int64) (string, error) {
		if id == 0 {
			return "", nil
		}
		if n, ok := userName[id]; ok {
			return n, nil
		}
		u, err := st.FindUserByID(ctx, id)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			userName[id] = strconv.FormatInt(id, 10)
			return userName[id], nil
		} else if err != nil {
			return "", err
		}
		userName[id] = u.Name
		return u.Name, nil
	}

	cw := csv.NewWriter(w)
	cw.UseCRLF = true
	header := ObservationHeader(ward, q.Review)
	if err := cw.Write(header); err != nil {
		return 0, err
	}
	f := wardload.ObservationFilter{WardID: &ward.ID, From: q.From, To: q.To, IncludeExcluded: q.Review, Limit: observationPage}
	record := make([]string, len(header))
	written := 0
	for {
		page, _, err := st.FindObservations(ctx, f)
		if err != nil {
			return written, err
		}
		for _, o := range page {
			record = record[:0]
			record = append(record,
				o.Date.String(),
				TextCell(shiftName[o.ShiftID]),
				tierCode[o.TierID],
				strconv.FormatFloat(o.WindowHours, 'f', -1, 64),
				strconv.FormatFloat(o.CareMinutes, 'f', -1, 64))
			for _, name := range ward.FactorNames {
				v, ok := o.Factors[name]
				cell := ""
				if ok {
					cell = strconv.FormatFloat(v, 'f', -1, 64)
				}
				record = append(record, cell)
			}
			if q.Review {
				by, err := nameOf(o.ExcludedBy)
				if err != nil {
					return written, err
				}
				at := ""
				if o.Excluded {
					at = FormatTime(o.ExcludedAt.In(loc))
				}
				record = append(record, strconv.FormatBool(o.Excluded), TextCell(o.ExcludedReason), by, at)
			}
			if err := cw.Write(record); err != nil {
				return written, err
			}
			written++
		}
		cw.Flush()
		if err := cw.Error(); err != nil {
			return written, err
		}
		if len(page) < observationPage {
			return written, nil
		}
		f.Offset += len(page)
	}
}
