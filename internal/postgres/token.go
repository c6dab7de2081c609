package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateToken returns EINVALID, ENOTFOUND (a ward) or ECONFLICT (name taken).
func (s *Store) CreateToken(ctx context.Context, t *wardload.APIToken) error {
	if err := t.Validate(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := tx.QueryRow(ctx, `INSERT INTO api_tokens (name, hash, created_by, created_at, write_staffing)
			VALUES ($1, $2, $3, $4, $5) RETURNING id`, t.Name, t.Hash, t.CreatedBy, now, t.WriteStaffing).Scan(&t.ID); err != nil {
			return err
		}
		wards := wardload.WardIDSet(t.WardIDs)
		if err := setMemberships(ctx, tx, `token_wards`, `token_id`, t.ID, wards); err != nil {
			return err
		}
		t.WardIDs, t.CreatedAt, t.LastUsedAt, t.RevokedAt = wards, now, time.Time{}, time.Time{}
		return audit(ctx, tx, now, wardload.ActionTokenCreate, nil, t)
	})
}

// FindTokenByHash returns the token with that hash, revoked or not, or ENOTFOUND.
func (s *Store) FindTokenByHash(ctx context.Context, hash string) (*wardload.APIToken, error) {
	ts, err := findTokens(ctx, s.pool, ` WHERE t.hash = $1`, hash)
	return one(ts, err, "Token")
}

// FindTokenByName returns ENOTFOUND if there is no such token.
func (s *Store) FindTokenByName(ctx context.Context, name string) (*wardload.APIToken, error) {
	ts, err := findTokens(ctx, s.pool, ` WHERE t.name = $1`, name)
	return one(ts, err, "Token")
}

// FindTokens returns tokens ordered by Name; wardID 0 returns all.
func (s *Store) FindTokens(ctx context.Context, wardID int64) ([]*wardload.APIToken, error) {
	if wardID == 0 {
		return findTokens(ctx, s.pool, ``)
	}
	return findTokens(ctx, s.pool, ` WHERE t.id IN (SELECT token_id FROM token_wards WHERE ward_id = $1)`, wardID)
}

func findTokens(ctx context.Context, q querier, where string, args ...any) ([]*wardload.APIToken, error) {
	rows, err := q.Query(ctx, `SELECT t.id, t.name, t.hash, t.created_by, t.created_at, t.last_used_at, t.revoked_at, t.write_staffing
		FROM api_tokens t`+where+` ORDER BY t.name`, args...)
	if err != nil {
		return nil, formatError(err)
	}
	ts, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.APIToken, error) {
		var t wardload.APIToken
		var used, revoked *time.Time
		err := r.Scan(&t.ID, &t.Name, &t.Hash, &t.CreatedBy, &t.CreatedAt, &used, &revoked, &t.WriteStaffing)
		t.CreatedAt, t.LastUsedAt, t.RevokedAt = t.CreatedAt.UTC(), timeOf(used), timeOf(revoked)
		return &t, err
	})
	if err != nil || len(ts) == 0 {
		return ts, formatError(err)
	}
	ids := make([]int64, len(ts))
	byID := make(map[int64]*wardload.APIToken, len(ts))
	for i, t := range ts {
		ids[i], byID[t.ID] = t.ID, t
	}
	err = loadWardLinks(ctx, q, `SELECT token_id, ward_id FROM token_wards WHERE token_id = ANY($1) ORDER BY token_id, ward_id`, ids,
		func(id, ward int64) { byID[id].WardIDs = append(byID[id].WardIDs, ward) })
	return ts, err
}

// RevokeToken sets RevokedAt. Returns ENOTFOUND, or ECONFLICT if already revoked.
func (s *Store) RevokeToken(ctx context.Context, id int64) error {
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if _, err := tx.Exec(ctx, `SELECT 1 FROM api_tokens WHERE id = $1 FOR UPDATE`, id); err != nil {
			return err
		}
		ts, err := findTokens(ctx, tx, ` WHERE t.id = $1`, id)
		before, err := one(ts, err, "Token")
		if err != nil {
			return err
		}
		after, err := before.Revoked(now)
		if err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `UPDATE api_tokens SET revoked_at = $1 WHERE id = $2`, now, id); err != nil {
			return err
		}
		return audit(ctx, tx, now, wardload.ActionTokenRevoke, before, after)
	})
}

// TouchToken records a use at time at. Not audited: it happens on every
// API request and says nothing a reviewer needs.
func (s *Store) TouchToken(ctx context.Context, id int64, at time.Time) error {
	tag, err := s.pool.Exec(ctx, `UPDATE api_tokens SET last_used_at = $1 WHERE id = $2`, timeArg(at), id)
	if err != nil {
		return formatError(err)
	}
	if tag.RowsAffected() == 0 {
		return wardload.NotFound("Token")
	}
	return nil
}
