package postgres

import (
	"context"
	"strconv"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateCensusProjection stores c as the next census revision and p as its
// projection in one transaction.
func (s *Store) CreateCensusProjection(ctx context.Context, c *wardload.Census, p *wardload.Projection) error {
	if err := wardload.ValidateCensusProjection(c, p); err != nil {
		return err
	}
	var census wardload.Census
	var stored *wardload.Projection
	err := s.inTx(ctx, func(tx pgx.Tx, now time.Time) (err error) {
		if census, err = createCensus(ctx, tx, now, c); err != nil {
			return err
		}
		out := *p
		out.CensusID, out.CensusRevision, out.CreatedAt = census.ID, census.Revision, now
		if err := tx.QueryRow(ctx, `INSERT INTO projections (ward_id, census_id, census_revision, date, shift_id, shift_name,
			start_at, end_at, shift_hours, total_patients, cover_level, expected_nurse_hours, cover_nurse_hours,
			band_low_nurse_hours, band_high_nurse_hours, nurses_cover, floor_nurses, recommended, decided_by,
			method_version, seed, draws, input_json, result_json, created_by, created_at)
			VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17, $18, $19, $20, $21, $22, $23, $24, $25, $26)
			RETURNING id`,
			out.WardID, out.CensusID, out.CensusRevision, dateArg(out.Date), out.ShiftID, out.ShiftName,
			out.Start.UTC(), out.End.UTC(), out.ShiftHours, out.TotalPatients, out.CoverLevel, out.ExpectedNurseHours, out.CoverNurseHours,
			out.BandLowNurseHours, out.BandHighNurseHours, out.NursesCover, out.Floor, out.Recommended, out.DecidedBy,
			out.MethodVersion, strconv.FormatUint(out.Seed, 10), out.Draws, out.Input, out.Result, out.CreatedBy, now,
		).Scan(&out.ID); err != nil {
			return err
		}
		ps, err := findProjections(ctx, tx, " WHERE p.id = $1", "", out.ID)
		if stored, err = one(ps, err, "Projection"); err != nil {
			return err
		}
		return audit(ctx, tx, now, wardload.ActionProjectionCreate, nil, stored)
	})
	if err != nil {
		return err
	}
	*c, *p = census, *stored
	return nil
}

// FindProjectionByID returns ENOTFOUND if there is no such projection.
func (s *Store) FindProjectionByID(ctx context.Context, id int64) (*wardload.Projection, error) {
	ps, err := findProjections(ctx, s.pool, " WHERE p.id = $1", "", id)
	return one(ps, formatError(err), "Projection")
}

// FindProjections returns matches newest first (date, shift start and
// census revision descending, then ID descending) and the total.
func (s *Store) FindProjections(ctx context.Context, f wardload.ProjectionFilter) ([]*wardload.Projection, int, error) {
	var w where
	if f.WardID != nil {
		w.add("p.ward_id = ?", *f.WardID)
	}
	if f.ShiftID != nil {
		w.add("p.shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		w.add("p.date >= ?", dateArg(*f.From))
	}
	if f.To != nil {
		w.add("p.date <= ?", dateArg(*f.To))
	}
	if f.LatestOnly {
		w.conds = append(w.conds, `p.census_revision = (SELECT max(l.census_revision) FROM projections l
			WHERE l.ward_id = p.ward_id AND l.date = p.date AND l.shift_id = p.shift_id)`)
	}
	var ps []*wardload.Projection
	var n int
	// One snapshot, so the count and the rows agree.
	err := s.inSnapshot(ctx, func(tx pgx.Tx) (err error) {
		if err := tx.QueryRow(ctx, `SELECT count(*) FROM projections p`+w.String(), w.args...).Scan(&n); err != nil {
			return err
		}
		ps, err = findProjections(ctx, tx, w.String(), page(f.Offset, f.Limit), w.args...)
		return err
	})
	if err != nil {
		return nil, 0, err
	}
	return ps, n, nil
}

func findProjections(ctx context.Context, q querier, where, page string, args ...any) ([]*wardload.Projection, error) {
	rows, err := q.Query(ctx, `
		SELECT p.id, p.ward_id, p.census_id, p.census_revision, p.date, p.shift_id, p.shift_name,
			p.start_at, p.end_at, p.shift_hours, p.total_patients, p.cover_level, p.expected_nurse_hours, p.cover_nurse_hours,
			p.band_low_nurse_hours, p.band_high_nurse_hours, p.nurses_cover, p.floor_nurses, p.recommended, p.decided_by,
			p.method_version, p.seed, p.draws, p.input_json, p.result_json, p.created_by, p.created_at
		FROM projections p`+where+`
		ORDER BY p.date DESC, p.start_at DESC, p.census_revision DESC, p.id DESC`+page, args...)
	if err != nil {
		return nil, err
	}
	ps, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.Projection, error) {
		var p wardload.Projection
		var d time.Time
		var seed string
		if err := r.Scan(&p.ID, &p.WardID, &p.CensusID, &p.CensusRevision, &d, &p.ShiftID, &p.ShiftName,
			&p.Start, &p.End, &p.ShiftHours, &p.TotalPatients, &p.CoverLevel, &p.ExpectedNurseHours, &p.CoverNurseHours,
			&p.BandLowNurseHours, &p.BandHighNurseHours, &p.NursesCover, &p.Floor, &p.Recommended, &p.DecidedBy,
			&p.MethodVersion, &seed, &p.Draws, &p.Input, &p.Result, &p.CreatedBy, &p.CreatedAt); err != nil {
			return nil, err
		}
		var err error
		p.Seed, err = strconv.ParseUint(seed, 10, 64)
		p.Date, p.Start, p.End, p.CreatedAt = dateOf(d), p.Start.UTC(), p.End.UTC(), p.CreatedAt.UTC()
		return &p, err
	})
	if err != nil || len(ps) == 0 {
		return ps, err
	}
	ids := make([]int64, len(ps))
	for i, p := range ps {
		ids[i] = p.CensusID
	}
	counts, err := censusCounts(ctx, q, ids)
	if err != nil {
		return nil, err
	}
	for _, p := range ps {
		p.Counts = []wardload.TierCount{} // empty, not nil, for a census without counts
		if cs, ok := counts[p.CensusID]; ok {
			p.Counts = cs
		}
	}
	return ps, nil
}

