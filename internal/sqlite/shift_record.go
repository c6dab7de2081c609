package sqlite

import (
	"context"
	"strings"

	"wardload/internal/wardload"
)

// CreateShiftRecord stores r as the next end-of-shift record revision of
// its ward, date and shift, refused while the dated shift is running.
func (s *Store) CreateShiftRecord(ctx context.Context, r *wardload.ShiftRecord) error {
	if err := r.Validate(0); err != nil {
		return err
	}
	r0 := *r // a failed transaction leaves r as it was
	err := s.write(ctx, func(tx *Tx) error {
		w, err := findWard(ctx, tx, r.WardID)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return wardload.WardNotFound()
		} else if err != nil {
			return err
		}
		p, err := findShift(ctx, tx, r.ShiftID)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			p = nil
		} else if err != nil {
			return err
		}
		if err := r.CheckShift(w, p, tx.now); err != nil {
			return err
		}
		var rev int
		if err := tx.QueryRowContext(ctx, `SELECT COALESCE(MAX(revision), 0) + 1 FROM shift_records WHERE ward_id = ? AND date = ? AND shift_id = ?`,
			r.WardID, r.Date.String(), r.ShiftID).Scan(&rev); err != nil {
			return err
		}
		res, err := tx.ExecContext(ctx, `INSERT INTO shift_records (ward_id, date, shift_id, revision, nurses_worked, support_worked,
			admissions, discharges, care_left_undone, care_category, entered_by, entered_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
			r.WardID, r.Date.String(), r.ShiftID, rev, *r.Worked.Nurses, nullInt(r.Worked.Support),
			r.Admissions, r.Discharges, boolInt(r.CareLeftUndone), r.CareCategory, r.EnteredBy, formatTime(tx.now))
		if err != nil {
			return err
		}
		id, err := res.LastInsertId()
		if err != nil {
			return err
		}
		r.ID, r.Revision, r.EnteredAt = id, rev, tx.now
		return tx.audit(wardload.ActionShiftRecordCreate, nil, r)
	})
	if err != nil {
		*r = r0
	}
	return err
}

// FindShiftRecords returns matches by date descending, shift start,
// revision descending, and the total.
func (s *Store) FindShiftRecords(ctx context.Context, f wardload.ShiftRecordFilter) ([]*wardload.ShiftRecord, int, error) {
	q := s.reader(ctx)
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if f.WardID != nil {
		add("r.ward_id = ?", *f.WardID)
	}
	if f.ShiftID != nil {
		add("r.shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		add("r.date >= ?", f.From.String())
	}
	if f.To != nil {
		add("r.date <= ?", f.To.String())
	}
	if f.LatestOnly {
		where = append(where, `r.revision = (SELECT MAX(l.revision) FROM shift_records l
			WHERE l.ward_id = r.ward_id AND l.date = r.date AND l.shift_id = r.shift_id)`)
	}
	cond := strings.Join(where, " AND ")
	var total int
	if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM shift_records r WHERE `+cond, args...).Scan(&total); err != nil {
		return nil, 0, err
	}
	rows, err := q.QueryContext(ctx, page(`SELECT r.id, r.ward_id, r.date, r.shift_id, r.revision, r.nurses_worked, r.support_worked,
		r.admissions, r.discharges, r.care_left_undone, r.care_category, r.entered_by, r.entered_at
		FROM shift_records r JOIN shift_patterns p ON p.id = r.shift_id
		WHERE `+cond+` ORDER BY r.date DESC, p.start_minute, r.revision DESC, r.id`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var rs []*wardload.ShiftRecord
	for rows.Next() {
		var r wardload.ShiftRecord
		var d, entered string
		var nurses int
		if err := rows.Scan(&r.ID, &r.WardID, &d, &r.ShiftID, &r.Revision, &nurses, &r.Worked.Support,
			&r.Admissions, &r.Discharges, &r.CareLeftUndone, &r.CareCategory, &r.EnteredBy, &entered); err != nil {
			return nil, 0, err
		}
		r.Worked.Nurses = &nurses
		if r.Date, err = parseDate(d); err != nil {
			return nil, 0, err
		}
		if r.EnteredAt, err = parseTime(entered); err != nil {
			return nil, 0, err
		}
		rs = append(rs, &r)
	}
	return rs, total, rows.Err()
}
