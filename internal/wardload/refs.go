package wardload

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"slices"
	"time"
)

// WardRefs is what the rows of one ward may refer to: its tiers, its shift
// patterns and the factor names it records. A store loads it inside the
// transaction of a change (returning WardNotFound for an unknown ward), and
// the checks below decide, once for every store, which references are
// refused and with which words.
type WardRefs struct {
	WardID  int64
	Tiers   []int64 // by DisplayOrder, then Code
	Shifts  []int64
	Factors []string
}

// WardNotFound is the error for a change naming a ward that does not
// exist: ENOTFOUND naming the field "ward".
func WardNotFound() error {
	return FieldErrorf(ENOTFOUND, "ward", "Ward not found.")
}

// CheckRefs returns EINVALID naming the field if o refers to a tier, shift
// or factor that r does not have. Observations are import rows, input to
// correct, so an unknown reference is EINVALID rather than ENOTFOUND.
func (o *Observation) CheckRefs(r *WardRefs) error {
	if !slices.Contains(r.Tiers, o.TierID) {
		return FieldErrorf(EINVALID, "tier", "Unknown tier for this ward.")
	}
	if !slices.Contains(r.Shifts, o.ShiftID) {
		return FieldErrorf(EINVALID, "shift", "Unknown shift for this ward.")
	}
	for k := range o.Factors {
		if !slices.Contains(r.Factors, k) {
			return FieldErrorf(EINVALID, "factors", "The ward does not record a factor named %q.", k)
		}
	}
	return nil
}

// CheckImport checks a batch of observations before a store opens its
// transaction: EINVALID for an empty batch or the first row that fails
// Validate, its message starting with "Row N:".
func CheckImport(obs []*Observation) error {
	if len(obs) == 0 {
		return Errorf(EINVALID, "There are no observations to import.")
	}
	for i, o := range obs {
		if err := o.Validate(); err != nil {
			return RowError(i, err)
		}
	}
	return nil
}

// CheckImportRefs checks every row's references inside the store's
// transaction, loading each ward's WardRefs once with load. It returns the
// batch's audit record, with the wards in order of first appearance, or
// EINVALID (an unknown ward too) whose message starts with "Row N:".
func CheckImportRefs(obs []*Observation, batchID string, load func(wardID int64) (*WardRefs, error)) (*ObservationBatch, error) {
	refs := map[int64]*WardRefs{}
	b := &ObservationBatch{BatchID: batchID, Rows: len(obs), WardIDs: []int64{}}
	for i, o := range obs {
		r, ok := refs[o.WardID]
		if !ok {
			var err error
			if r, err = load(o.WardID); ErrorCode(err) == ENOTFOUND {
				return nil, RowError(i, FieldErrorf(EINVALID, "ward", "Unknown ward."))
			} else if err != nil {
				return nil, err
			}
			refs[o.WardID] = r
			b.WardIDs = append(b.WardIDs, o.WardID)
		}
		if err := o.CheckRefs(r); err != nil {
			return nil, RowError(i, err)
		}
	}
	return b, nil
}

// Imported records on each observation that it was stored in batch at at:
// not excluded. The store sets the IDs.
func Imported(obs []*Observation, batchID string, at time.Time) {
	for _, o := range obs {
		o.BatchID, o.EnteredAt = batchID, at
		o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = false, "", 0, time.Time{}
	}
}

// NotImported undoes on each observation what a failed import set: nothing
// was stored, so no ID, batch or time may remain.
func NotImported(obs []*Observation) {
	for _, o := range obs {
		o.ID, o.BatchID, o.EnteredAt = 0, "", time.Time{}
	}
}

// RowError prefixes the message of a domain error with its 1-based row
// number, keeping code and field. Other errors pass through.
func RowError(i int, err error) error {
	var e *Error
	if !errors.As(err, &e) {
		return err
	}
	return &Error{Code: e.Code, Field: e.Field, Message: fmt.Sprintf("Row %d: %s", i+1, e.Message)}
}

// NewBatchID returns a random identifier for an import batch, 16 hex
// digits. It is an identifier, not a sample, so it needs no seed.
func NewBatchID() (string, error) {
	b := make([]byte, 8)
	if _, err := rand.Read(b); err != nil {
		return "", fmt.Errorf("batch id: %w", err)
	}
	return hex.EncodeToString(b), nil
}

// CountsFor returns the counts a store keeps of c: one per tier of r, in
// r's order, a tier that c leaves out counted as 0. It returns ENOTFOUND
// naming "shift" or "tier" if c names a shift or tier not of this ward.
func (c *Census) CountsFor(r *WardRefs) ([]TierCount, error) {
	if !slices.Contains(r.Shifts, c.ShiftID) {
		return nil, FieldErrorf(ENOTFOUND, "shift", "Shift not found for this ward.")
	}
	given := map[int64]int{}
	for _, tc := range c.Counts {
		if !slices.Contains(r.Tiers, tc.TierID) {
			return nil, FieldErrorf(ENOTFOUND, "tier", "Tier not found for this ward.")
		}
		given[tc.TierID] = tc.Patients
	}
	counts := make([]TierCount, len(r.Tiers))
	for i, id := range r.Tiers {
		counts[i] = TierCount{TierID: id, Patients: given[id]}
	}
	return counts, nil
}

// CheckRefs returns ENOTFOUND naming "floors" if a ratio floor names a
// shift or tier that is not of this ward.
func (s *Settings) CheckRefs(r *WardRefs) error {
	for _, f := range s.Floors {
		if !slices.Contains(r.Shifts, f.ShiftID) {
			return FieldErrorf(ENOTFOUND, "floors", "A ratio floor names a shift that is not one of this ward's.")
		}
		if f.TierID != 0 && !slices.Contains(r.Tiers, f.TierID) {
			return FieldErrorf(ENOTFOUND, "floors", "A ratio floor names a tier that is not one of this ward's.")
		}
	}
	return nil
}
