package sqlite

import (
	"context"
	"database/sql"
	"errors"

	"wardload/internal/wardload"
)

// CreateShiftPattern stores a shift pattern of an existing ward.
func (s *Store) CreateShiftPattern(ctx context.Context, p *wardload.ShiftPattern) error {
	if err := p.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		if err := wardExists(ctx, tx, p.WardID); err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx, `INSERT INTO shift_patterns (ward_id, name, start_minute, nominal_hours) VALUES (?, ?, ?, ?)`,
			p.WardID, p.Name, p.StartMinute, p.NominalHours)
		if err != nil {
			return err
		}
		if p.ID, err = res.LastInsertId(); err != nil {
			return err
		}
		return tx.audit(wardload.ActionShiftCreate, nil, p)
	})
}

// FindShiftPatternByID returns ENOTFOUND if there is no such pattern.
func (s *Store) FindShiftPatternByID(ctx context.Context, id int64) (*wardload.ShiftPattern, error) {
	return findShift(ctx, s.reader(ctx), id)
}

// FindShiftPatterns returns the ward's patterns by start time (then name,
// so that two shifts starting together have a stable order).
func (s *Store) FindShiftPatterns(ctx context.Context, wardID int64) ([]*wardload.ShiftPattern, error) {
	return findShifts(ctx, s.reader(ctx), wardID)
}

func findShifts(ctx context.Context, q querier, wardID int64) ([]*wardload.ShiftPattern, error) {
	rows, err := q.QueryContext(ctx, `SELECT `+shiftColumns+` FROM shift_patterns WHERE ward_id = ? ORDER BY start_minute, name`, wardID)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var ps []*wardload.ShiftPattern
	for rows.Next() {
		p, err := scanShift(rows)
		if err != nil {
			return nil, err
		}
		ps = append(ps, p)
	}
	return ps, rows.Err()
}

// UpdateShiftPattern applies upd in one transaction.
func (s *Store) UpdateShiftPattern(ctx context.Context, id int64, upd wardload.ShiftPatternUpdate) (*wardload.ShiftPattern, error) {
	var out *wardload.ShiftPattern
	err := s.write(ctx, func(tx *Tx) error {
		before, err := findShift(ctx, tx, id)
		if err != nil {
			return err
		}
		p, err := upd.Apply(before, tx.now)
		if err != nil {
			return err
		}
		if p.Retired() && !before.Retired() {
			// Writes are serialised, so the check holds until commit.
			all, err := findShifts(ctx, tx, p.WardID)
			if err != nil {
				return err
			}
			if err := wardload.CheckShiftRetire(all, id); err != nil {
				return err
			}
		}
		if _, err := tx.ExecContext(ctx, `UPDATE shift_patterns SET name = ?, start_minute = ?, nominal_hours = ?, retired_at = ? WHERE id = ?`,
			p.Name, p.StartMinute, p.NominalHours, nullTime(p.RetiredAt), id); err != nil {
			return err
		}
		out = p
		return tx.audit(wardload.RetireAction("shift", before.RetiredAt, p.RetiredAt), before, p)
	})
	if err != nil {
		return nil, err
	}
	return out, nil
}

const shiftColumns = `id, ward_id, name, start_minute, nominal_hours, retired_at`

func scanShift(r scanner) (*wardload.ShiftPattern, error) {
	var p wardload.ShiftPattern
	var retired sql.NullString
	if err := r.Scan(&p.ID, &p.WardID, &p.Name, &p.StartMinute, &p.NominalHours, &retired); err != nil {
		return nil, err
	}
	var err error
	p.RetiredAt, err = parseNullTime(retired)
	return &p, err
}

func findShift(ctx context.Context, q querier, id int64) (*wardload.ShiftPattern, error) {
	p, err := scanShift(q.QueryRowContext(ctx, `SELECT `+shiftColumns+` FROM shift_patterns WHERE id = ?`, id))
	if errors.Is(err, sql.ErrNoRows) {
		return nil, wardload.NotFound("Shift pattern")
	}
	return p, err
}
