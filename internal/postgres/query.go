package postgres

import (
	"context"
	"fmt"
	"strings"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"

	"wardload/internal/wardload"
)

// where builds a WHERE clause with numbered placeholders. Conditions use
// "?" for their one argument; add renumbers it.
type where struct {
	conds []string
	args  []any
}

func (w *where) add(cond string, arg any) {
	w.args = append(w.args, arg)
	w.conds = append(w.conds, strings.Replace(cond, "?", fmt.Sprintf("$%d", len(w.args)), 1))
}

func (w *where) String() string {
	if len(w.conds) == 0 {
		return ""
	}
	return " WHERE " + strings.Join(w.conds, " AND ")
}

// page returns a LIMIT/OFFSET clause; Limit 0 means no limit.
func page(offset, limit int) string {
	var b strings.Builder
	if limit > 0 {
		fmt.Fprintf(&b, " LIMIT %d", limit)
	}
	if offset > 0 {
		fmt.Fprintf(&b, " OFFSET %d", offset)
	}
	return b.String()
}

// dateArg converts a civil date to the time.Time pgx encodes as DATE: UTC
// midnight, so no zone can move it to a neighbouring day.
func dateArg(d wardload.Date) time.Time {
	return time.Date(d.Year, d.Month, d.Day, 0, 0, 0, 0, time.UTC)
}

// dateOf converts a scanned DATE (pgx gives UTC midnight) back.
func dateOf(t time.Time) wardload.Date { return wardload.DateOf(t.UTC()) }

// timeArg stores a zero time as NULL.
func timeArg(t time.Time) *time.Time {
	if t.IsZero() {
		return nil
	}
	u := t.UTC().Truncate(time.Microsecond)
	return &u
}

// timeOf turns a nullable TIMESTAMPTZ into a UTC time, zero for NULL.
func timeOf(t *time.Time) time.Time {
	if t == nil {
		return time.Time{}
	}
	return t.UTC()
}

// querier is what a pool and a transaction have in common, so that finders
// can run inside a change's transaction or on their own.
type querier interface {
	Exec(ctx context.Context, sql string, args ...any) (pgconn.CommandTag, error)
	Query(ctx context.Context, sql string, args ...any) (pgx.Rows, error)
	QueryRow(ctx context.Context, sql string, args ...any) pgx.Row
}

// one returns the only row of a finder's result or ENOTFOUND naming what.
func one[T any](items []T, err error, what string) (T, error) {
	var zero T
	if err != nil {
		return zero, err
	}
	if len(items) == 0 {
		return zero, wardload.NotFound(what)
	}
	return items[0], nil
}
