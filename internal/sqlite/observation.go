package sqlite

import (
	"context"
	"crypto/rand"
	"database/sql"
	"encoding/hex"
	"errors"
	"fmt"
	"strings"
	"time"

	"wardload/internal/wardload"
)

// CreateObservations stores obs as one batch, all or nothing. Unknown
// wards, tiers and shifts are EINVALID naming the column, because an
// import row is input to correct, not a missing page.
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
	err = s.write(ctx, func(tx *Tx) error {
		factors := map[int64]map[string]bool{} // ward → named factors; nil when the ward is unknown
		wards := []int64{}
		for i, o := range obs {
			named, seen := factors[o.WardID]
			if !seen {
				w, err := findWard(ctx, tx, o.WardID)
				if wardload.ErrorCode(err) == wardload.ENOTFOUND {
					return rowError(i, wardload.FieldErrorf(wardload.EINVALID, "ward", "Unknown ward."))
				} else if err != nil {
					return err
				}
				named = map[string]bool{}
				for _, n := range w.FactorNames {
					named[n] = true
				}
				factors[o.WardID] = named
				wards = append(wards, o.WardID)
			}
			if ok, err := tierOfWard(ctx, tx, o.WardID, o.TierID); err != nil {
				return err
			} else if !ok {
				return rowError(i, wardload.FieldErrorf(wardload.EINVALID, "tier", "Unknown tier for this ward."))
			}
			if ok, err := shiftOfWard(ctx, tx, o.WardID, o.ShiftID); err != nil {
				return err
			} else if !ok {
				return rowError(i, wardload.FieldErrorf(wardload.EINVALID, "shift", "Unknown shift for this ward."))
			}
			for k := range o.Factors {
				if !named[k] {
					return rowError(i, wardload.FieldErrorf(wardload.EINVALID, "factors", "The ward does not record a factor named %q.", k))
				}
			}
			if err := insertObservation(ctx, tx, o, batch); err != nil {
				return err
			}
		}
		var wardID int64
		if len(wards) == 1 {
			wardID = wards[0]
		}
		after := struct {
			BatchID string
			Rows    int
			WardIDs []int64
		}{batch, len(obs), wards}
		return tx.audit("observation.import", "observation_batch", 0, wardID, nil, after)
	})
	if err != nil {
		// Nothing was stored, so nothing the rolled-back inserts set may remain.
		for _, o := range obs {
			o.ID, o.BatchID, o.EnteredAt = 0, "", time.Time{}
		}
		return "", err
	}
	return batch, nil
}

