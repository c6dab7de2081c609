package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateShiftPattern returns EINVALID, ENOTFOUND (ward) or ECONFLICT (name taken in the ward).
func (s *Store) CreateShiftPattern(ctx context.Context, p *wardload.ShiftPattern) error {
	if err := p.Validate(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := wardExists(ctx, tx, p.WardID); err != nil {
			return err
		}
		if err := tx.QueryRow(ctx, `INSERT INTO shift_patterns (ward_id, name, start_minute, nominal_hours)
			VALUES ($1, $2, $3, $4) RETURNING id`,
			p.WardID, p.Name, p.StartMinute, p.NominalHours).Scan(&p.ID); err != nil {
			return err
		}
		return audit(ctx, tx, now, wardload.ActionShiftCreate, nil, p)
	})
}

const shiftColumns = `id, ward_id, name, start_minute, nominal_hours, retired_at`

func scanShift(r pgx.CollectableRow) (*wardload.ShiftPattern, error) {
	var p wardload.ShiftPattern
	var retired *time.Time
	err := r.Scan(&p.ID, &p.WardID, &p.Name, &p.StartMinute, &p.NominalHours, &retired)
	p.RetiredAt = timeOf(retired)
	return &p, err
}

// FindShiftPatternByID returns ENOTFOUND if there is no such pattern.
func (s *Store) FindShiftPatternByID(ctx context.Context, id int64) (*wardload.ShiftPattern, error) {
	return findShift(ctx, s.pool, id, "")
}

func findShift(ctx context.Context, q querier, id int64, lock string) (*wardload.ShiftPattern, error) {
	rows, err := q.Query(ctx, `SELECT `+shiftColumns+` FROM shift_patterns WHERE id = $1`+lock, id)
	if err != nil {
		return nil, formatError(err)
	}
	ps, err := pgx.CollectRows(rows, scanShift)
	return one(ps, formatError(err), "Shift pattern")
}

// FindShiftPatterns returns the ward's patterns ordered by StartMinute.
func (s *Store) FindShiftPatterns(ctx context.Context, wardID int64) ([]*wardload.ShiftPattern, error) {
	return findShifts(ctx, s.pool, wardID)
}

func findShifts(ctx context.Context, q querier, wardID int64) ([]*wardload.ShiftPattern, error) {
	rows, err := q.Query(ctx, `SELECT `+shiftColumns+` FROM shift_patterns WHERE ward_id = $1 ORDER BY start_minute, name`, wardID)
	if err != nil {
		return nil, formatError(err)
	}
	ps, err := pgx.CollectRows(rows, scanShift)
	return ps, formatError(err)
}

// UpdateShiftPattern returns ENOTFOUND, EINVALID or ECONFLICT.
func (s *Store) UpdateShiftPattern(ctx context.Context, id int64, upd wardload.ShiftPatternUpdate) (*wardload.ShiftPattern, error) {
	var out *wardload.ShiftPattern
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		before, err := findShift(ctx, tx, id, " FOR UPDATE")
		if err != nil {
			return err
		}
		p, err := upd.Apply(before, now)
		if err != nil {
			return err
		}
		if p.Retired() && !before.Retired() {
			if err := lockWard(ctx, tx, p.WardID); err != nil {
				return err
			}
			all, err := findShifts(ctx, tx, p.WardID)
			if err != nil {
				return err
			}
			if err := wardload.CheckShiftRetire(all, id); err != nil {
				return err
			}
		}
		if _, err := tx.Exec(ctx, `UPDATE shift_patterns SET name = $1, start_minute = $2, nominal_hours = $3, retired_at = $4 WHERE id = $5`,
			p.Name, p.StartMinute, p.NominalHours, timeArg(p.RetiredAt), id); err != nil {
			return err
		}
		out = p
		return audit(ctx, tx, now, wardload.RetireAction("shift", before.RetiredAt, p.RetiredAt), before, p)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}
