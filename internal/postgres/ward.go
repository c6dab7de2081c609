package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateWard stores a new ward and sets its ID and CreatedAt.
func (s *Store) CreateWard(ctx context.Context, w *wardload.Ward) error {
	if err := w.Validate(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := tx.QueryRow(ctx, `INSERT INTO wards (code, name, time_zone, created_at)
			VALUES ($1, $2, $3, $4) RETURNING id`, w.Code, w.Name, w.TimeZone, now).Scan(&w.ID); err != nil {
			return err
		}
		if err := setWardFactors(ctx, tx, w.ID, w.FactorNames); err != nil {
			return err
		}
		w.CreatedAt = now
		return audit(ctx, tx, now, wardload.ActionWardCreate, nil, w)
	})
}

func setWardFactors(ctx context.Context, tx pgx.Tx, wardID int64, names []string) error {
	if _, err := tx.Exec(ctx, `DELETE FROM ward_factors WHERE ward_id = $1`, wardID); err != nil {
		return err
	}
	for i, n := range names {
		if _, err := tx.Exec(ctx, `INSERT INTO ward_factors (ward_id, name, position) VALUES ($1, $2, $3)`, wardID, n, i); err != nil {
			return err
		}
	}
	return nil
}

// FindWardByID returns ENOTFOUND if there is no such ward.
func (s *Store) FindWardByID(ctx context.Context, id int64) (*wardload.Ward, error) {
	ws, err := findWards(ctx, s.pool, wardload.WardFilter{ID: &id}, "")
	return one(ws, err, "Ward")
}

// FindWardByCode returns ENOTFOUND if there is no such ward.
func (s *Store) FindWardByCode(ctx context.Context, code string) (*wardload.Ward, error) {
	ws, err := findWards(ctx, s.pool, wardload.WardFilter{Code: &code}, "")
	return one(ws, err, "Ward")
}

// FindWards returns matching wards ordered by code and the total count.
func (s *Store) FindWards(ctx context.Context, f wardload.WardFilter) ([]*wardload.Ward, int, error) {
	w := wardWhere(f)
	var n int
	if err := s.pool.QueryRow(ctx, `SELECT count(*) FROM wards`+w.String(), w.args...).Scan(&n); err != nil {
		return nil, 0, formatError(err)
	}
	ws, err := findWards(ctx, s.pool, f, page(f.Offset, f.Limit))
	if err != nil {
		return nil, 0, err
	}
	return ws, n, nil
}

func wardWhere(f wardload.WardFilter) *where {
	var w where
	if f.ID != nil {
		w.add("id = ?", *f.ID)
	}
	if f.Code != nil {
		w.add("code = ?", *f.Code)
	}
	if f.UserID != nil {
		w.add("id IN (SELECT ward_id FROM user_wards WHERE user_id = ?)", *f.UserID)
	}
	if f.ActiveOnly {
		w.add("(retired_at IS NULL) = ?", true)
	}
	return &w
}

// findWards returns wards by code with their factor names; suffix is a
// paging or locking clause.
func findWards(ctx context.Context, q querier, f wardload.WardFilter, suffix string) ([]*wardload.Ward, error) {
	w := wardWhere(f)
	// The factor names come in the same query: every ward page looks its
	// ward up, so one round trip instead of two.
	rows, err := q.Query(ctx, `SELECT id, code, name, time_zone, created_at, retired_at,
		ARRAY(SELECT name FROM ward_factors WHERE ward_id = wards.id ORDER BY position)
		FROM wards`+w.String()+` ORDER BY code`+suffix, w.args...)
	if err != nil {
		return nil, formatError(err)
	}
	ws, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.Ward, error) {
		var w wardload.Ward
		var retired *time.Time
		err := r.Scan(&w.ID, &w.Code, &w.Name, &w.TimeZone, &w.CreatedAt, &retired, &w.FactorNames)
		w.CreatedAt, w.RetiredAt = w.CreatedAt.UTC(), timeOf(retired)
		if len(w.FactorNames) == 0 {
			w.FactorNames = nil // no factors is nil, as it always was here
		}
		return &w, err
	})
	return ws, formatError(err)
}

// UpdateWard applies upd and returns the new ward.
func (s *Store) UpdateWard(ctx context.Context, id int64, upd wardload.WardUpdate) (*wardload.Ward, error) {
	var out *wardload.Ward
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		ws, err := findWards(ctx, tx, wardload.WardFilter{ID: &id}, " FOR UPDATE")
		before, err := one(ws, err, "Ward")
		if err != nil {
			return err
		}
		w, err := upd.Apply(before, now)
		if err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `UPDATE wards SET name = $1, time_zone = $2, retired_at = $3 WHERE id = $4`,
			w.Name, w.TimeZone, timeArg(w.RetiredAt), id); err != nil {
			return err
		}
		if upd.FactorNames != nil {
			if err := setWardFactors(ctx, tx, id, w.FactorNames); err != nil {
				return err
			}
		}
		out = w
		return audit(ctx, tx, now, wardload.RetireAction("ward", before.RetiredAt, w.RetiredAt), before, w)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

// loadWardRefs returns what the rows of ward id may refer to, in one
// query, or wardload.WardNotFound; lock is a locking clause for the ward
// row, or "".
func loadWardRefs(ctx context.Context, q querier, id int64, lock string) (*wardload.WardRefs, error) {
	r := &wardload.WardRefs{WardID: id}
	err := q.QueryRow(ctx, `SELECT
		ARRAY(SELECT id FROM tiers WHERE ward_id = w.id ORDER BY display_order, code),
		ARRAY(SELECT id FROM shift_patterns WHERE ward_id = w.id ORDER BY start_minute, name),
		ARRAY(SELECT name FROM ward_factors WHERE ward_id = w.id ORDER BY position),
		w.retired_at IS NOT NULL,
		ARRAY(SELECT id FROM tiers WHERE ward_id = w.id AND retired_at IS NOT NULL ORDER BY id),
		ARRAY(SELECT id FROM shift_patterns WHERE ward_id = w.id AND retired_at IS NOT NULL ORDER BY id)
		FROM wards w WHERE w.id = $1`+lock, id).Scan(&r.Tiers, &r.Shifts, &r.Factors, &r.Retired, &r.RetiredTiers, &r.RetiredShifts)
	if err == pgx.ErrNoRows {
		return nil, wardload.WardNotFound()
	}
	return r, err
}
