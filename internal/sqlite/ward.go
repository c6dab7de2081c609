package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"strings"

	"wardload/internal/wardload"
)

// CreateWard stores a new ward and its factor names.
func (s *Store) CreateWard(ctx context.Context, w *wardload.Ward) error {
	if err := w.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		res, err := tx.ExecContext(ctx, `INSERT INTO wards (code, name, time_zone, created_at) VALUES (?, ?, ?, ?)`,
			w.Code, w.Name, w.TimeZone, formatTime(tx.now))
		if err != nil {
			return err
		}
		id, err := res.LastInsertId()
		if err != nil {
			return err
		}
		if err := replaceFactors(ctx, tx, id, w.FactorNames); err != nil {
			return err
		}
		w.ID, w.CreatedAt = id, tx.now
		return tx.audit(wardload.ActionWardCreate, nil, w)
	})
}

func replaceFactors(ctx context.Context, tx *Tx, wardID int64, names []string) error {
	if _, err := tx.ExecContext(ctx, `DELETE FROM ward_factors WHERE ward_id = ?`, wardID); err != nil {
		return err
	}
	for i, n := range names {
		if _, err := tx.ExecContext(ctx, `INSERT INTO ward_factors (ward_id, name, position) VALUES (?, ?, ?)`, wardID, n, i); err != nil {
			return err
		}
	}
	return nil
}

// FindWardByID returns ENOTFOUND if there is no such ward.
func (s *Store) FindWardByID(ctx context.Context, id int64) (*wardload.Ward, error) {
	return findWard(ctx, s.reader(ctx), id)
}

// FindWardByCode returns ENOTFOUND if there is no such ward.
func (s *Store) FindWardByCode(ctx context.Context, code string) (*wardload.Ward, error) {
	ws, _, err := findWards(ctx, s.reader(ctx), wardload.WardFilter{Code: &code})
	if err != nil {
		return nil, err
	}
	if len(ws) == 0 {
		return nil, wardload.NotFound("Ward")
	}
	return ws[0], nil
}

// FindWards returns matching wards ordered by code and the total count.
func (s *Store) FindWards(ctx context.Context, f wardload.WardFilter) ([]*wardload.Ward, int, error) {
	return findWards(ctx, s.reader(ctx), f)
}

