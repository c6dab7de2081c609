package sqlite

import (
	"context"
	"database/sql"
	"time"

	"wardload/internal/wardload"
)

// CreateToken stores a token and the wards it may read.
func (s *Store) CreateToken(ctx context.Context, t *wardload.APIToken) error {
	if err := t.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		res, err := tx.ExecContext(ctx, `INSERT INTO api_tokens (name, hash, created_by, created_at, write_staffing) VALUES (?, ?, ?, ?, ?)`,
			t.Name, t.Hash, t.CreatedBy, formatTime(tx.now), boolInt(t.WriteStaffing))
		if err != nil {
			return err
		}
		id, err := res.LastInsertId()
		if err != nil {
			return err
		}
		wards := wardload.WardIDSet(t.WardIDs)
		if err := setMemberships(ctx, tx, `token_wards`, `token_id`, id, wards); err != nil {
			return err
		}
		// A new token is unused and active whatever the caller set, as stored.
		t.ID, t.CreatedAt, t.WardIDs, t.LastUsedAt, t.RevokedAt = id, tx.now, wards, time.Time{}, time.Time{}
		return tx.audit(wardload.ActionTokenCreate, nil, t)
	})
}

// FindTokenByHash returns the token with that hash, revoked or not.
func (s *Store) FindTokenByHash(ctx context.Context, hash string) (*wardload.APIToken, error) {
	return findToken(ctx, s.reader(ctx), "hash = ?", hash)
}

// FindTokenByName returns ENOTFOUND if there is no such token.
func (s *Store) FindTokenByName(ctx context.Context, name string) (*wardload.APIToken, error) {
	return findToken(ctx, s.reader(ctx), "name = ?", name)
}

// FindTokens returns tokens by name; wardID 0 returns all.
func (s *Store) FindTokens(ctx context.Context, wardID int64) ([]*wardload.APIToken, error) {
	if wardID == 0 {
		return findTokens(ctx, s.reader(ctx), "1 = 1")
	}
	return findTokens(ctx, s.reader(ctx), "id IN (SELECT token_id FROM token_wards WHERE ward_id = ?)", wardID)
}

// RevokeToken sets RevokedAt.
func (s *Store) RevokeToken(ctx context.Context, id int64) error {
	return s.write(ctx, func(tx *Tx) error {
		before, err := findToken(ctx, tx, "id = ?", id)
		if err != nil {
			return err
		}
		after, err := before.Revoked(tx.now)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE api_tokens SET revoked_at = ? WHERE id = ?`, formatTime(tx.now), id); err != nil {
			return err
		}
		return tx.audit(wardload.ActionTokenRevoke, before, after)
	})
}

// TouchToken records a use. It is not audited: it happens on every API
// call and says nothing a reviewer needs.
func (s *Store) TouchToken(ctx context.Context, id int64, at time.Time) error {
	return s.write(ctx, func(tx *Tx) error {
		res, err := tx.ExecContext(ctx, `UPDATE api_tokens SET last_used_at = ? WHERE id = ?`, formatTime(at), id)
		if err != nil {
			return err
		}
		if n, err := res.RowsAffected(); err != nil {
			return err
		} else if n == 0 {
			return wardload.NotFound("Token")
		}
		return nil
	})
}

func findToken(ctx context.Context, q querier, cond string, arg any) (*wardload.APIToken, error) {
	ts, err := findTokens(ctx, q, cond, arg)
	if err != nil {
		return nil, err
	}
	if len(ts) == 0 {
		return nil, wardload.NotFound("Token")
	}
	return ts[0], nil
}

func findTokens(ctx context.Context, q querier, cond string, args ...any) ([]*wardload.APIToken, error) {
	// Ward IDs come in the same query: FindTokenByHash runs on every API
	// request, so one round trip instead of two.
	rows, err := q.QueryContext(ctx, `SELECT id, name, hash, created_by, created_at, last_used_at, revoked_at, write_staffing,
		(SELECT group_concat(ward_id, ',' ORDER BY ward_id) FROM token_wards WHERE token_id = api_tokens.id)
		FROM api_tokens WHERE `+cond+` ORDER BY name`, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var ts []*wardload.APIToken
	for rows.Next() {
		var t wardload.APIToken
		var created string
		var used, revoked, wards sql.NullString
		if err := rows.Scan(&t.ID, &t.Name, &t.Hash, &t.CreatedBy, &created, &used, &revoked, &t.WriteStaffing, &wards); err != nil {
			return nil, err
		}
		if t.WardIDs, err = parseIDs(wards.String); err != nil {
			return nil, err
		}
		if t.CreatedAt, err = parseTime(created); err != nil {
			return nil, err
		}
		if t.LastUsedAt, err = parseNullTime(used); err != nil {
			return nil, err
		}
		if t.RevokedAt, err = parseNullTime(revoked); err != nil {
			return nil, err
		}
		ts = append(ts, &t)
	}
	return ts, rows.Err()
}
