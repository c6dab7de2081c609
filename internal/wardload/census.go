package wardload

import (
	"context"
	"time"
)

// MaxCensusCount is the largest patient count of one tier in one census:
// a plausibility bound that catches a typo, far above any ward's beds
// (common practice, no source).
const MaxCensusCount = 10000

// TierCount is the number of patients in one tier.
type TierCount struct {
	TierID   int64
	Patients int // ≥ 0
}

// Census is the count of patients per tier entered at the start of one
// dated shift. A correction is a new Census with the next Revision; earlier
// revisions are kept.
type Census struct {
	ID       int64
	WardID   int64
	Date     Date
	ShiftID  int64
	Revision int // 1 for the first entry, set by the store
	Counts   []TierCount
	// Staff is the staff on duty the charge nurse entered with this
	// revision; optional, nil counts when not entered.
	Staff StaffOnDuty
	// Planned is the movement the charge nurse expects during the shift;
	// optional, nil counts when not entered.
	Planned   PlannedMovement
	EnteredBy int64
	EnteredAt time.Time
}

// Total returns the number of patients over all tiers.
func (c *Census) Total() int {
	n := 0
	for _, tc := range c.Counts {
		n += tc.Patients
	}
	return n
}

// Validate checks the census's own fields.
func (c *Census) Validate() error {
	if c.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if c.ShiftID == 0 {
		return FieldErrorf(EINVALID, "shift", "Shift is required.")
	}
	if c.Date.IsZero() {
		return FieldErrorf(EINVALID, "date", "Date is required.")
	}
	seen := map[int64]bool{}
	for _, tc := range c.Counts {
		if tc.TierID == 0 {
			return FieldErrorf(EINVALID, "tier", "Tier is required for each count.")
		}
		if seen[tc.TierID] {
			return FieldErrorf(EINVALID, "tier", "A tier is counted twice.")
		}
		seen[tc.TierID] = true
		if tc.Patients < 0 {
			return FieldErrorf(EINVALID, "patients", "Patient counts must be whole numbers of at least 0.")
		}
		if tc.Patients > MaxCensusCount {
			return FieldErrorf(EINVALID, "patients", "A patient count of %d is not plausible for one ward.", tc.Patients)
		}
	}
	if err := c.Staff.Check(0); err != nil {
		return err
	}
	return c.Planned.Check(0, c.Total())
}

// CensusFilter selects census entries. Zero fields do not filter.
type CensusFilter struct {
	WardID     *int64
	ShiftID    *int64
	From, To   *Date // inclusive
	LatestOnly bool  // only the newest revision of each ward × date × shift
	Offset     int
	Limit      int
}

// CensusService stores census entries and their revisions.
type CensusService interface {
	// CreateCensus stores c as the next revision for its ward, date and
	// shift and sets ID, Revision and EnteredAt. Tiers must belong to the
	// ward; a tier of the ward missing from Counts is stored as 0. Returns
	// EINVALID naming the field, or ENOTFOUND for an unknown ward, shift or
	// tier; nothing is stored on error.
	CreateCensus(ctx context.Context, c *Census) error
	// FindCensusByID returns ENOTFOUND if there is no such entry.
	FindCensusByID(ctx context.Context, id int64) (*Census, error)
	// FindCensus returns matches ordered by Date descending, shift start,
	// then Revision descending, and the total ignoring Offset and Limit.
	// Counts are ordered by tier DisplayOrder.
	FindCensus(ctx context.Context, f CensusFilter) ([]*Census, int, error)
}