// UpdateWard applies upd in one transaction.
func (s *Store) UpdateWard(ctx context.Context, id int64, upd wardload.WardUpdate) (*wardload.Ward, error) {
	var out *wardload.Ward
	err := s.write(ctx, func(tx *Tx) error {
		before, err := findWard(ctx, tx, id)
		if err != nil {
			return err
		}
		w, err := upd.Apply(before, tx.now)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE wards SET name = ?, time_zone = ?, retired_at = ? WHERE id = ?`,
			w.Name, w.TimeZone, nullTime(w.RetiredAt), id); err != nil {
			return err
		}
		if upd.FactorNames != nil {
			if err := replaceFactors(ctx, tx, id, w.FactorNames); err != nil {
				return err
			}
		}
		out = w
		return tx.audit(wardload.RetireAction("ward", before.RetiredAt, w.RetiredAt), before, w)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

func findWard(ctx context.Context, q querier, id int64) (*wardload.Ward, error) {
	ws, _, err := findWards(ctx, q, wardload.WardFilter{ID: &id})
	if err != nil {
		return nil, err
	}
	if len(ws) == 0 {
		return nil, wardload.NotFound("Ward")
	}
	return ws[0], nil
}

func findWards(ctx context.Context, q querier, f wardload.WardFilter) ([]*wardload.Ward, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	if f.ID != nil {
		where, args = append(where, "id = ?"), append(args, *f.ID)
	}
	if f.Code != nil {
		where, args = append(where, "code = ?"), append(args, *f.Code)
	}
	if f.UserID != nil {
		where, args = append(where, "id IN (SELECT ward_id FROM user_wards WHERE user_id = ?)"), append(args, *f.UserID)
	}
	if f.ActiveOnly {
		where = append(where, "retired_at IS NULL")
	}
	cond := strings.Join(where, " AND ")
	// Without a page the total is the number of rows: spare the count
	// query (single lookups run on every request).
	total := -1
	if f.Offset > 0 || f.Limit > 0 {
		if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM wards WHERE `+cond, args...).Scan(&total); err != nil {
			return nil, 0, err
		}
	}
	// The factor names come in the same query (one round trip per ward
	// lookup, which every ward page makes): codes joined by U+001F, which
	// a code cannot contain.
	rows, err := q.QueryContext(ctx, page(`SELECT id, code, name, time_zone, created_at, retired_at,
		(SELECT group_concat(name, char(31) ORDER BY position) FROM ward_factors WHERE ward_id = wards.id)
		FROM wards WHERE `+cond+` ORDER BY code`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var ws []*wardload.Ward
	for rows.Next() {
		var w wardload.Ward
		var created string
		var factors, retired sql.NullString
		if err := rows.Scan(&w.ID, &w.Code, &w.Name, &w.TimeZone, &created, &retired, &factors); err != nil {
			return nil, 0, err
		}
		if w.RetiredAt, err = parseNullTime(retired); err != nil {
			return nil, 0, err
		}
		if factors.Valid && factors.String != "" {
			w.FactorNames = strings.Split(factors.String, "\x1f")
		}
		if w.CreatedAt, err = parseTime(created); err != nil {
			return nil, 0, err
		}
		ws = append(ws, &w)
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	rows.Close()
	if total < 0 {
		total = len(ws)
	}
	return ws, total, nil
}

// wardExists returns ENOTFOUND naming field "ward" unless the ward exists.
func wardExists(ctx context.Context, q querier, id int64) error {
	var one int
	err := q.QueryRowContext(ctx, `SELECT 1 FROM wards WHERE id = ?`, id).Scan(&one)
	if errors.Is(err, sql.ErrNoRows) {
		return wardload.WardNotFound()
	}
	return err
}

// loadWardRefs returns what the rows of ward id may refer to, in one
// query, or wardload.WardNotFound. IDs and names are joined with ',' and
// U+001F, which neither can contain.
func loadWardRefs(ctx context.Context, q querier, id int64) (*wardload.WardRefs, error) {
	var tiers, shifts, factors, oldTiers, oldShifts sql.NullString
	r := &wardload.WardRefs{WardID: id}
	err := q.QueryRowContext(ctx, `SELECT
		(SELECT group_concat(id, ',' ORDER BY display_order, code) FROM tiers WHERE ward_id = wards.id),
		(SELECT group_concat(id, ',' ORDER BY start_minute, name) FROM shift_patterns WHERE ward_id = wards.id),
		(SELECT group_concat(name, char(31) ORDER BY position) FROM ward_factors WHERE ward_id = wards.id),
		retired_at IS NOT NULL,
		(SELECT group_concat(id, ',') FROM tiers WHERE ward_id = wards.id AND retired_at IS NOT NULL),
		(SELECT group_concat(id, ',') FROM shift_patterns WHERE ward_id = wards.id AND retired_at IS NOT NULL)
		FROM wards WHERE id = ?`, id).Scan(&tiers, &shifts, &factors, &r.Retired, &oldTiers, &oldShifts)
	if errors.Is(err, sql.ErrNoRows) {
		return nil, wardload.WardNotFound()
	} else if err != nil {
		return nil, err
	}
	if r.RetiredTiers, err = parseIDs(oldTiers.String); err != nil {
		return nil, err
	}
	if r.RetiredShifts, err = parseIDs(oldShifts.String); err != nil {
		return nil, err
	}
	if r.Tiers, err = parseIDs(tiers.String); err != nil {
		return nil, err
	}
	if r.Shifts, err = parseIDs(shifts.String); err != nil {
		return nil, err
	}
	if factors.String != "" {
		r.Factors = strings.Split(factors.String, "\x1f")
	}
	return r, nil
}
