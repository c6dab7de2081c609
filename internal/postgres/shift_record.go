package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateShiftRecord stores r as the next end-of-shift record revision of
// its ward, date and shift, refused while the dated shift is running.
func (s *Store) CreateShiftRecord(ctx context.Context, r *wardload.ShiftRecord) error {
	if err := r.Validate(0); err != nil {
		return err
	}
	out := *r
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		// Locking the ward row serialises the records of one ward, as
		// census entries are, so two saves get revisions n and n+1.
		ws, err := findWards(ctx, tx, wardload.WardFilter{ID: &r.WardID}, " FOR NO KEY UPDATE")
		if err != nil {
			return err
		}
		if len(ws) == 0 {
			return wardload.WardNotFound()
		}
		p, err := findShift(ctx, tx, r.ShiftID, "")
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			p = nil
		} else if err != nil {
			return err
		}
		if err := r.CheckShift(ws[0], p, now); err != nil {
			return err
		}
		out.EnteredAt = now
		if err := tx.QueryRow(ctx, `
			INSERT INTO shift_records (ward_id, date, shift_id, revision, nurses_worked, support_worked,
				admissions, discharges, care_left_undone, care_category, entered_by, entered_at)
			VALUES ($1, $2, $3, (SELECT coalesce(max(revision), 0) + 1 FROM shift_records WHERE ward_id = $1 AND date = $2 AND shift_id = $3),
				$4, $5, $6, $7, $8, $9, $10, $11)
			RETURNING id, revision`,
			r.WardID, dateArg(r.Date), r.ShiftID, *r.Worked.Nurses, r.Worked.Support, r.Admissions, r.Discharges,
			r.CareLeftUndone, r.CareCategory, r.EnteredBy, now).Scan(&out.ID, &out.Revision); err != nil {
			return err
		}
		return audit(ctx, tx, now, wardload.ActionShiftRecordCreate, nil, &out)
	})
	if err != nil {
		return err
	}
	*r = out
	return nil
}

// FindShiftRecords returns matches by Date descending, shift start, then
// Revision descending, and the total ignoring Offset and Limit.
func (s *Store) FindShiftRecords(ctx context.Context, f wardload.ShiftRecordFilter) ([]*wardload.ShiftRecord, int, error) {
	var w where
	if f.WardID != nil {
		w.add("r.ward_id = ?", *f.WardID)
	}
	if f.ShiftID != nil {
		w.add("r.shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		w.add("r.date >= ?", dateArg(*f.From))
	}
	if f.To != nil {
		w.add("r.date <= ?", dateArg(*f.To))
	}
	if f.LatestOnly {
		w.conds = append(w.conds, `r.revision = (SELECT max(l.revision) FROM shift_records l
			WHERE l.ward_id = r.ward_id AND l.date = r.date AND l.shift_id = r.shift_id)`)
	}
	var n int
	if err := s.pool.QueryRow(ctx, `SELECT count(*) FROM shift_records r`+w.String(), w.args...).Scan(&n); err != nil {
		return nil, 0, formatError(err)
	}
	rows, err := s.pool.Query(ctx, `
		SELECT r.id, r.ward_id, r.date, r.shift_id, r.revision, r.nurses_worked, r.support_worked,
			r.admissions, r.discharges, r.care_left_undone, r.care_category, r.entered_by, r.entered_at
		FROM shift_records r JOIN shift_patterns p ON p.id = r.shift_id`+w.String()+`
		ORDER BY r.date DESC, p.start_minute, r.shift_id, r.revision DESC, r.id`+page(f.Offset, f.Limit), w.args...)
	if err != nil {
		return nil, 0, formatError(err)
	}
	rs, err := pgx.CollectRows(rows, func(row pgx.CollectableRow) (*wardload.ShiftRecord, error) {
		var r wardload.ShiftRecord
		var d time.Time
		var nurses int
		err := row.Scan(&r.ID, &r.WardID, &d, &r.ShiftID, &r.Revision, &nurses, &r.Worked.Support,
			&r.Admissions, &r.Discharges, &r.CareLeftUndone, &r.CareCategory, &r.EnteredBy, &r.EnteredAt)
		r.Worked.Nurses, r.Date, r.EnteredAt = &nurses, dateOf(d), r.EnteredAt.UTC()
		return &r, err
	})
	if err != nil {
		return nil, 0, formatError(err)
	}
	return rs, n, nil
}
