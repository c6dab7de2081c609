package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

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
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		// Locking the ward row serialises the plans of one ward, so the
		// audit's before is the value each save replaced.
		ws, err := findWards(ctx, tx, wardload.WardFilter{ID: &p.WardID}, " FOR NO KEY UPDATE")
		if err != nil {
			return err
		}
		if len(ws) == 0 {
			return wardload.WardNotFound()
		}
		sp, err := findShift(ctx, tx, p.ShiftID, "")
		if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && sp.WardID != p.WardID) {
			return wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "The ward has no such shift.")
		} else if err != nil {
			return err
		}
		before, err := findPlannedStaff(ctx, tx, ` WHERE ward_id = $1 AND date = $2 AND shift_id = $3`, p.WardID, dateArg(p.Date), p.ShiftID)
		if err != nil {
			return err
		}
		if len(before) == 1 && before[0].Same(p) {
			out = *before[0]
			return nil
		}
		out.UpdatedAt = now
		if _, err := tx.Exec(ctx, `INSERT INTO planned_staff (ward_id, date, shift_id, nurses_planned, support_planned, updated_by, updated_at)
			VALUES ($1, $2, $3, $4, $5, $6, $7)
			ON CONFLICT (ward_id, date, shift_id) DO UPDATE SET nurses_planned = excluded.nurses_planned,
				support_planned = excluded.support_planned, updated_by = excluded.updated_by, updated_at = excluded.updated_at`,
			p.WardID, dateArg(p.Date), p.ShiftID, p.Nurses, p.Support, p.UpdatedBy, now); err != nil {
			return err
		}
		changed = true
		var b wardload.Audited
		if len(before) == 1 {
			b = before[0]
		}
		return audit(ctx, tx, now, wardload.ActionStaffingPlan, b, &out)
	})
	if err != nil {
		return false, err
	}
	*p = out
	return changed, nil
}

// FindPlannedStaff returns the plans that match by ward, date and shift.
func (s *Store) FindPlannedStaff(ctx context.Context, f wardload.PlannedStaffFilter) ([]*wardload.PlannedStaff, error) {
	var w where
	if f.WardIDs != nil {
		if len(f.WardIDs) == 0 {
			return nil, nil
		}
		w.add("ward_id = ANY(?)", f.WardIDs)
	}
	if f.From != nil {
		w.add("date >= ?", dateArg(*f.From))
	}
	if f.To != nil {
		w.add("date <= ?", dateArg(*f.To))
	}
	return findPlannedStaff(ctx, s.pool, w.String(), w.args...)
}

func findPlannedStaff(ctx context.Context, q querier, cond string, args ...any) ([]*wardload.PlannedStaff, error) {
	rows, err := q.Query(ctx, `SELECT ward_id, date, shift_id, nurses_planned, support_planned, updated_by, updated_at
		FROM planned_staff`+cond+` ORDER BY ward_id, date, shift_id`, args...)
	if err != nil {
		return nil, formatError(err)
	}
	ps, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.PlannedStaff, error) {
		var p wardload.PlannedStaff
		var date time.Time
		err := r.Scan(&p.WardID, &date, &p.ShiftID, &p.Nurses, &p.Support, &p.UpdatedBy, &p.UpdatedAt)
		p.Date, p.UpdatedAt = dateOf(date), p.UpdatedAt.UTC()
		return &p, err
	})
	return ps, formatError(err)
}
