package wardload

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"slices"
	"time"
)

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

// Import is one batch of observations on its way into a store, all or
// nothing. NewImport checks the rows before the store opens its
// transaction; inside it, CheckRefs checks what they refer to and Stored
// records the success; Result gives the store's answer. As an Audited
// value it is the batch's one audit row: the rows carry no more than the
// numbers, and an import of thousands would swamp the log.
type Import struct {
	obs   []*Observation
	batch ObservationBatch
}

// ObservationBatch is what the audit log keeps of one import.
type ObservationBatch struct {
	BatchID string
	Rows    int
	WardIDs []int64 // in order of first appearance
}

// NewImport returns the import of obs with a fresh batch ID, or EINVALID
// for an empty batch or the first row that fails Validate, its message
// starting with "Row N:".
func NewImport(obs []*Observation) (*Import, error) {
	if len(obs) == 0 {
		return nil, Errorf(EINVALID, "There are no observations to import.")
	}
	for i, o := range obs {
		if err := o.Validate(); err != nil {
			return nil, RowError(i, err)
		}
	}
	id, err := NewBatchID()
	if err != nil {
		return nil, err
	}
	return &Import{obs: obs, batch: ObservationBatch{BatchID: id, Rows: len(obs), WardIDs: []int64{}}}, nil
}

// BatchID is the identifier every row of the import is stored with.
func (im *Import) BatchID() string { return im.batch.BatchID }

// CheckRefs checks every row's references, loading each ward's WardRefs
// once with load (which returns ENOTFOUND for an unknown ward). It returns
// EINVALID naming the field, an unknown ward too, with a message starting
// with "Row N:".
func (im *Import) CheckRefs(load func(wardID int64) (*WardRefs, error)) error {
	refs := map[int64]*WardRefs{}
	im.batch.WardIDs = im.batch.WardIDs[:0]
	for i, o := range im.obs {
		r, ok := refs[o.WardID]
		if !ok {
			var err error
			if r, err = load(o.WardID); ErrorCode(err) == ENOTFOUND {
				return RowError(i, FieldErrorf(EINVALID, "ward", "Unknown ward."))
			} else if err != nil {
				return err
			}
			refs[o.WardID] = r
			im.batch.WardIDs = append(im.batch.WardIDs, o.WardID)
		}
		if err := o.CheckRefs(r); err != nil {
			return RowError(i, err)
		}
	}
	return nil
}

// Stored records on each row that it was stored at at, in the batch and
// not excluded. The store sets the IDs.
func (im *Import) Stored(at time.Time) {
	for _, o := range im.obs {
		o.BatchID, o.EnteredAt = im.batch.BatchID, at
		o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = false, "", 0, time.Time{}
	}
}

// Result returns the store's answer for the transaction's error err: the
// batch ID, or err. On error nothing was stored, so no ID, batch or time
// set on a row may remain.
func (im *Import) Result(err error) (string, error) {
	if err == nil {
		return im.batch.BatchID, nil
	}
	for _, o := range im.obs {
		o.ID, o.BatchID, o.EnteredAt = 0, "", time.Time{}
	}
	return "", err
}

// auditRecord names every ward of the batch, one audit row each, so that
// each ward's managers see it and each ward's data version moves
// (WardVersion).
func (im *Import) auditRecord() auditRecord {
	return auditRecord{"observation_batch", 0, im.batch.WardIDs, &im.batch}
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
