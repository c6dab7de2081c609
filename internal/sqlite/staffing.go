package sqlite

import (
	"context"
	"database/sql"
	"strings"

	"wardload/internal/wardload"
)

// SetPlannedStaff stores p as the plan of its dated shift, replacing any
// earlier one; the same counts again write nothing.
func (s *Store) SetPlannedStaff(ctx context.Context, p *wardload.PlannedStaff) (bool, error) {
	if err := p.Validate(0); err != nil {
		return false, err
	}
	out := *p
	changed := false
	err := s.write(ctx, func(tx *Tx) error {
		if _, err := findWard(ctx, tx, p.WardID); wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return wardload.WardNotFound()
		} else if err != nil {
			return err
		}
		sp, err := findShift(ctx, tx, p.ShiftID)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && sp.WardID != p.WardID) {
			return wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "The ward has no such shift.")
		} else if err != nil {
			return err
		}
		before, err := findPlannedStaff(ctx, tx, "ward_id = ? AND date = ? AND shift_id = ?", p.WardID, p.Date.String(), p.ShiftID)
		if err != nil {
			return err
		}
		if len(before) == 1 && before[0].Same(p) {
			out = *before[0]
			return nil
		}
		out.UpdatedAt = tx.now
		if _, err := tx.ExecContext(ctx, `INSERT INTO planned_staff (ward_id, date, shift_id, nurses_planned, support_planned, updated_by, updated_at)
			VALUES (?, ?, ?, ?, ?, ?, ?)
			ON CONFLICT (ward_id, date, shift_id) DO UPDATE SET nurses_planned = excluded.nurses_planned,
				support_planned = excluded.support_planned, updated_by = excluded.updated_by, updated_at = excluded.updated_at`,
			p.WardID, p.Date.String(), p.ShiftID, p.Nurses, nullInt(p.Support), p.UpdatedBy, formatTime(tx.now)); err != nil {
			return err
		}
		changed = true
		var b wardload.Audited
		if len(before) == 1 {
			b = before[0]
		}
		return tx.audit(wardload.ActionStaffingPlan, b, &out)
	})
	if err != nil {
		return false, err
	}
	*p = out
	return changed, nil
}

// FindPlannedStaff returns the plans that match by ward, date and shift.
func (s *Store) FindPlannedStaff(ctx context.Context, f wardload.PlannedStaffFilter) ([]*wardload.PlannedStaff, error) {
	where, args := []string{"1 = 1"}, []any{}
	if f.WardIDs != nil {
		if len(f.WardIDs) == 0 {
			return nil, nil
		}
		marks := strings.Repeat("?, ", len(f.WardIDs))
		where = append(where, "ward_id IN ("+marks[:len(marks)-2]+")")
		for _, id := range f.WardIDs {
			args = append(args, id)
		}
	}
	if f.From != nil {
		where, args = append(where, "date >= ?"), append(args, f.From.String())
	}
	if f.To != nil {
		where, args = append(where, "date <= ?"), append(args, f.To.String())
	}
	return findPlannedStaff(ctx, s.reader(ctx), strings.Join(where, " AND "), args...)
}

func findPlannedStaff(ctx context.Context, q querier, cond string, args ...any) ([]*wardload.PlannedStaff, error) {
	rows, err := q.QueryContext(ctx, `SELECT ward_id, date, shift_id, nurses_planned, support_planned, updated_by, updated_at
		FROM planned_staff WHERE `+cond+` ORDER BY ward_id, date, shift_id`, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var out []*wardload.PlannedStaff
	for rows.Next() {
		var p wardload.PlannedStaff
		var date, at string
		var support sql.NullInt64
		if err := rows.Scan(&p.WardID, &date, &p.ShiftID, &p.Nurses, &support, &p.UpdatedBy, &at); err != nil {
			return nil, err
		}
		if p.Date, err = parseDate(date); err != nil {
			return nil, err
		}
		if p.UpdatedAt, err = parseTime(at); err != nil {
			return nil, err
		}
		if support.Valid {
			n := int(support.Int64)
			p.Support = &n
		}
		out = append(out, &p)
	}
	return out, rows.Err()
}
