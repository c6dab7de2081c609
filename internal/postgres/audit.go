package postgres

import (
	"context"
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

// insertAudit stores es in tx in one pipelined batch and sets their IDs.
func insertAudit(ctx context.Context, tx pgx.Tx, es ...*wardload.AuditEntry) error {
	b := &pgx.Batch{}
	for _, e := range es {
		b.Queue(`
			INSERT INTO audit_log (at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json)
			VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
			e.At.UTC(), e.UserID, e.Actor, e.Action, e.Entity, e.EntityID, e.WardID, e.Before, e.After,
		).QueryRow(func(r pgx.Row) error { return r.Scan(&e.ID) })
	}
	return tx.SendBatch(ctx, b).Close()
}

// audit writes in tx the audit rows wardload.NewAudit makes of a change
// by the actor in ctx.
func audit(ctx context.Context, tx pgx.Tx, now time.Time, action string, before, after wardload.Audited) error {
	es, err := wardload.NewAudit(ctx, now, action, before, after)
	if err != nil {
		return err
	}
	return insertAudit(ctx, tx, es...)
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

// PurgeSecurityAudit exports and then deletes the security events older
// than before. It runs in one REPEATABLE READ transaction, so the DELETE
// sees the snapshot the export read: what is exported is exactly what is
// deleted. The action list comes from the domain.
func (s *Store) PurgeSecurityAudit(ctx context.Context, before time.Time, export func(*wardload.AuditEntry) error) (int, error) {
	tx, err := s.pool.BeginTx(ctx, pgx.TxOptions{IsoLevel: pgx.RepeatableRead})
	if err != nil {
		return 0, err
	}
	defer tx.Rollback(ctx)
	const cond = ` WHERE action = ANY($1) AND at < $2`
	args := []any{wardload.SecurityActions(), before.UTC()}
	rows, err := tx.Query(ctx, `SELECT id, at, user_id, actor, action, entity, entity_id, ward_id, before_json, after_json
		FROM audit_log`+cond+` ORDER BY at, id`, args...)
	if err != nil {
		return 0, formatError(err)
	}
	for rows.Next() {
		var e wardload.AuditEntry
		if err := rows.Scan(&e.ID, &e.At, &e.UserID, &e.Actor, &e.Action, &e.Entity, &e.EntityID, &e.WardID, &e.Before, &e.After); err != nil {
			rows.Close()
			return 0, formatError(err)
		}
		e.At = e.At.UTC()
		if err := export(&e); err != nil {
			rows.Close()
			return 0, err
		}
	}
	if err := rows.Err(); err != nil {
		return 0, formatError(err)
	}
	if err := export(nil); err != nil {
		return 0, err
	}
	tag, err := tx.Exec(ctx, `DELETE FROM audit_log`+cond, args...)
	if err != nil {
		return 0, formatError(err)
	}
	n := int(tag.RowsAffected())
	if n > 0 {
		e, err := wardload.NewAuditPurge(ctx, s.stamp(), before, n)
		if err != nil {
			return 0, err
		}
		if err := insertAudit(ctx, tx, e); err != nil {
			return 0, formatError(err)
		}
	}
	if err := tx.Commit(ctx); err != nil {
		return 0, formatError(err)
	}
	return n, nil
}
