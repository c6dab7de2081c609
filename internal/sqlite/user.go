package sqlite

import (
	"context"
	"database/sql"
	"slices"
	"strconv"
	"strings"
	"time"

	"wardload/internal/wardload"
)

// userAudit is what the audit log keeps of a user: everything but the
// password hash, which must never be copied anywhere else.
type userAudit struct {
	ID        int64
	Name      string
	Role      string
	Disabled  bool
	WardIDs   []int64
	CreatedAt time.Time
}

func auditUser(u *wardload.User) userAudit {
	return userAudit{u.ID, u.Name, u.Role, u.Disabled, u.WardIDs, u.CreatedAt}
}

// CreateUser stores a user and their ward memberships.
func (s *Store) CreateUser(ctx context.Context, u *wardload.User) error {
	if err := u.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		res, err := tx.ExecContext(ctx, `INSERT INTO users (name, role, password_hash, disabled, created_at) VALUES (?, ?, ?, ?, ?)`,
			u.Name, u.Role, u.PasswordHash, boolInt(u.Disabled), formatTime(tx.now))
		if err != nil {
			return err
		}
		id, err := res.LastInsertId()
		if err != nil {
			return err
		}
		wards, err := setMemberships(ctx, tx, `user_wards`, `user_id`, id, u.WardIDs)
		if err != nil {
			return err
		}
		u.ID, u.CreatedAt, u.WardIDs = id, tx.now, wards
		return tx.audit("user.create", "user", id, 0, nil, auditUser(u))
	})
}

// setMemberships replaces the ward links of a user or token (table and its
// owner column) and returns the ward IDs ascending and without repeats. An
// unknown ward is ENOTFOUND naming field "wards", as in PostgreSQL.
func setMemberships(ctx context.Context, tx *Tx, table, column string, id int64, wardIDs []int64) ([]int64, error) {
	ids := slices.Clone(wardIDs)
	slices.Sort(ids)
	ids = slices.Compact(ids)
	if _, err := tx.ExecContext(ctx, `DELETE FROM `+table+` WHERE `+column+` = ?`, id); err != nil {
		return nil, err
	}
	for _, w := range ids {
		if err := wardExists(ctx, tx, w); err != nil {
			if wardload.ErrorCode(err) == wardload.ENOTFOUND {
				return nil, wardload.FieldErrorf(wardload.ENOTFOUND, "wards", "Ward %d not found.", w)
			}
			return nil, err
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO `+table+` (`+column+`, ward_id) VALUES (?, ?)`, id, w); err != nil {
			return nil, err
		}
	}
	return ids, nil
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
		u := *before
		if upd.Role != nil {
			u.Role = *upd.Role
		}
		if upd.PasswordHash != nil {
			u.PasswordHash = *upd.PasswordHash
		}
		if upd.Disabled != nil {
			u.Disabled = *upd.Disabled
		}
		if err := u.Validate(); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE users SET role = ?, password_hash = ?, disabled = ? WHERE id = ?`,
			u.Role, u.PasswordHash, boolInt(u.Disabled), id); err != nil {
			return err
		}
		if upd.WardIDs != nil {
			if u.WardIDs, err = setMemberships(ctx, tx, `user_wards`, `user_id`, id, upd.WardIDs); err != nil {
				return err
			}
		}
		out = &u
		return tx.audit("user.update", "user", id, 0, auditUser(before), auditUser(&u))
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
		return nil, wardload.Errorf(wardload.ENOTFOUND, "User not found.")
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
	rows, err := q.QueryContext(ctx, page(`SELECT id, name, role, password_hash, disabled, created_at,
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
		if err := rows.Scan(&u.ID, &u.Name, &u.Role, &u.PasswordHash, &u.Disabled, &created, &wards); err != nil {
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
// rows) is an empty, non-nil list, as idList returns.
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

// idList runs a one-column query of IDs.
func idList(ctx context.Context, q querier, query string, args ...any) ([]int64, error) {
	rows, err := q.QueryContext(ctx, query, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	ids := []int64{}
	for rows.Next() {
		var id int64
		if err := rows.Scan(&id); err != nil {
			return nil, err
		}
		ids = append(ids, id)
	}
	return ids, rows.Err()
}