func insertObservation(ctx context.Context, tx *Tx, o *wardload.Observation, batch string) error {
	res, err := tx.ExecContext(ctx, `INSERT INTO observations
		(ward_id, tier_id, date, shift_id, window_hours, care_minutes, entered_by, entered_at, batch_id)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		o.WardID, o.TierID, o.Date.String(), o.ShiftID, o.WindowHours, o.CareMinutes, o.EnteredBy, formatTime(tx.now), batch)
	if err != nil {
		return err
	}
	id, err := res.LastInsertId()
	if err != nil {
		return err
	}
	for k, v := range o.Factors {
		if _, err := tx.ExecContext(ctx, `INSERT INTO observation_factors (observation_id, name, value) VALUES (?, ?, ?)`, id, k, v); err != nil {
			return err
		}
	}
	o.ID, o.EnteredAt, o.BatchID = id, tx.now, batch
	o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = false, "", 0, time.Time{}
	return nil
}

// rowError prefixes a domain error's message with its 1-based row number,
// keeping code and field.
func rowError(i int, err error) error {
	var e *wardload.Error
	if !errors.As(err, &e) {
		return err
	}
	return &wardload.Error{Code: e.Code, Field: e.Field, Message: fmt.Sprintf("Row %d: %s", i+1, e.Message)}
}

// newBatchID returns a random identifier for an import batch. It is an
// identifier, not a sample, so it needs no seed.
func newBatchID() (string, error) {
	b := make([]byte, 8)
	if _, err := rand.Read(b); err != nil {
		return "", fmt.Errorf("batch id: %w", err)
	}
	return hex.EncodeToString(b), nil
}

// FindObservationByID returns ENOTFOUND if there is no such observation.
func (s *Store) FindObservationByID(ctx context.Context, id int64) (*wardload.Observation, error) {
	return findObservation(ctx, s.reader(ctx), id)
}

// FindObservations returns matches by date, then ID, and the total.
func (s *Store) FindObservations(ctx context.Context, f wardload.ObservationFilter) ([]*wardload.Observation, int, error) {
	return findObservations(ctx, s.reader(ctx), f, 0)
}

// ExcludeObservation marks an observation as excluded; it never deletes.
func (s *Store) ExcludeObservation(ctx context.Context, id int64, reason string, by int64) (*wardload.Observation, error) {
	if err := wardload.ValidExclusionReason(reason); err != nil {
		return nil, err
	}
	reason = strings.TrimSpace(reason)
	return s.setExcluded(ctx, id, "observation.exclude", func(tx *Tx, o *wardload.Observation) error {
		if o.Excluded {
			return wardload.Errorf(wardload.ECONFLICT, "This observation is already excluded.")
		}
		o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = true, reason, by, tx.now
		return nil
	})
}

// RestoreObservation includes an excluded observation again. Who restored
// it and when is kept in the audit log.
func (s *Store) RestoreObservation(ctx context.Context, id int64, by int64) (*wardload.Observation, error) {
	return s.setExcluded(ctx, id, "observation.restore", func(tx *Tx, o *wardload.Observation) error {
		if !o.Excluded {
			return wardload.Errorf(wardload.ECONFLICT, "This observation is not excluded.")
		}
		o.Excluded, o.ExcludedReason, o.ExcludedBy, o.ExcludedAt = false, "", 0, time.Time{}
		return nil
	})
}

func (s *Store) setExcluded(ctx context.Context, id int64, action string, change func(tx *Tx, o *wardload.Observation) error) (*wardload.Observation, error) {
	var out *wardload.Observation
	err := s.write(ctx, func(tx *Tx) error {
		before, err := findObservation(ctx, tx, id)
		if err != nil {
			return err
		}
		o := *before
		if err := change(tx, &o); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE observations SET excluded = ?, excluded_reason = ?, excluded_by = ?, excluded_at = ? WHERE id = ?`,
			boolInt(o.Excluded), o.ExcludedReason, o.ExcludedBy, nullTime(o.ExcludedAt), id); err != nil {
			return err
		}
		out = &o
		return tx.audit(action, "observation", id, o.WardID, before, &o)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

func findObservation(ctx context.Context, q querier, id int64) (*wardload.Observation, error) {
	os, _, err := findObservations(ctx, q, wardload.ObservationFilter{IncludeExcluded: true}, id)
	if err != nil {
		return nil, err
	}
	if len(os) == 0 {
		return nil, wardload.Errorf(wardload.ENOTFOUND, "Observation not found.")
	}
	return os[0], nil
}

// findObservations serves both lookups; id, when not 0, selects one row.
func findObservations(ctx context.Context, q querier, f wardload.ObservationFilter, id int64) ([]*wardload.Observation, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if id != 0 {
		add("id = ?", id)
	}
	if f.WardID != nil {
		add("ward_id = ?", *f.WardID)
	}
	if f.TierID != nil {
		add("tier_id = ?", *f.TierID)
	}
	if f.ShiftID != nil {
		add("shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		add("date >= ?", f.From.String())
	}
	if f.To != nil {
		add("date <= ?", f.To.String())
	}
	if f.BatchID != nil {
		add("batch_id = ?", *f.BatchID)
	}
	if !f.IncludeExcluded {
		where = append(where, "excluded = 0")
	}
	cond := strings.Join(where, " AND ")
	// Without a page the total is the number of rows: spare the count
	// query (exclude and restore look one up by ID).
	total := -1
	if f.Offset > 0 || f.Limit > 0 {
		if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM observations WHERE `+cond, args...).Scan(&total); err != nil {
			return nil, 0, err
		}
	}
	rows, err := q.QueryContext(ctx, page(`SELECT id, ward_id, tier_id, date, shift_id, window_hours, care_minutes,
		entered_by, entered_at, batch_id, excluded, excluded_reason, excluded_by, excluded_at
		FROM observations WHERE `+cond+` ORDER BY date, id`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var os []*wardload.Observation
	byID := map[int64]*wardload.Observation{}
	for rows.Next() {
		var o wardload.Observation
		var d, entered string
		var excludedAt sql.NullString
		if err := rows.Scan(&o.ID, &o.WardID, &o.TierID, &d, &o.ShiftID, &o.WindowHours, &o.CareMinutes,
			&o.EnteredBy, &entered, &o.BatchID, &o.Excluded, &o.ExcludedReason, &o.ExcludedBy, &excludedAt); err != nil {
			return nil, 0, err
		}
		if o.Date, err = parseDate(d); err != nil {
			return nil, 0, err
		}
		if o.EnteredAt, err = parseTime(entered); err != nil {
			return nil, 0, err
		}
		if o.ExcludedAt, err = parseNullTime(excludedAt); err != nil {
			return nil, 0, err
		}
		os = append(os, &o)
		byID[o.ID] = &o
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	rows.Close()
	if err := loadFactors(ctx, q, os, byID); err != nil {
		return nil, 0, err
	}
	if total < 0 {
		total = len(os)
	}
	return os, total, nil
}

// loadFactors fills Factors for os, a few hundred IDs per query to stay
// below SQLite's limit on bound parameters.
func loadFactors(ctx context.Context, q querier, os []*wardload.Observation, byID map[int64]*wardload.Observation) error {
	const chunk = 500
	for start := 0; start < len(os); start += chunk {
		part := os[start:min(start+chunk, len(os))]
		args := make([]any, len(part))
		for i, o := range part {
			args[i] = o.ID
		}
		marks := strings.TrimSuffix(strings.Repeat("?,", len(part)), ",")
		rows, err := q.QueryContext(ctx, `SELECT observation_id, name, value FROM observation_factors WHERE observation_id IN (`+marks+`)`, args...)
		if err != nil {
			return err
		}
		for rows.Next() {
			var id int64
			var name string
			var v float64
			if err := rows.Scan(&id, &name, &v); err != nil {
				rows.Close()
				return err
			}
			o := byID[id]
			if o.Factors == nil {
				o.Factors = map[string]float64{}
			}
			o.Factors[name] = v
		}
		err = rows.Err()
		rows.Close()
		if err != nil {
			return err
		}
	}
	return nil
}
