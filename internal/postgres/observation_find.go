package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// obsColumns are the columns of a lean read (ObservationFilter.Lean);
// entryColumns the rest of a full one.
const (
	obsColumns   = `id, ward_id, tier_id, date, shift_id, window_hours, care_minutes, excluded, excluded_reason, excluded_by, excluded_at`
	entryColumns = `, entered_by, entered_at, batch_id`
)

// FindObservationByID returns ENOTFOUND if there is no such observation.
func (s *Store) FindObservationByID(ctx context.Context, id int64) (*wardload.Observation, error) {
	return findObservation(ctx, s.pool, id, "")
}

func findObservation(ctx context.Context, q querier, id int64, lock string) (*wardload.Observation, error) {
	os, err := queryObservations(ctx, q, false, `SELECT `+obsColumns+entryColumns+` FROM observations WHERE id = $1`+lock, id)
	return one(os, err, "Observation")
}

// FindObservations returns matches ordered by Date, then ID, and the total
// count ignoring Offset and Limit.
func (s *Store) FindObservations(ctx context.Context, f wardload.ObservationFilter) ([]*wardload.Observation, int, error) {
	var w where
	if f.WardID != nil {
		w.add("ward_id = ?", *f.WardID)
	}
	if f.TierID != nil {
		w.add("tier_id = ?", *f.TierID)
	}
	if f.ShiftID != nil {
		w.add("shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		w.add("date >= ?", dateArg(*f.From))
	}
	if f.To != nil {
		w.add("date <= ?", dateArg(*f.To))
	}
	if f.BatchID != nil {
		w.add("batch_id = ?", *f.BatchID)
	}
	if !f.IncludeExcluded {
		w.conds = append(w.conds, "NOT excluded")
	}
	cols := obsColumns
	if !f.Lean {
		cols += entryColumns
	}
	os, err := queryObservations(ctx, s.pool, f.Lean, `SELECT `+cols+` FROM observations`+w.String()+
		` ORDER BY date, id`+page(f.Offset, f.Limit), w.args...)
	if err != nil {
		return nil, 0, err
	}
	// Without a page the total is the number of rows: spare the count
	// query and its round trip.
	n := len(os)
	if f.Offset > 0 || f.Limit > 0 {
		if err := s.pool.QueryRow(ctx, `SELECT count(*) FROM observations`+w.String(), w.args...).Scan(&n); err != nil {
			return nil, 0, formatError(err)
		}
	}
	return os, n, nil
}

// queryObservations runs a SELECT of obsColumns (and, unless lean,
// entryColumns) and, unless lean, fills in the factors.
func queryObservations(ctx context.Context, q querier, lean bool, sql string, args ...any) ([]*wardload.Observation, error) {
	rows, err := q.Query(ctx, sql, args...)
	if err != nil {
		return nil, formatError(err)
	}
	os, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.Observation, error) {
		var o wardload.Observation
		var d time.Time
		var exAt *time.Time
		dest := []any{&o.ID, &o.WardID, &o.TierID, &d, &o.ShiftID, &o.WindowHours, &o.CareMinutes,
			&o.Excluded, &o.ExcludedReason, &o.ExcludedBy, &exAt}
		if !lean {
			dest = append(dest, &o.EnteredBy, &o.EnteredAt, &o.BatchID)
		}
		err := r.Scan(dest...)
		o.Date, o.ExcludedAt = dateOf(d), timeOf(exAt)
		if !lean {
			o.EnteredAt = o.EnteredAt.UTC()
		}
		return &o, err
	})
	if err != nil || len(os) == 0 || lean {
		return os, formatError(err)
	}
	ids := make([]int64, len(os))
	byID := make(map[int64]*wardload.Observation, len(os))
	for i, o := range os {
		ids[i], byID[o.ID] = o.ID, o
	}
	rows, err = q.Query(ctx, `SELECT observation_id, name, value FROM observation_factors WHERE observation_id = ANY($1)`, ids)
	if err != nil {
		return nil, formatError(err)
	}
	var id int64
	var name string
	var v float64
	_, err = pgx.ForEachRow(rows, []any{&id, &name, &v}, func() error {
		o := byID[id]
		if o.Factors == nil {
			o.Factors = map[string]float64{}
		}
		o.Factors[name] = v
		return nil
	})
	return os, formatError(err)
}

// ExcludeObservation marks an observation as excluded with a reason.
func (s *Store) ExcludeObservation(ctx context.Context, id int64, reason string, by int64) (*wardload.Observation, error) {
	return s.review(ctx, id, wardload.Exclusion(reason, by))
}

// RestoreObservation includes an excluded observation again.
func (s *Store) RestoreObservation(ctx context.Context, id int64, by int64) (*wardload.Observation, error) {
	return s.review(ctx, id, wardload.Restoration())
}

// review locks the observation, makes change to its review state, stores
// it and writes the audit row.
func (s *Store) review(ctx context.Context, id int64, change wardload.ReviewChange) (*wardload.Observation, error) {
	if change.Err() != nil {
		return nil, change.Err()
	}
	var out *wardload.Observation
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		before, err := findObservation(ctx, tx, id, " FOR UPDATE")
		if err != nil {
			return err
		}
		if out, err = change.Apply(before, now); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `UPDATE observations SET excluded = $1, excluded_reason = $2, excluded_by = $3, excluded_at = $4 WHERE id = $5`,
			out.Excluded, out.ExcludedReason, out.ExcludedBy, timeArg(out.ExcludedAt), id); err != nil {
			return err
		}
		return audit(ctx, tx, now, change.Action, before, out)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}
