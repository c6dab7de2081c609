package sqlite

import (
	"context"
	"database/sql"
	"errors"

	"wardload/internal/wardload"
)

// CreateTier stores a tier of an existing ward.
func (s *Store) CreateTier(ctx context.Context, t *wardload.Tier) error {
	if err := t.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		if err := wardExists(ctx, tx, t.WardID); err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx, `INSERT INTO tiers (ward_id, code, label, description, display_order) VALUES (?, ?, ?, ?, ?)`,
			t.WardID, t.Code, t.Label, t.Description, t.DisplayOrder)
		if err != nil {
			return err
		}
		if t.ID, err = res.LastInsertId(); err != nil {
			return err
		}
		return tx.audit(wardload.ActionTierCreate, nil, t)
	})
}

// FindTierByID returns ENOTFOUND if there is no such tier.
func (s *Store) FindTierByID(ctx context.Context, id int64) (*wardload.Tier, error) {
	return findTier(ctx, s.reader(ctx), id)
}

// FindTiers returns the ward's tiers by display order, then code.
func (s *Store) FindTiers(ctx context.Context, wardID int64) ([]*wardload.Tier, error) {
	return findTiers(ctx, s.reader(ctx), wardID)
}

func findTiers(ctx context.Context, q querier, wardID int64) ([]*wardload.Tier, error) {
	rows, err := q.QueryContext(ctx, `SELECT `+tierColumns+` FROM tiers WHERE ward_id = ? ORDER BY display_order, code`, wardID)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var ts []*wardload.Tier
	for rows.Next() {
		t, err := scanTier(rows)
		if err != nil {
			return nil, err
		}
		ts = append(ts, t)
	}
	return ts, rows.Err()
}

// UpdateTier applies upd in one transaction.
func (s *Store) UpdateTier(ctx context.Context, id int64, upd wardload.TierUpdate) (*wardload.Tier, error) {
	var out *wardload.Tier
	err := s.write(ctx, func(tx *Tx) error {
		before, err := findTier(ctx, tx, id)
		if err != nil {
			return err
		}
		t, err := upd.Apply(before, tx.now)
		if err != nil {
			return err
		}
		if t.Retired() && !before.Retired() {
			all, err := findTiers(ctx, tx, t.WardID)
			if err != nil {
				return err
			}
			if err := wardload.CheckTierRetire(all, id); err != nil {
				return err
			}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE tiers SET label = ?, description = ?, display_order = ?, retired_at = ? WHERE id = ?`,
			t.Label, t.Description, t.DisplayOrder, nullTime(t.RetiredAt), id); err != nil {
			return err
		}
		out = t
		return tx.audit(wardload.RetireAction("tier", before.RetiredAt, t.RetiredAt), before, t)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

const tierColumns = `id, ward_id, code, label, description, display_order, retired_at`

type scanner interface{ Scan(dest ...any) error }

func scanTier(r scanner) (*wardload.Tier, error) {
	var t wardload.Tier
	var retired sql.NullString
	if err := r.Scan(&t.ID, &t.WardID, &t.Code, &t.Label, &t.Description, &t.DisplayOrder, &retired); err != nil {
		return nil, err
	}
	var err error
	t.RetiredAt, err = parseNullTime(retired)
	return &t, err
}

func findTier(ctx context.Context, q querier, id int64) (*wardload.Tier, error) {
	t, err := scanTier(q.QueryRowContext(ctx, `SELECT `+tierColumns+` FROM tiers WHERE id = ?`, id))
	if errors.Is(err, sql.ErrNoRows) {
		return nil, wardload.NotFound("Tier")
	}
	return t, err
}
