package postgres

import (
	"context"
	"slices"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateObservations stores obs as one import batch, all or nothing, with
// the checks and messages of wardload.Import.
func (s *Store) CreateObservations(ctx context.Context, obs []*wardload.Observation) (string, error) {
	im, err := wardload.NewImport(obs)
	if err != nil {
		return "", err
	}
	return im.Result(s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := im.CheckRefs(func(id int64) (*wardload.WardRefs, error) { return loadWardRefs(ctx, tx, id, "") }); err != nil {
			return err
		}
		if err := insertObservations(ctx, tx, obs, im.BatchID(), now); err != nil {
			return err
		}
		im.Stored(now)
		return audit(ctx, tx, now, wardload.ActionObservationImport, nil, im)
	}))
}

// observationColumns are the columns insertObservations copies, in the
// order copyObservation gives them.
var observationColumns = []string{"id", "ward_id", "tier_id", "date", "shift_id", "window_hours", "care_minutes", "entered_by", "entered_at", "batch_id"}

// insertObservations stores the rows and then their factor rows with COPY
// (pgx CopyFrom) inside the caller's transaction: an INSERT per row costs a
// parse, a plan and a returned row each, and made imports 20–30 times
// slower than psql's \copy (issue 12). COPY returns no IDs, so the IDs are
// taken from the column's identity sequence first, in one query, and
// given to the rows in file order; COPY may write an identity column
// (only INSERT needs OVERRIDING SYSTEM VALUE). The rows stream to the
// server as they are encoded, with no copy of the batch in between.
func insertObservations(ctx context.Context, tx pgx.Tx, obs []*wardload.Observation, batch string, now time.Time) error {
	// The sequence is looked up once: in the draw's select list the lookup
	// would run for every row and take seven times as long as the draw.
	var seq string
	if err := tx.QueryRow(ctx, `SELECT pg_get_serial_sequence('observations', 'id')`).Scan(&seq); err != nil {
		return err
	}
	rows, err := tx.Query(ctx, `SELECT nextval($1::regclass) FROM generate_series(1, $2::bigint)`, seq, len(obs))
	if err != nil {
		return err
	}
	ids, err := pgx.CollectRows(rows, pgx.RowTo[int64])
	if err != nil {
		return err
	}
	// One query's values come in the order it drew them, ascending; sort
	// anyway, since IDs must follow the file's order.
	slices.Sort(ids)
	factors := 0
	for i, o := range obs {
		o.ID = ids[i]
		factors += len(o.Factors)
	}
	next := 0
	if _, err := tx.CopyFrom(ctx, pgx.Identifier{"observations"}, observationColumns, pgx.CopyFromFunc(func() ([]any, error) {
		if next == len(obs) {
			return nil, nil
		}
		o := obs[next]
		next++
		return []any{o.ID, o.WardID, o.TierID, dateArg(o.Date), o.ShiftID, o.WindowHours, o.CareMinutes, o.EnteredBy, now, batch}, nil
	})); err != nil {
		return err
	}
	if factors == 0 {
		return nil
	}
	var pending []any // the factor rows of one observation, three values each
	next = 0
	_, err = tx.CopyFrom(ctx, pgx.Identifier{"observation_factors"}, []string{"observation_id", "name", "value"}, pgx.CopyFromFunc(func() ([]any, error) {
		for len(pending) == 0 {
			if next == len(obs) {
				return nil, nil
			}
			o := obs[next]
			next++
			for name, v := range o.Factors {
				pending = append(pending, o.ID, name, v)
			}
		}
		row := pending[:3:3]
		pending = pending[3:]
		return row, nil
	}))
	return err
}

// idSet runs a query of one BIGINT column and returns the values as a set.
func idSet(ctx context.Context, q querier, sql string, args ...any) (map[int64]bool, error) {
	rows, err := q.Query(ctx, sql, args...)
	if err != nil {
		return nil, err
	}
	ids, err := pgx.CollectRows(rows, pgx.RowTo[int64])
	if err != nil {
		return nil, err
	}
	set := make(map[int64]bool, len(ids))
	for _, id := range ids {
		set[id] = true
	}
	return set, nil
}
