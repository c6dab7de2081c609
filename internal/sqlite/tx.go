package sqlite

import (
	"context"
	"database/sql"
	"fmt"
	"time"

	"wardload/internal/wardload"
)

// querier is what both *sql.DB and *sql.Tx offer, so that lookups can run
// inside a write transaction or on the read pool.
type querier interface {
	ExecContext(ctx context.Context, query string, args ...any) (sql.Result, error)
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
}

// Tx is a write transaction with one fixed timestamp, so that every row a
// change touches (and its audit row) carries the same instant.
type Tx struct {
	*sql.Tx
	ctx context.Context
	now time.Time
}

// outerTx is the transaction Atomically puts in the context, with the
// store it belongs to.
type outerTx struct {
	s  *Store
	tx *sql.Tx
}

type outerTxKey struct{}

// Atomically runs fn in one write transaction: every change fn makes
// through s with the context it is given (and that context's
// descendants) commits when fn returns nil, and none of it is kept when
// fn returns an error or panics. It returns fn's error, or the commit's.
//
// Each store method inside keeps its own all-or-nothing behaviour (a
// savepoint), so a method that fails leaves nothing of its own even if fn
// goes on. Reads on the read pool (the Find methods) do not see the
// uncommitted changes, and other writers wait until fn returns: keep fn
// to a batch of writes such as the demo seed (internal/demo uses it when
// the store offers it). A nested call runs fn in the outer transaction.
func (s *Store) Atomically(ctx context.Context, fn func(ctx context.Context) error) error {
	if o, ok := ctx.Value(outerTxKey{}).(outerTx); ok && o.s == s {
		return fn(ctx)
	}
	stx, err := s.w.BeginTx(ctx, nil)
	if err != nil {
		return formatError(err)
	}
	defer stx.Rollback()
	if err := fn(context.WithValue(ctx, outerTxKey{}, outerTx{s: s, tx: stx})); err != nil {
		return err
	}
	return formatError(stx.Commit())
}

// write runs fn in a write transaction and commits if it returns nil.
// Errors from fn and the driver pass through formatError. Inside
// Atomically, fn runs in the outer transaction under a savepoint instead.
func (s *Store) write(ctx context.Context, fn func(tx *Tx) error) error {
	if o, ok := ctx.Value(outerTxKey{}).(outerTx); ok && o.s == s {
		return s.writeNested(ctx, o.tx, fn)
	}
	stx, err := s.w.BeginTx(ctx, nil)
	if err != nil {
		return formatError(err)
	}
	defer stx.Rollback()
	tx := &Tx{Tx: stx, ctx: ctx, now: s.now().UTC()}
	if err := fn(tx); err != nil {
		return formatError(err)
	}
	return formatError(stx.Commit())
}

// writeNested runs fn in stx under a savepoint, released if fn returns
// nil and rolled back to otherwise, so that a failing method leaves
// nothing in the outer transaction.
func (s *Store) writeNested(ctx context.Context, stx *sql.Tx, fn func(tx *Tx) error) error {
	if _, err := stx.ExecContext(ctx, `SAVEPOINT store_write`); err != nil {
		return formatError(err)
	}
	tx := &Tx{Tx: stx, ctx: ctx, now: s.now().UTC()}
	if err := fn(tx); err != nil {
		// The outer transaction is rolled back by Atomically if this
		// fails too, so only fn's error matters.
		stx.ExecContext(ctx, `ROLLBACK TO store_write`)
		stx.ExecContext(ctx, `RELEASE store_write`)
		return formatError(err)
	}
	_, err := stx.ExecContext(ctx, `RELEASE store_write`)
	return formatError(err)
}

// audit appends in tx the audit rows wardload.NewAudit makes of a change
// by the actor in the context.
func (tx *Tx) audit(action string, before, after wardload.Audited) error {
	es, err := wardload.NewAudit(tx.ctx, tx.now, action, before, after)
	if err != nil {
		return err
	}
	for _, e := range es {
		if err := insertAudit(tx.ctx, tx, e); err != nil {
			return err
		}
	}
	return nil
}

// timeFormat is fixed-width (always nine fractional digits, always UTC
// "Z") so that stored times sort correctly as text and round-trip to the
// nanosecond.
const timeFormat = "2006-01-02T15:04:05.000000000Z"

func formatTime(t time.Time) string { return t.UTC().Format(timeFormat) }

func parseTime(s string) (time.Time, error) {
	t, err := time.Parse(timeFormat, s)
	if err != nil {
		return time.Time{}, fmt.Errorf("stored time %q: %w", s, err)
	}
	return t, nil
}

// nullTime stores the zero time as NULL.
func nullTime(t time.Time) any {
	if t.IsZero() {
		return nil
	}
	return formatTime(t)
}

// parseNullTime reads a nullable time column; NULL is the zero time.
func parseNullTime(s sql.NullString) (time.Time, error) {
	if !s.Valid {
		return time.Time{}, nil
	}
	return parseTime(s.String)
}

func parseDate(s string) (wardload.Date, error) {
	d, err := wardload.ParseDate(s)
	if err != nil {
		return d, fmt.Errorf("stored date %q: %w", s, err)
	}
	return d, nil
}

// nullID stores 0 as NULL for optional references.
func nullID(id int64) any {
	if id == 0 {
		return nil
	}
	return id
}

// page appends LIMIT/OFFSET; SQLite needs a LIMIT to use OFFSET.
func page(q string, offset, limit int) string {
	if limit <= 0 && offset <= 0 {
		return q
	}
	if limit <= 0 {
		limit = -1
	}
	return q + fmt.Sprintf(" LIMIT %d OFFSET %d", limit, max(offset, 0))
}

func boolInt(b bool) int {
	if b {
		return 1
	}
	return 0
}

// reader is where a finder reads: the read pool, or inside Atomically the
// outer transaction, so that a batch sees its own uncommitted writes.
func (s *Store) reader(ctx context.Context) querier {
	if o, ok := ctx.Value(outerTxKey{}).(outerTx); ok && o.s == s {
		return o.tx
	}
	return s.r
}
