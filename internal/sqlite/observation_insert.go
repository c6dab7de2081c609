package sqlite

import (
	"context"
	"database/sql"
	"slices"
	"strconv"
	"strings"

	"wardload/internal/wardload"
)

// rowsPerInsert is how many rows one INSERT of an import carries. Each
// statement passes through database/sql and the driver once, whatever its
// number of rows, so a statement per row spends most of an import's time
// there (issue 12); 100 rows of 10 values stay far below SQLite's limit
// on bound parameters (32,766).
const rowsPerInsert = 100

// bulkInsert writes rows of one table in statements of up to rowsPerInsert
// rows, preparing each statement text once per import: the full-sized one
// and, at the end, one for the rest. Values every row shares (the batch's
// time and ID) are bound once per statement as ?1, ?2, …, since the driver
// copies a text value each time it binds one.
type bulkInsert struct {
	ctx    context.Context
	tx     *Tx
	head   string // "INSERT INTO t (a, b, c) VALUES "
	one    string // "(?1, ?, ?)"
	shared int    // values every row shares, at the front of args
	width  int    // values per row
	args   []any
	full   *sql.Stmt
}

// newBulkInsert writes the columns shared, with sharedVals on every row,
// and cols, whose values add takes.
func newBulkInsert(ctx context.Context, tx *Tx, table string, shared []string, sharedVals []any, cols []string) *bulkInsert {
	marks := make([]string, 0, len(shared)+len(cols))
	for i := range shared {
		marks = append(marks, "?"+strconv.Itoa(i+1))
	}
	for range cols {
		marks = append(marks, "?")
	}
	args := make([]any, 0, len(shared)+rowsPerInsert*len(cols))
	return &bulkInsert{ctx: ctx, tx: tx, shared: len(shared), width: len(cols),
		head: "INSERT INTO " + table + " (" + strings.Join(append(slices.Clone(shared), cols...), ", ") + ") VALUES ",
		one:  "(" + strings.Join(marks, ", ") + ")",
		args: append(args, sharedVals...)}
}

func (b *bulkInsert) text(rows int) string {
	return b.head + strings.TrimSuffix(strings.Repeat(b.one+", ", rows), ", ")
}

// add queues one row's values and writes the queue once it is full.
func (b *bulkInsert) add(vals ...any) error {
	b.args = append(b.args, vals...)
	if len(b.args) < b.shared+rowsPerInsert*b.width {
		return nil
	}
	if b.full == nil {
		st, err := b.tx.PrepareContext(b.ctx, b.text(rowsPerInsert))
		if err != nil {
			return err
		}
		b.full = st
	}
	_, err := b.full.ExecContext(b.ctx, b.args...)
	b.args = b.args[:b.shared]
	return err
}

// flush writes the queued rows.
func (b *bulkInsert) flush() error {
	if len(b.args) == b.shared {
		return nil
	}
	_, err := b.tx.ExecContext(b.ctx, b.text((len(b.args)-b.shared)/b.width), b.args...)
	b.args = b.args[:b.shared]
	return err
}

// close closes the prepared statement, if any.
func (b *bulkInsert) close() {
	if b.full != nil {
		b.full.Close()
	}
}

// insertObservations stores obs and their factor rows and sets their IDs.
// The IDs are given here, from the largest stored one up, in file order:
// that is the ID SQLite itself would give each row (a rowid table without
// AUTOINCREMENT takes the largest rowid plus one), and knowing them lets
// the factor rows go in bulk as well. The write transaction holds the
// database's one write lock, so no other writer can take an ID meanwhile.
func insertObservations(ctx context.Context, tx *Tx, obs []*wardload.Observation, batch string) error {
	var last int64
	if err := tx.QueryRowContext(ctx, `SELECT COALESCE(MAX(id), 0) FROM observations`).Scan(&last); err != nil {
		return err
	}
	rows := newBulkInsert(ctx, tx, "observations", []string{"entered_at", "batch_id"}, []any{formatTime(tx.now), batch},
		[]string{"id", "ward_id", "tier_id", "date", "shift_id", "window_hours", "care_minutes", "entered_by"})
	factors := newBulkInsert(ctx, tx, "observation_factors", nil, nil, []string{"observation_id", "name", "value"})
	defer rows.close()
	defer factors.close()
	for i, o := range obs {
		o.ID = last + int64(i) + 1
		if err := rows.add(o.ID, o.WardID, o.TierID, o.Date.String(), o.ShiftID, o.WindowHours, o.CareMinutes, o.EnteredBy); err != nil {
			return err
		}
	}
	if err := rows.flush(); err != nil {
		return err
	}
	// Factors after every observation row: their key refers to it.
	for _, o := range obs {
		for k, v := range o.Factors {
			if err := factors.add(o.ID, k, v); err != nil {
				return err
			}
		}
	}
	return factors.flush()
}
