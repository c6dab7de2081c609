package sqlite

import (
	"context"
	"strings"
	"time"

	"wardload/internal/wardload"
)

// AppendAudit stores e, setting ID and, if zero, At from the clock. It is
// for events that are not a store change (sign-ins and the like); store
// changes write their own rows in their own transactions.
func (s *Store) AppendAudit(ctx context.Context, e *wardload.AuditEntry) error {
	return s.write(ctx, func(tx *Tx) error {
		if e.At.IsZero() {
			e.At = tx.now
		}
		return insertAudit(ctx, tx, e)
	})
}

func insertAudit(ctx context.Context, q querier, e *wardload.AuditEntry) error {
	res, err := q.ExecContext(ctx, `INSERT INTO audit_log
		(at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		formatTime(e.At), e.UserID, e.Actor, e.Action, e.Entity, e.EntityID, e.WardID, e.Before, e.After)
	if err != nil {
		return err
	}
	e.ID, err = res.LastInsertId()
	return err
}

// FindAudit returns matches newest first (ID breaks ties) and the total.
func (s *Store) FindAudit(ctx context.Context, f wardload.AuditFilter) ([]*wardload.AuditEntry, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if len(f.WardIDs) > 0 {
		marks := strings.TrimSuffix(strings.Repeat("?,", len(f.WardIDs)), ",")
		where = append(where, "ward_id IN ("+marks+")")
		for _, id := range f.WardIDs {
			args = append(args, id)
		}
	}
	if f.UserID != nil {
		add("user_id = ?", *f.UserID)
	}
	if f.Action != nil {
		add("action = ?", *f.Action)
	}
	if f.Entity != nil {
		add("entity = ?", *f.Entity)
	}
	if f.From != nil {
		add("at >= ?", formatTime(*f.From))
	}
	if f.To != nil {
		add("at < ?", formatTime(*f.To))
	}
	cond := strings.Join(where, " AND ")
	var total int
	if err := s.reader(ctx).QueryRowContext(ctx, `SELECT COUNT(*) FROM audit_log WHERE `+cond, args...).Scan(&total); err != nil {
		return nil, 0, err
	}
	rows, err := s.reader(ctx).QueryContext(ctx, page(`SELECT id, at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json
		FROM audit_log WHERE `+cond+` ORDER BY at DESC, id DESC`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var es []*wardload.AuditEntry
	for rows.Next() {
		var e wardload.AuditEntry
		var at string
		if err := rows.Scan(&e.ID, &at, &e.UserID, &e.Actor, &e.Action, &e.Entity, &e.EntityID, &e.WardID, &e.Before, &e.After); err != nil {
			return nil, 0, err
		}
		if e.At, err = parseTime(at); err != nil {
			return nil, 0, err
		}
		es = append(es, &e)
	}
	return es, total, rows.Err()
}

// PurgeSecurityAudit exports and then deletes the security events older
// than before, in one write transaction, so that what is exported is
// exactly what is deleted; the action list comes from the domain.
func (s *Store) PurgeSecurityAudit(ctx context.Context, before time.Time, export func(*wardload.AuditEntry) error) (int, error) {
	actions := wardload.SecurityActions()
	cond := `action IN (` + strings.TrimSuffix(strings.Repeat("?,", len(actions)), ",") + `) AND at < ?`
	args := []any{}
	for _, a := range actions {
		args = append(args, a)
	}
	args = append(args, formatTime(before))
	var n int64
	err := s.write(ctx, func(tx *Tx) error {
		rows, err := tx.QueryContext(ctx, `SELECT id, at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json
			FROM audit_log WHERE `+cond+` ORDER BY at, id`, args...)
		if err != nil {
			return err
		}
		defer rows.Close()
		for rows.Next() {
			var e wardload.AuditEntry
			var at string
			if err := rows.Scan(&e.ID, &at, &e.UserID, &e.Actor, &e.Action, &e.Entity, &e.EntityID, &e.WardID, &e.Before, &e.After); err != nil {
				return err
			}
			if e.At, err = parseTime(at); err != nil {
				return err
			}
			if err := export(&e); err != nil {
				return err
			}
		}
		if err := rows.Err(); err != nil {
			return err
		}
		if err := export(nil); err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx, `DELETE FROM audit_log WHERE `+cond, args...)
		if err != nil {
			return err
		}
		if n, err = res.RowsAffected(); err != nil || n == 0 {
			return err
		}
		e, err := wardload.NewAuditPurge(ctx, tx.now, before, int(n))
		if err != nil {
			return err
		}
		return insertAudit(ctx, tx, e)
	})
	if err != nil {
		return 0, err
	}
	return int(n), nil
}
