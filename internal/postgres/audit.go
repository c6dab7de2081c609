package postgres

import (
	"context"
	"encoding/json"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// AppendAudit stores e and sets ID and, if zero, At.
func (s *Store) AppendAudit(ctx context.Context, e *wardload.AuditEntry) error {
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if e.At.IsZero() {
			e.At = now
		}
		return insertAudit(ctx, tx, e)
	})
}

func insertAudit(ctx context.Context, tx pgx.Tx, e *wardload.AuditEntry) error {
	return tx.QueryRow(ctx, `
		INSERT INTO audit_log (at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json)
		VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
		e.At.UTC(), e.UserID, e.Actor, e.Action, e.Entity, e.EntityID, e.WardID, e.Before, e.After,
	).Scan(&e.ID)
}

// audit writes the audit row of a change made in tx by the actor in ctx.
// before and after are domain values (nil for none) turned into JSON; the
// callers pass views without password or token hashes.
func audit(ctx context.Context, tx pgx.Tx, now time.Time, action, entity string, entityID, wardID int64, before, after any) error {
	a := wardload.ActorFrom(ctx)
	b, err := auditJSON(before)
	if err != nil {
		return err
	}
	af, err := auditJSON(after)
	if err != nil {
		return err
	}
	return insertAudit(ctx, tx, &wardload.AuditEntry{
		At: now, UserID: a.UserID, Actor: a.Name, Action: action, Entity: entity,
		EntityID: entityID, WardID: wardID, Before: b, After: af,
	})
}

func auditJSON(v any) (string, error) {
	if v == nil {
		return "", nil
	}
	b, err := json.Marshal(v)
	if err != nil {
		return "", err
	}
	return string(b), nil
}

// FindAudit returns matches newest first and the total count.
func (s *Store) FindAudit(ctx context.Context, f wardload.AuditFilter) ([]*wardload.AuditEntry, int, error) {
	var w where
	if len(f.WardIDs) > 0 {
		w.add("ward_id = ANY(?)", f.WardIDs)
	}
	if f.UserID != nil {
		w.add("user_id = ?", *f.UserID)
	}
	if f.Action != nil {
		w.add("action = ?", *f.Action)
	}
	if f.Entity != nil {
		w.add("entity = ?", *f.Entity)
	}
	if f.From != nil {
		w.add("at >= ?", f.From.UTC())
	}
	if f.To != nil {
		w.add("at < ?", f.To.UTC())
	}
	var n int
	if err := s.pool.QueryRow(ctx, `SELECT count(*) FROM audit_log`+w.String(), w.args...).Scan(&n); err != nil {
		return nil, 0, formatError(err)
	}
	rows, err := s.pool.Query(ctx, `
		SELECT id, at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json
		FROM audit_log`+w.String()+` ORDER BY at DESC, id DESC`+page(f.Offset, f.Limit), w.args...)
	if err != nil {
		return nil, 0, formatError(err)
	}
	out, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.AuditEntry, error) {
		var e wardload.AuditEntry
		err := r.Scan(&e.ID, &e.At, &e.UserID, &e.Actor, &e.Action, &e.Entity, &e.EntityID, &e.WardID, &e.Before, &e.After)
		e.At = e.At.UTC()
		return &e, err
	})
	if err != nil {
		return nil, 0, formatError(err)
	}
	return out, n, nil
}
