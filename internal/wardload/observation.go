package wardload

import (
	"context"
	"math"
	"strings"
	"time"
)

// Observation is one timed measurement of the direct care one patient in a
// tier received during an observation window. It carries no patient
// identifier: only the tier, the time and optional numeric factors.
type Observation struct {
	ID          int64
	WardID      int64
	TierID      int64
	Date        Date
	ShiftID     int64
	WindowHours float64            // observed window, > 0 and ≤ 24
	CareMinutes float64            // direct care minutes in the window, ≥ 0
	Factors     map[string]float64 // ward-named numeric factors; keys are codes

	EnteredBy int64 // user ID
	EnteredAt time.Time
	BatchID   string // import batch; set by CreateObservations

	Excluded       bool
	ExcludedReason string
	ExcludedBy     int64 // user ID; 0 when included
	ExcludedAt     time.Time
}

// Validate checks the observation's own fields (not that the ward, tier and
// shift exist, which the store checks). Field names match CSV columns.
func (o *Observation) Validate() error {
	if o.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if o.TierID == 0 {
		return FieldErrorf(EINVALID, "tier", "Tier is required.")
	}
	if o.ShiftID == 0 {
		return FieldErrorf(EINVALID, "shift", "Shift is required.")
	}
	if o.Date.IsZero() {
		return FieldErrorf(EINVALID, "date", "Date is required.")
	}
	if math.IsNaN(o.WindowHours) || !(o.WindowHours > 0 && o.WindowHours <= 24) {
		return FieldErrorf(EINVALID, "window_hours", "Observation window must be more than 0 and at most 24 hours.")
	}
	if math.IsNaN(o.CareMinutes) || math.IsInf(o.CareMinutes, 0) || o.CareMinutes < 0 {
		return FieldErrorf(EINVALID, "care_minutes", "Care minutes must be a number of at least 0.")
	}
	for k, v := range o.Factors {
		if !ValidCode(k) {
			return FieldErrorf(EINVALID, "factors", "Factor name %q must be a lowercase code.", k)
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return FieldErrorf(EINVALID, k, "Factor %s must be a finite number.", k)
		}
	}
	return nil
}

// ObservationFilter selects observations. Zero fields do not filter.
type ObservationFilter struct {
	WardID          *int64
	TierID          *int64
	ShiftID         *int64
	From, To        *Date // inclusive
	BatchID         *string
	IncludeExcluded bool // false: only included observations
	// Lean leaves Factors, EnteredBy, EnteredAt and BatchID unset: for
	// readers of many rows that need only the values and the review state
	// (the review page, the ward backtest), which would otherwise pay for
	// a second query per few hundred rows and columns they never read.
	Lean   bool
	Offset int
	Limit  int
}

// ObservationService stores care observations and their review state.
type ObservationService interface {
	// CreateObservations stores all observations as one import batch, all
	// or nothing: if any row is invalid or refers to an unknown ward, tier
	// or shift (or a tier or shift of another ward, or a factor the ward
	// does not name), nothing is stored and the error names the field; the
	// message starts with "Row N:" (1-based in obs). On success each
	// observation gets its ID, EnteredAt and the shared BatchID, which is
	// also returned.
	CreateObservations(ctx context.Context, obs []*Observation) (batchID string, err error)
	// FindObservationByID returns ENOTFOUND if there is no such observation.
	FindObservationByID(ctx context.Context, id int64) (*Observation, error)
	// FindObservations returns matches ordered by Date, then ID, and the
	// total count ignoring Offset and Limit.
	FindObservations(ctx context.Context, f ObservationFilter) ([]*Observation, int, error)
	// ExcludeObservation marks an observation as excluded from the model
	// with a reason; it never deletes. Returns ENOTFOUND, EINVALID (empty
	// reason) or ECONFLICT if it is already excluded.
	ExcludeObservation(ctx context.Context, id int64, reason string, by int64) (*Observation, error)
	// RestoreObservation includes an excluded observation again. Returns
	// ENOTFOUND or ECONFLICT if it is not excluded.
	RestoreObservation(ctx context.Context, id int64, by int64) (*Observation, error)
}

// ValidExclusionReason checks an exclusion reason: short, one line. The
// reason explains a data problem ("extra zero typed"), so it is capped to
// keep it from becoming a place for clinical notes about a patient.
func ValidExclusionReason(s string) error {
	s = strings.TrimSpace(s)
	if s == "" {
		return FieldErrorf(EINVALID, "reason", "A reason is required to exclude an observation.")
	}
	if len(s) > 120 || strings.ContainsAny(s, "\r\n") {
		return FieldErrorf(EINVALID, "reason", "The reason must be one line of at most 120 characters.")
	}
	return nil
}

// ReviewChange changes an observation's review state: an exclusion or a
// restoration. Make one with Exclusion or Restoration.
type ReviewChange struct {
	// Action is the change's audit action.
	Action string
	err    error
	apply  func(o *Observation, at time.Time) error
}

// Err returns the change's own error, such as an exclusion reason
// ValidExclusionReason refuses. Stores check it before reading the
// observation, so a bad reason is EINVALID whatever the ID.
func (c ReviewChange) Err() error { return c.err }

// Apply returns a copy of o with the change made at at, or ECONFLICT if o
// is already in the state the change leads to. o is not changed.
func (c ReviewChange) Apply(o *Observation, at time.Time) (*Observation, error) {
	if c.err != nil {
		return nil, c.err
	}
	out := *o
	if err := c.apply(&out, at); err != nil {
		return nil, err
	}
	return &out, nil
}

// Exclusion returns the change that excludes an observation from the
// model, by user by, with reason trimmed. A reason ValidExclusionReason
// refuses is the change's Err.
func Exclusion(reason string, by int64) ReviewChange {
	if err := ValidExclusionReason(reason); err != nil {
		return ReviewChange{err: err}
	}
	reason = strings.TrimSpace(reason)
	return ReviewChange{Action: ActionObservationExclude, apply: func(o *Observation, at time.Time) error {
		if o.Excluded {
			return Errorf(ECONFLICT, "This observation is already excluded.")
		}
		o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = true, reason, by, at
		return nil
	}}
}

// Restoration returns the change that includes an excluded observation
// again. Who restored it and when is kept in the audit log; the
// observation keeps no trace of a past exclusion.
func Restoration() ReviewChange {
	return ReviewChange{Action: ActionObservationRestore, apply: func(o *Observation, _ time.Time) error {
		if !o.Excluded {
			return Errorf(ECONFLICT, "This observation is not excluded.")
		}
		o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = false, "", 0, time.Time{}
		return nil
	}}
}
