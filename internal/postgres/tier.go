package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateTier returns EINVALID, ENOTFOUND (ward) or ECONFLICT (code taken in the ward).
func (s *Store) CreateTier(ctx context.Context, t *wardload.Tier) error {
	if err := t.Validate(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := wardExists(ctx, tx, t.WardID); err != nil {
			return err
		}
		if err := tx.QueryRow(ctx, `INSERT INTO tiers (ward_id, code, label, description, display_order)
			VALUES ($1, $2, $3, $4, $5) RETURNING id`,
			t.WardID, t.Code, t.Label, t.Description, t.DisplayOrder).Scan(&t.ID); err != nil {
			return err
		}
		return audit(ctx, tx, now, wardload.ActionTierCreate, nil, t)
	})
}

// wardExists returns ENOTFOUND naming the field "ward" if there is no such
// ward. Wards are never deleted, so the answer holds for the transaction.
func wardExists(ctx context.Context, q querier, id int64) error {
	var one int
	err := q.QueryRow(ctx, `SELECT 1 FROM wards WHERE id = $1`, id).Scan(&one)
	if err == pgx.ErrNoRows {
		return wardload.WardNotFound()
	}
	return err
}

const tierColumns = `id, ward_id, code, label, description, display_order, retired_at`

func scanTier(r pgx.CollectableRow) (*wardload.Tier, error) {
	var t wardload.Tier
	var retired *time.Time
	err := r.Scan(&t.ID, &t.WardID, &t.Code, &t.Label, &t.Description, &t.DisplayOrder, &retired)
	t.RetiredAt = timeOf(retired)
	return &t, err
}

// lockWard locks the row of ward id until the transaction ends, so that
// two changes that each check the ward's other rows (retiring its last
// active tier or shift pattern) run one after the other.
func lockWard(ctx context.Context, tx pgx.Tx, id int64) error {
	var one int
	err := tx.QueryRow(ctx, `SELECT 1 FROM wards WHERE id = $1 FOR UPDATE`, id).Scan(&one)
	if err == pgx.ErrNoRows {
		return wardload.WardNotFound()
	}
	return err
}

// FindTierByID returns ENOTFOUND if there is no such tier.
func (s *Store) FindTierByID(ctx context.Context, id int64) (*wardload.Tier, error) {
	return findTier(ctx, s.pool, id, "")
}

func findTier(ctx context.Context, q querier, id int64, lock string) (*wardload.Tier, error) {
	rows, err := q.Query(ctx, `SELECT `+tierColumns+` FROM tiers WHERE id = $1`+lock, id)
	if err != nil {
		return nil, formatError(err)
	}
	ts, err := pgx.CollectRows(rows, scanTier)
	return one(ts, formatError(err), "Tier")
}

// FindTiers returns the ward's tiers by DisplayOrder then Code.
func (s *Store) FindTiers(ctx context.Context, wardID int64) ([]*wardload.Tier, error) {
	return findTiers(ctx, s.pool, wardID)
}

func findTiers(ctx context.Context, q querier, wardID int64) ([]*wardload.Tier, error) {
	rows, err := q.Query(ctx, `SELECT `+tierColumns+` FROM tiers WHERE ward_id = $1 ORDER BY display_order, code`, wardID)
	if err != nil {
		return nil, formatError(err)
	}
	ts, err := pgx.CollectRows(rows, scanTier)
	return ts, formatError(err)
}

// UpdateTier returns ENOTFOUND or EINVALID.
func (s *Store) UpdateTier(ctx context.Context, id int64, upd wardload.TierUpdate) (*wardload.Tier, error) {
	var out *wardload.Tier
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		before, err := findTier(ctx, tx, id, " FOR UPDATE")
		if err != nil {
			return err
		}
		t, err := upd.Apply(before, now)
		if err != nil {
			return err
		}
		if t.Retired() && !before.Retired() {
			if err := lockWard(ctx, tx, t.WardID); err != nil {
				return err
			}
			all, err := findTiers(ctx, tx, t.WardID)
			if err != nil {
				return err
			}
			if err := wardload.CheckTierRetire(all, id); err != nil {
				return err
			}
		}
		if _, err := tx.Exec(ctx, `UPDATE tiers SET label = $1, description = $2, display_order = $3, retired_at = $4 WHERE id = $5`,
			t.Label, t.Description, t.DisplayOrder, timeArg(t.RetiredAt), id); err != nil {
			return err
		}
		out = t
		return audit(ctx, tx, now, wardload.RetireAction("tier", before.RetiredAt, t.RetiredAt), before, t)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}
