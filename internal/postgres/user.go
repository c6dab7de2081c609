package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateUser returns EINVALID, ENOTFOUND (a ward) or ECONFLICT (name taken).
func (s *Store) CreateUser(ctx context.Context, u *wardload.User) error {
	if err := u.Validate(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := tx.QueryRow(ctx, `INSERT INTO users (name, role, password_hash, disabled, created_at, must_change_password)
			VALUES ($1, $2, $3, $4, $5, $6) RETURNING id`, u.Name, u.Role, u.PasswordHash, u.Disabled, now, u.MustChangePassword).Scan(&u.ID); err != nil {
			return err
		}
		wards := wardload.WardIDSet(u.WardIDs)
		if err := setMemberships(ctx, tx, `user_wards`, `user_id`, u.ID, wards); err != nil {
			return err
		}
		u.WardIDs, u.CreatedAt = wards, now
		return audit(ctx, tx, now, wardload.ActionUserCreate, nil, u)
	})
}

// setMemberships replaces the ward links of a user or token with wardIDs,
// a wardload.WardIDSet. An unknown ward is wardload.UnknownWard.
func setMemberships(ctx context.Context, tx pgx.Tx, table, column string, id int64, wardIDs []int64) error {
	if _, err := tx.Exec(ctx, `DELETE FROM `+table+` WHERE `+column+` = $1`, id); err != nil {
		return err
	}
	if len(wardIDs) == 0 {
		return nil
	}
	known, err := idSet(ctx, tx, `SELECT id FROM wards WHERE id = ANY($1)`, wardIDs)
	if err != nil {
		return err
	}
	for _, w := range wardIDs {
		if !known[w] {
			return wardload.UnknownWard(w)
		}
		if _, err := tx.Exec(ctx, `INSERT INTO `+table+` (`+column+`, ward_id) VALUES ($1, $2)`, id, w); err != nil {
			return err
		}
	}
	return nil
}

// FindUserByID returns ENOTFOUND if there is no such user.
func (s *Store) FindUserByID(ctx context.Context, id int64) (*wardload.User, error) {
	us, err := findUsers(ctx, s.pool, wardload.UserFilter{ID: &id}, "")
	return one(us, err, "User")
}

// FindUserByName returns ENOTFOUND if there is no such user.
func (s *Store) FindUserByName(ctx context.Context, name string) (*wardload.User, error) {
	us, err := findUsers(ctx, s.pool, wardload.UserFilter{Name: &name}, "")
	return one(us, err, "User")
}

// FindUsers returns matches ordered by Name and the total count.
func (s *Store) FindUsers(ctx context.Context, f wardload.UserFilter) ([]*wardload.User, int, error) {
	w := userWhere(f)
	var n int
	if err := s.pool.QueryRow(ctx, `SELECT count(*) FROM users`+w.String(), w.args...).Scan(&n); err != nil {
		return nil, 0, formatError(err)
	}
	us, err := findUsers(ctx, s.pool, f, page(f.Offset, f.Limit))
	if err != nil {
		return nil, 0, err
	}
	return us, n, nil
}

func userWhere(f wardload.UserFilter) *where {
	var w where
	if f.ID != nil {
		w.add("id = ?", *f.ID)
	}
	if f.Name != nil {
		w.add("name = ?", *f.Name)
	}
	if f.Role != nil {
		w.add("role = ?", *f.Role)
	}
	if f.WardID != nil {
		w.add("id IN (SELECT user_id FROM user_wards WHERE ward_id = ?)", *f.WardID)
	}
	return &w
}

func findUsers(ctx context.Context, q querier, f wardload.UserFilter, suffix string) ([]*wardload.User, error) {
	w := userWhere(f)
	// Memberships come in the same query: the guard reads the signed-in
	// user on every request, so one round trip instead of two.
	rows, err := q.Query(ctx, `SELECT id, name, role, password_hash, disabled, created_at, must_change_password, password_changes,
		ARRAY(SELECT ward_id FROM user_wards WHERE user_id = users.id ORDER BY ward_id)
		FROM users`+w.String()+` ORDER BY name`+suffix, w.args...)
	if err != nil {
		return nil, formatError(err)
	}
	us, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.User, error) {
		var u wardload.User
		err := r.Scan(&u.ID, &u.Name, &u.Role, &u.PasswordHash, &u.Disabled, &u.CreatedAt, &u.MustChangePassword, &u.PasswordChanges, &u.WardIDs)
		u.CreatedAt = u.CreatedAt.UTC()
		if len(u.WardIDs) == 0 {
			u.WardIDs = nil // no memberships is nil, as it always was here
		}
		return &u, err
	})
	return us, formatError(err)
}

// loadWardLinks runs a two-column (owner, ward) query and hands each pair to add.
func loadWardLinks(ctx context.Context, q querier, sql string, ids []int64, add func(id, ward int64)) error {
	rows, err := q.Query(ctx, sql, ids)
	if err != nil {
		return formatError(err)
	}
	var id, ward int64
	_, err = pgx.ForEachRow(rows, []any{&id, &ward}, func() error {
		add(id, ward)
		return nil
	})
	return formatError(err)
}

// UpdateUser returns ENOTFOUND or EINVALID.
func (s *Store) UpdateUser(ctx context.Context, id int64, upd wardload.UserUpdate) (*wardload.User, error) {
	var out *wardload.User
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		us, err := findUsers(ctx, tx, wardload.UserFilter{ID: &id}, " FOR UPDATE")
		before, err := one(us, err, "User")
		if err != nil {
			return err
		}
		u, err := upd.Apply(before)
		if err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `UPDATE users SET role = $1, password_hash = $2, disabled = $3, must_change_password = $4, password_changes = $5 WHERE id = $6`,
			u.Role, u.PasswordHash, u.Disabled, u.MustChangePassword, u.PasswordChanges, id); err != nil {
			return err
		}
		if upd.WardIDs != nil {
			if err := setMemberships(ctx, tx, `user_wards`, `user_id`, id, u.WardIDs); err != nil {
				return err
			}
		}
		out = u
		return audit(ctx, tx, now, wardload.ActionUserUpdate, before, u)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}
