package sqlite

import (
	"context"
	"database/sql"
	"strings"

	"wardload/internal/wardload"
)

// CreateObservations stores obs as one batch, all or nothing, with the
// checks and messages of wardload.Import.
func (s *Store) CreateObservations(ctx context.Context, obs []*wardload.Observation) (string, error) {
	im, err := wardload.NewImport(obs)
	if err != nil {
		return "", err
	}
	return im.Result(s.write(ctx, func(tx *Tx) error {
		if err := im.CheckRefs(func(id int64) (*wardload.WardRefs, error) { return loadWardRefs(ctx, tx, id) }); err != nil {
			return err
		}
		if err := insertObservations(ctx, tx, obs, im.BatchID()); err != nil {
			return err
		}
		im.Stored(tx.now)
		return tx.audit(wardload.ActionObservationImport, nil, im)
	}))
}

// FindObservationByID returns ENOTFOUND if there is no such observation.
func (s *Store) FindObservationByID(ctx context.Context, id int64) (*wardload.Observation, error) {
	return findObservation(ctx, s.reader(ctx), id)
}

// FindObservations returns matches by date, then ID, and the total.
func (s *Store) FindObservations(ctx context.Context, f wardload.ObservationFilter) ([]*wardload.Observation, int, error) {
	return findObservations(ctx, s.reader(ctx), f, 0)
}

// ExcludeObservation marks an observation as excluded; it never deletes.
func (s *Store) ExcludeObservation(ctx context.Context, id int64, reason string, by int64) (*wardload.Observation, error) {
	return s.review(ctx, id, wardload.Exclusion(reason, by))
}

// RestoreObservation includes an excluded observation again.
func (s *Store) RestoreObservation(ctx context.Context, id int64, by int64) (*wardload.Observation, error) {
	return s.review(ctx, id, wardload.Restoration())
}

// review makes change to observation id's review state and audits it.
func (s *Store) review(ctx context.Context, id int64, change wardload.ReviewChange) (*wardload.Observation, error) {
	if err := change.Err(); err != nil {
		return nil, err
	}
	var out *wardload.Observation
	err := s.write(ctx, func(tx *Tx) error {
		before, err := findObservation(ctx, tx, id)
		if err != nil {
			return err
		}
		o, err := change.Apply(before, tx.now)
		if err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE observations SET excluded = ?, excluded_reason = ?, excluded_by = ?, excluded_at = ? WHERE id = ?`,
			boolInt(o.Excluded), o.ExcludedReason, o.ExcludedBy, nullTime(o.ExcludedAt), id); err != nil {
			return err
		}
		out = o
		return tx.audit(change.Action, before, o)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

func findObservation(ctx context.Context, q querier, id int64) (*wardload.Observation, error) {
	os, _, err := findObservations(ctx, q, wardload.ObservationFilter{IncludeExcluded: true}, id)
	if err != nil {
		return nil, err
	}
	if len(os) == 0 {
		return nil, wardload.NotFound("Observation")
	}
	return os[0], nil
}

// findObservations serves both lookups; id, when not 0, selects one row.
func findObservations(ctx context.Context, q querier, f wardload.ObservationFilter, id int64) ([]*wardload.Observation, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if id != 0 {
		add("id = ?", id)
	}
	if f.WardID != nil {
		add("ward_id = ?", *f.WardID)
	}
	if f.TierID != nil {
		add("tier_id = ?", *f.TierID)
	}
	if f.ShiftID != nil {
		add("shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		add("date >= ?", f.From.String())
	}
	if f.To != nil {
		add("date <= ?", f.To.String())
	}
	if f.BatchID != nil {
		add("batch_id = ?", *f.BatchID)
	}
	if !f.IncludeExcluded {
		where = append(where, "excluded = 0")
	}
	cond := strings.Join(where, " AND ")
	// Without a page the total is the number of rows: spare the count
	// query (exclude and restore look one up by ID).
	total := -1
	if f.Offset > 0 || f.Limit > 0 {
		if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM observations WHERE `+cond, args...).Scan(&total); err != nil {
			return nil, 0, err
		}
	}
	// A lean read leaves out the entry columns and the factors.
	cols := `id, ward_id, tier_id, date, shift_id, window_hours, care_minutes, excluded, excluded_reason, excluded_by, excluded_at`
	if !f.Lean {
		cols += `, entered_by, entered_at, batch_id`
	}
	rows, err := q.QueryContext(ctx, page(`SELECT `+cols+` FROM observations WHERE `+cond+` ORDER BY date, id`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var os []*wardload.Observation
	byID := map[int64]*wardload.Observation{}
	for rows.Next() {
		var o wardload.Observation
		var d, entered string
		var excludedAt sql.NullString
		dest := []any{&o.ID, &o.WardID, &o.TierID, &d, &o.ShiftID, &o.WindowHours, &o.CareMinutes,
			&o.Excluded, &o.ExcludedReason, &o.ExcludedBy, &excludedAt}
		if !f.Lean {
			dest = append(dest, &o.EnteredBy, &entered, &o.BatchID)
		}
		if err := rows.Scan(dest...); err != nil {
			return nil, 0, err
		}
		if o.Date, err = parseDate(d); err != nil {
			return nil, 0, err
		}
		if o.ExcludedAt, err = parseNullTime(excludedAt); err != nil {
			return nil, 0, err
		}
		os = append(os, &o)
		if f.Lean {
			continue
		}
		if o.EnteredAt, err = parseTime(entered); err != nil {
			return nil, 0, err
		}
		byID[o.ID] = &o
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	rows.Close()
	if !f.Lean {
		if err := loadFactors(ctx, q, os, byID); err != nil {
			return nil, 0, err
		}
	}
	if total < 0 {
		total = len(os)
	}
	return os, total, nil
}

// loadFactors fills Factors for os, a few hundred IDs per query to stay
// below SQLite's limit on bound parameters.
func loadFactors(ctx context.Context, q querier, os []*wardload.Observation, byID map[int64]*wardload.Observation) error {
	const chunk = 500
	for start := 0; start < len(os); start += chunk {
		part := os[start:min(start+chunk, len(os))]
		args := make([]any, len(part))
		for i, o := range part {
			args[i] = o.ID
		}
		marks := strings.TrimSuffix(strings.Repeat("?,", len(part)), ",")
		rows, err := q.QueryContext(ctx, `SELECT observation_id, name, value FROM observation_factors WHERE observation_id IN (`+marks+`)`, args...)
		if err != nil {
			return err
		}
		for rows.Next() {
			var id int64
			var name string
			var v float64
			if err := rows.Scan(&id, &name, &v); err != nil {
				rows.Close()
				return err
			}
			o := byID[id]
			if o.Factors == nil {
				o.Factors = map[string]float64{}
			}
			o.Factors[name] = v
		}
		err = rows.Err()
		rows.Close()
		if err != nil {
			return err
		}
	}
	return nil
}
