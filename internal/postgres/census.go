package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateCensus stores c as the next revision for its ward, date and shift.
func (s *Store) CreateCensus(ctx context.Context, c *wardload.Census) error {
	if err := c.Validate(); err != nil {
		return err
	}
	var out wardload.Census
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) (err error) {
		out, err = createCensus(ctx, tx, now, c)
		return err
	})
	if err != nil {
		return err
	}
	*c = out
	return nil
}

// createCensus is CreateCensus inside tx, shared with
// CreateCensusProjection. It returns the stored entry and leaves c as it is.
func createCensus(ctx context.Context, tx pgx.Tx, now time.Time, c *wardload.Census) (wardload.Census, error) {
	var out wardload.Census
	// Locking the ward row serialises census entries of one ward, so two
	// charge nurses saving at once get revisions n and n+1 rather than a
	// unique violation. NO KEY UPDATE still lets other rows refer to it.
	refs, err := loadWardRefs(ctx, tx, c.WardID, " FOR NO KEY UPDATE")
	if err != nil {
		return out, err
	}
	counts, err := c.CountsFor(refs)
	if err != nil {
		return out, err
	}
	out = wardload.Census{WardID: c.WardID, Date: c.Date, ShiftID: c.ShiftID, Counts: counts, Staff: c.Staff, Planned: c.Planned, EnteredBy: c.EnteredBy, EnteredAt: now}
	if err := tx.QueryRow(ctx, `
		INSERT INTO census (ward_id, date, shift_id, revision, nurses_on_duty, support_on_duty,
			planned_admissions, planned_discharges, entered_by, entered_at)
		VALUES ($1, $2, $3, (SELECT coalesce(max(revision), 0) + 1 FROM census WHERE ward_id = $1 AND date = $2 AND shift_id = $3), $4, $5, $6, $7, $8, $9)
		RETURNING id, revision`,
		c.WardID, dateArg(c.Date), c.ShiftID, c.Staff.Nurses, c.Staff.Support, c.Planned.Admissions, c.Planned.Discharges, c.EnteredBy, now).Scan(&out.ID, &out.Revision); err != nil {
		return out, err
	}
	for _, tc := range counts {
		if _, err := tx.Exec(ctx, `INSERT INTO census_counts (census_id, tier_id, patients) VALUES ($1, $2, $3)`,
			out.ID, tc.TierID, tc.Patients); err != nil {
			return out, err
		}
	}
	return out, audit(ctx, tx, now, wardload.ActionCensusCreate, nil, &out)
}

// FindCensusByID returns ENOTFOUND if there is no such entry.
func (s *Store) FindCensusByID(ctx context.Context, id int64) (*wardload.Census, error) {
	cs, err := s.findCensus(ctx, " WHERE c.id = $1", "", id)
	return one(cs, err, "Census entry")
}

// FindCensus returns matches by Date descending, shift start, then
// Revision descending, and the total ignoring Offset and Limit.
func (s *Store) FindCensus(ctx context.Context, f wardload.CensusFilter) ([]*wardload.Census, int, error) {
	var w where
	if f.WardID != nil {
		w.add("c.ward_id = ?", *f.WardID)
	}
	if f.ShiftID != nil {
		w.add("c.shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		w.add("c.date >= ?", dateArg(*f.From))
	}
	if f.To != nil {
		w.add("c.date <= ?", dateArg(*f.To))
	}
	if f.LatestOnly {
		w.conds = append(w.conds, `c.revision = (SELECT max(l.revision) FROM census l
			WHERE l.ward_id = c.ward_id AND l.date = c.date AND l.shift_id = c.shift_id)`)
	}
	var n int
	if err := s.pool.QueryRow(ctx, `SELECT count(*) FROM census c`+w.String(), w.args...).Scan(&n); err != nil {
		return nil, 0, formatError(err)
	}
	cs, err := s.findCensus(ctx, w.String(), page(f.Offset, f.Limit), w.args...)
	if err != nil {
		return nil, 0, err
	}
	return cs, n, nil
}

func (s *Store) findCensus(ctx context.Context, where, page string, args ...any) ([]*wardload.Census, error) {
	rows, err := s.pool.Query(ctx, `
		SELECT c.id, c.ward_id, c.date, c.shift_id, c.revision, c.nurses_on_duty, c.support_on_duty,
			c.planned_admissions, c.planned_discharges, c.entered_by, c.entered_at
		FROM census c JOIN shift_patterns p ON p.id = c.shift_id`+where+`
		ORDER BY c.date DESC, p.start_minute, c.shift_id, c.revision DESC, c.id`+page, args...)
	if err != nil {
		return nil, formatError(err)
	}
	cs, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.Census, error) {
		var c wardload.Census
		var d time.Time
		err := r.Scan(&c.ID, &c.WardID, &d, &c.ShiftID, &c.Revision, &c.Staff.Nurses, &c.Staff.Support,
			&c.Planned.Admissions, &c.Planned.Discharges, &c.EnteredBy, &c.EnteredAt)
		c.Date, c.EnteredAt = dateOf(d), c.EnteredAt.UTC()
		return &c, err
	})
	if err != nil || len(cs) == 0 {
		return cs, formatError(err)
	}
	ids := make([]int64, len(cs))
	for i, c := range cs {
		ids[i] = c.ID
	}
	counts, err := censusCounts(ctx, s.pool, ids)
	if err != nil {
		return nil, formatError(err)
	}
	for _, c := range cs {
		c.Counts = counts[c.ID] // nil for an entry without counts
	}
	return cs, nil
}

// censusCounts returns the counts of the given census entries by census ID,
// each by tier display order.
func censusCounts(ctx context.Context, q querier, censusIDs []int64) (map[int64][]wardload.TierCount, error) {
	rows, err := q.Query(ctx, `
		SELECT k.census_id, k.tier_id, k.patients FROM census_counts k JOIN tiers t ON t.id = k.tier_id
		WHERE k.census_id = ANY($1) ORDER BY k.census_id, t.display_order, t.code`, censusIDs)
	if err != nil {
		return nil, err
	}
	counts := make(map[int64][]wardload.TierCount, len(censusIDs))
	var id int64
	var tc wardload.TierCount
	_, err = pgx.ForEachRow(rows, []any{&id, &tc.TierID, &tc.Patients}, func() error {
		counts[id] = append(counts[id], tc)
		return nil
	})
	return counts, err
}