// FindShiftRevisions returns the census revisions of one dated shift,
// newest first, with their projections' IDs and recommendations, in one
// query.
func (s *Store) FindShiftRevisions(ctx context.Context, wardID int64, d wardload.Date, shiftID int64) ([]*wardload.ShiftRevision, error) {
	rows, err := s.pool.Query(ctx, `SELECT c.id, c.revision, c.entered_at,
			COALESCE((SELECT sum(n.patients) FROM census_counts n WHERE n.census_id = c.id), 0)::bigint,
			COALESCE(p.id, 0), COALESCE(p.recommended, 0), c.nurses_on_duty, c.support_on_duty
		FROM census c LEFT JOIN projections p ON p.census_id = c.id
		WHERE c.ward_id = $1 AND c.date = $2 AND c.shift_id = $3
		ORDER BY c.revision DESC`, wardID, dateArg(d), shiftID)
	if err != nil {
		return nil, formatError(err)
	}
	rs, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (*wardload.ShiftRevision, error) {
		var v wardload.ShiftRevision
		err := r.Scan(&v.CensusID, &v.Revision, &v.EnteredAt, &v.TotalPatients, &v.ProjectionID, &v.Recommended, &v.Staff.Nurses, &v.Staff.Support)
		v.EnteredAt = v.EnteredAt.UTC()
		return &v, err
	})
	return rs, formatError(err)
}
