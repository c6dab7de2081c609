package sqlite

import (
	"context"
	"strings"

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
