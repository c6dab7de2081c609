package postgres

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"slices"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateObservations stores obs as one import batch, all or nothing.
func (s *Store) CreateObservations(ctx context.Context, obs []*wardload.Observation) (string, error) {
	if len(obs) == 0 {
		return "", wardload.Errorf(wardload.EINVALID, "There are no observations to import.")
	}
	for i, o := range obs {
		if err := o.Validate(); err != nil {
			return "", rowError(i, err)
		}
	}
	batch, err := newBatchID()
	if err != nil {
		return "", err
	}
	var stamp time.Time
	err = s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		stamp = now
		refs := wardRefs{}
		for i, o := range obs {
			if err := refs.check(ctx, tx, o); err != nil {
				return rowError(i, err)
			}
		}
		if err := insertObservations(ctx, tx, obs, batch, now); err != nil {
			return err
		}
		var wards []int64 // in order of first appearance
		for _, o := range obs {
			if !slices.Contains(wards, o.WardID) {
				wards = append(wards, o.WardID)
			}
		}
		// One audit row per import: the rows themselves carry no more than
		// the numbers, and an import of thousands would swamp the log.
		var wardID int64
		if len(wards) == 1 {
			wardID = wards[0]
		}
		summary := struct {
			BatchID string
			Rows    int
			WardIDs []int64
		}{batch, len(obs), wards}
		return audit(ctx, tx, now, "observation.import", "observation_batch", 0, wardID, nil, summary)
	})
	if err != nil {
		// The rollback took the IDs back; do not leave them on the caller's rows.
		for _, o := range obs {
			o.ID = 0
		}
		return "", err
	}
	for _, o := range obs {
		o.BatchID, o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = batch, false, "", 0, time.Time{}
		o.EnteredAt = stamp
	}
	return batch, nil
}

// insertObservations stores the rows and their factors in two pipelined
// batches rather than a round trip per row, since imports can be large.
func insertObservations(ctx context.Context, tx pgx.Tx, obs []*wardload.Observation, batch string, now time.Time) error {
	b := &pgx.Batch{}
	for _, o := range obs {
		b.Queue(`INSERT INTO observations (ward_id, tier_id, date, shift_id, window_hours, care_minutes, entered_by, entered_at, batch_id)
			VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
			o.WardID, o.TierID, dateArg(o.Date), o.ShiftID, o.WindowHours, o.CareMinutes, o.EnteredBy, now, batch,
		).QueryRow(func(r pgx.Row) error { return r.Scan(&o.ID) })
	}
	if err := tx.SendBatch(ctx, b).Close(); err != nil {
		return err
	}
	b = &pgx.Batch{}
	for _, o := range obs {
		for name, v := range o.Factors {
			b.Queue(`INSERT INTO observation_factors (observation_id, name, value) VALUES ($1, $2, $3)`, o.ID, name, v)
		}
	}
	if b.Len() == 0 {
		return nil
	}
	return tx.SendBatch(ctx, b).Close()
}

func newBatchID() (string, error) {
	b := make([]byte, 12)
	if _, err := rand.Read(b); err != nil {
		return "", err
	}
	return hex.EncodeToString(b), nil
}

// rowError prefixes a row's error message with its 1-based row number,
// keeping its field; a missing reference is the caller's input error.
func rowError(i int, err error) error {
	code := wardload.ErrorCode(err)
	if code == wardload.EINTERNAL {
		return err
	}
	if code == wardload.ENOTFOUND {
		code = wardload.EINVALID
	}
	return wardload.FieldErrorf(code, wardload.ErrorField(err), "Row %d: %s", i+1, wardload.ErrorMessage(err))
}

// wardRefs caches, per ward, its factor names, tiers and shifts, so an
// import checks its references with a few queries rather than a few per row.
type wardRefs map[int64]*wardRef

type wardRef struct {
	factors       map[string]bool
	tiers, shifts map[int64]bool
}

func (r wardRefs) check(ctx context.Context, tx pgx.Tx, o *wardload.Observation) error {
	ref, ok := r[o.WardID]
	if !ok {
		var err error
		if ref, err = loadWardRef(ctx, tx, o.WardID); err != nil {
			return err
		}
		r[o.WardID] = ref
	}
	if ref == nil {
		return wardload.FieldErrorf(wardload.EINVALID, "ward", "Ward %d does not exist.", o.WardID)
	}
	if !ref.tiers[o.TierID] {
		return wardload.FieldErrorf(wardload.EINVALID, "tier", "Tier %d is not a tier of this ward.", o.TierID)
	}
	if !ref.shifts[o.ShiftID] {
		return wardload.FieldErrorf(wardload.EINVALID, "shift", "Shift %d is not a shift of this ward.", o.ShiftID)
	}
	for name := range o.Factors {
		if !ref.factors[name] {
			return wardload.FieldErrorf(wardload.EINVALID, "factors", "Factor %q is not one this ward records.", name)
		}
	}
	return nil
}

// loadWardRef returns nil, nil for an unknown ward.
func loadWardRef(ctx context.Context, tx pgx.Tx, wardID int64) (*wardRef, error) {
	if err := wardExists(ctx, tx, wardID); err != nil {
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return nil, nil
		}
		return nil, err
	}
	ref := &wardRef{factors: map[string]bool{}}
	rows, err := tx.Query(ctx, `SELECT name FROM ward_factors WHERE ward_id = $1`, wardID)
	if err != nil {
		return nil, err
	}
	names, err := pgx.CollectRows(rows, pgx.RowTo[string])
	if err != nil {
		return nil, err
	}
	for _, n := range names {
		ref.factors[n] = true
	}
	if ref.tiers, err = idSet(ctx, tx, `SELECT id FROM tiers WHERE ward_id = $1`, wardID); err != nil {
		return nil, err
	}
	if ref.shifts, err = idSet(ctx, tx, `SELECT id FROM shift_patterns WHERE ward_id = $1`, wardID); err != nil {
		return nil, err
	}
	return ref, nil
}

// idSet runs a query of one BIGINT column and returns the values as a set.
func idSet(ctx context.Context, q querier, sql string, args ...any) (map[int64]bool, error) {
	rows, err := q.Query(ctx, sql, args...)
	if err != nil {
		return nil, err
	}
	ids, err := pgx.CollectRows(rows, pgx.RowTo[int64])
	if err != nil {
		return nil, err
	}
	set := make(map[int64]bool, len(ids))
	for _, id := range ids {
		set[id] = true
	}
	return set, nil
}
