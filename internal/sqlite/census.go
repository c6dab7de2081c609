package sqlite

import (
	"context"
	"strings"

	"wardload/internal/wardload"
)

// CreateCensus stores c as the next revision for its ward, date and shift.
func (s *Store) CreateCensus(ctx context.Context, c *wardload.Census) error {
	if err := c.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error { return createCensus(ctx, tx, c) })
}

// createCensus is CreateCensus inside tx, shared with CreateCensusProjection.
func createCensus(ctx context.Context, tx *Tx, c *wardload.Census) error {
	refs, err := loadWardRefs(ctx, tx, c.WardID)
	if err != nil {
		return err
	}
	counts, err := c.CountsFor(refs)
	if err != nil {
		return err
	}
	var rev int
	if err := tx.QueryRowContext(ctx, `SELECT COALESCE(MAX(revision), 0) + 1 FROM census WHERE ward_id = ? AND date = ? AND shift_id = ?`,
		c.WardID, c.Date.String(), c.ShiftID).Scan(&rev); err != nil {
		return err
	}
	res, err := tx.ExecContext(ctx, `INSERT INTO census (ward_id, date, shift_id, revision, nurses_on_duty, support_on_duty,
		planned_admissions, planned_discharges, entered_by, entered_at)
		VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		c.WardID, c.Date.String(), c.ShiftID, rev, nullInt(c.Staff.Nurses), nullInt(c.Staff.Support),
		nullInt(c.Planned.Admissions), nullInt(c.Planned.Discharges), c.EnteredBy, formatTime(tx.now))
	if err != nil {
		return err
	}
	id, err := res.LastInsertId()
	if err != nil {
		return err
	}
	for _, tc := range counts {
		if _, err := tx.ExecContext(ctx, `INSERT INTO census_counts (census_id, tier_id, patients) VALUES (?, ?, ?)`, id, tc.TierID, tc.Patients); err != nil {
			return err
		}
	}
	stored, err := findOneCensus(ctx, tx, id)
	if err != nil {
		return err
	}
	c.ID, c.Revision, c.EnteredAt = id, rev, tx.now
	return tx.audit(wardload.ActionCensusCreate, nil, stored)
}

// FindCensusByID returns ENOTFOUND if there is no such entry.
func (s *Store) FindCensusByID(ctx context.Context, id int64) (*wardload.Census, error) {
	return findOneCensus(ctx, s.reader(ctx), id)
}

// FindCensus returns matches by date descending, shift start, revision
// descending (then ID, for ties across wards), and the total.
func (s *Store) FindCensus(ctx context.Context, f wardload.CensusFilter) ([]*wardload.Census, int, error) {
	return findCensus(ctx, s.reader(ctx), f, 0)
}

func findOneCensus(ctx context.Context, q querier, id int64) (*wardload.Census, error) {
	cs, _, err := findCensus(ctx, q, wardload.CensusFilter{}, id)
	if err != nil {
		return nil, err
	}
	if len(cs) == 0 {
		return nil, wardload.NotFound("Census entry")
	}
	return cs[0], nil
}

func findCensus(ctx context.Context, q querier, f wardload.CensusFilter, id int64) ([]*wardload.Census, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if id != 0 {
		add("c.id = ?", id)
	}
	if f.WardID != nil {
		add("c.ward_id = ?", *f.WardID)
	}
	if f.ShiftID != nil {
		add("c.shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		add("c.date >= ?", f.From.String())
	}
	if f.To != nil {
		add("c.date <= ?", f.To.String())
	}
	if f.LatestOnly {
		where = append(where, `c.revision = (SELECT MAX(l.revision) FROM census l
			WHERE l.ward_id = c.ward_id AND l.date = c.date AND l.shift_id = c.shift_id)`)
	}
	cond := strings.Join(where, " AND ")
	// Without a page the total is the number of rows: spare the count
	// query (by-ID lookups run on every census and projection page).
	total := -1
	if f.Offset > 0 || f.Limit > 0 {
		if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM census c WHERE `+cond, args...).Scan(&total); err != nil {
			return nil, 0, err
		}
	}
	rows, err := q.QueryContext(ctx, page(`SELECT c.id, c.ward_id, c.date, c.shift_id, c.revision, c.nurses_on_duty, c.support_on_duty,
		c.planned_admissions, c.planned_discharges, c.entered_by, c.entered_at
		FROM census c JOIN shift_patterns p ON p.id = c.shift_id
		WHERE `+cond+` ORDER BY c.date DESC, p.start_minute, c.revision DESC, c.id`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var cs []*wardload.Census
	for rows.Next() {
		var c wardload.Census
		var d, entered string
		if err := rows.Scan(&c.ID, &c.WardID, &d, &c.ShiftID, &c.Revision, &c.Staff.Nurses, &c.Staff.Support,
			&c.Planned.Admissions, &c.Planned.Discharges, &c.EnteredBy, &entered); err != nil {
			return nil, 0, err
		}
		if c.Date, err = parseDate(d); err != nil {
			return nil, 0, err
		}
		if c.EnteredAt, err = parseTime(entered); err != nil {
			return nil, 0, err
		}
		cs = append(cs, &c)
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	rows.Close()
	for _, c := range cs {
		if c.Counts, err = censusCounts(ctx, q, c.ID); err != nil {
			return nil, 0, err
		}
	}
	if total < 0 {
		total = len(cs)
	}
	return cs, total, nil
}

// censusCounts returns the counts of one entry by tier display order.
func censusCounts(ctx context.Context, q querier, censusID int64) ([]wardload.TierCount, error) {
	rows, err := q.QueryContext(ctx, `SELECT n.tier_id, n.patients FROM census_counts n JOIN tiers t ON t.id = n.tier_id
		WHERE n.census_id = ? ORDER BY t.display_order, t.code`, censusID)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	counts := []wardload.TierCount{}
	for rows.Next() {
		var tc wardload.TierCount
		if err := rows.Scan(&tc.TierID, &tc.Patients); err != nil {
			return nil, err
		}
		counts = append(counts, tc)
	}
	return counts, rows.Err()
}
