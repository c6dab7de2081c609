package sqlite

import (
	"context"
	"database/sql"
	"strconv"
	"strings"

	"wardload/internal/wardload"
)

// CreateUser stores a user and their ward memberships.
func (s *Store) CreateUser(ctx context.Context, u *wardload.User) error {
	if err := u.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		res, err := tx.ExecContext(ctx, `INSERT INTO users (name, role, password_hash, disabled, created_at, must_change_password) VALUES (?, ?, ?, ?, ?, ?)`,
			u.Name, u.Role, u.PasswordHash, boolInt(u.Disabled), formatTime(tx.now), boolInt(u.MustChangePassword))
		if err != nil {
			return err
		}
		id, err := res.LastInsertId()
		if err != nil {
			return err
		}
		wards := wardload.WardIDSet(u.WardIDs)
		if err := setMemberships(ctx, tx, `user_wards`, `user_id`, id, wards); err != nil {
			return err
		}
		u.ID, u.CreatedAt, u.WardIDs = id, tx.now, wards
		return tx.audit(wardload.ActionUserCreate, nil, u)
	})
}

// setMemberships replaces the ward links of a user or token (table and its
// owner column) with wardIDs, a wardload.WardIDSet. An unknown ward is
// wardload.UnknownWard.
func setMemberships(ctx context.Context, tx *Tx, table, column string, id int64, wardIDs []int64) error {
	if _, err := tx.ExecContext(ctx, `DELETE FROM `+table+` WHERE `+column+` = ?`, id); err != nil {
		return err
	}
	for _, w := range wardIDs {
		if err := wardExists(ctx, tx, w); wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return wardload.UnknownWard(w)
		} else if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO `+table+` (`+column+`, ward_id) VALUES (?, ?)`, id, w); err != nil {
			return err
		}
	}
	return nil
}

// FindUserByID returns ENOTFOUND if there is no such user.
func (s *Store) FindUserByID(ctx context.Context, id int64) (*wardload.User, error) {
	return findUser(ctx, s.reader(ctx), wardload.UserFilter{ID: &id})
}

// FindUserByName returns ENOTFOUND if there is no such user.
func (s *Store) FindUserByName(ctx context.Context, name string) (*wardload.User, error) {
	return findUser(ctx, s.reader(ctx), wardload.UserFilter{Name: &name})
}

// FindUsers returns matches ordered by name and the total.
func (s *Store) FindUsers(ctx context.Context, f wardload.UserFilter) ([]*wardload.User, int, error) {
	return findUsers(ctx, s.reader(ctx), f)
}

// UpdateUser applies upd in one transaction.
func (s *Store) UpdateUser(ctx context.Context, id int64, upd wardload.UserUpdate) (*wardload.User, error) {
	var out *wardload.User
	err := s.write(ctx, func(tx *Tx) error {
		before, err := findUser(ctx, tx, wardload.UserFilter{ID: &id})
		if err != nil {
			return err
		}
		u, err := upd.Apply(before)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE users SET role = ?, password_hash = ?, disabled = ?, must_change_password = ?, password_changes = ? WHERE id = ?`,
			u.Role, u.PasswordHash, boolInt(u.Disabled), boolInt(u.MustChangePassword), u.PasswordChanges, id); err != nil {
			return err
		}
		if upd.WardIDs != nil {
			if err := setMemberships(ctx, tx, `user_wards`, `user_id`, id, u.WardIDs); err != nil {
				return err
			}
		}
		out = u
		return tx.audit(wardload.ActionUserUpdate, before, u)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

func findUser(ctx context.Context, q querier, f wardload.UserFilter) (*wardload.User, error) {
	us, _, err := findUsers(ctx, q, f)
	if err != nil {
		return nil, err
	}
	if len(us) == 0 {
		return nil, wardload.NotFound("User")
	}
	return us[0], nil
}

func findUsers(ctx context.Context, q querier, f wardload.UserFilter) ([]*wardload.User, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if f.ID != nil {
		add("id = ?", *f.ID)
	}
	if f.Name != nil {
		add("name = ?", *f.Name)
	}
	if f.Role != nil {
		add("role = ?", *f.Role)
	}
	if f.WardID != nil {
		add("id IN (SELECT user_id FROM user_wards WHERE ward_id = ?)", *f.WardID)
	}
	cond := strings.Join(where, " AND ")
	// Without a page the total is the number of rows: spare the count
	// query (single lookups run on every request).
	total := -1
	if f.Offset > 0 || f.Limit > 0 {
		if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM users WHERE `+cond, args...).Scan(&total); err != nil {
			return nil, 0, err
		}
	}
	// Memberships come in the same query: the guard reads the signed-in
	// user on every request, so one round trip instead of two.
	rows, err := q.QueryContext(ctx, page(`SELECT id, name, role, password_hash, disabled, created_at, must_change_password, password_changes,
		(SELECT group_concat(ward_id, ',' ORDER BY ward_id) FROM user_wards WHERE user_id = users.id)
		FROM users WHERE `+cond+` ORDER BY name`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var us []*wardload.User
	for rows.Next() {
		var u wardload.User
		var created string
		var wards sql.NullString
		if err := rows.Scan(&u.ID, &u.Name, &u.Role, &u.PasswordHash, &u.Disabled, &created, &u.MustChangePassword, &u.PasswordChanges, &wards); err != nil {
			return nil, 0, err
		}
		if u.WardIDs, err = parseIDs(wards.String); err != nil {
			return nil, 0, err
		}
		if u.CreatedAt, err = parseTime(created); err != nil {
			return nil, 0, err
		}
		us = append(us, &u)
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	rows.Close()
	if total < 0 {
		total = len(us)
	}
	return us, total, nil
}

// parseIDs reads a comma-joined list of IDs from group_concat; "" (no
// rows) is an empty, non-nil list.
func parseIDs(s string) ([]int64, error) {
	ids := []int64{}
	if s == "" {
		return ids, nil
	}
	for _, f := range strings.Split(s, ",") {
		id, err := strconv.ParseInt(f, 10, 64)
		if err != nil {
			return nil, err
		}
		ids = append(ids, id)
	}
	return ids, nil
}
