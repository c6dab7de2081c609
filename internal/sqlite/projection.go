package sqlite

import (
	"context"
	"database/sql"
	"strconv"
	"strings"

	"wardload/internal/wardload"
)

// CreateCensusProjection stores c as the next census revision and p as its
// projection in one write transaction.
func (s *Store) CreateCensusProjection(ctx context.Context, c *wardload.Census, p *wardload.Projection) error {
	if err := wardload.ValidateCensusProjection(c, p); err != nil {
		return err
	}
	// A failed transaction must leave the caller's values as they were.
	c0, p0 := *c, *p
	err := s.write(ctx, func(tx *Tx) error {
		if err := createCensus(ctx, tx, c); err != nil {
			return err
		}
		p.CensusID, p.CensusRevision, p.CreatedAt = c.ID, c.Revision, tx.now
		res, err := tx.ExecContext(ctx, `INSERT INTO projections (ward_id, census_id, census_revision, date, shift_id, shift_name,
			start_at, end_at, shift_hours, total_patients, cover_level, expected_nurse_hours, cover_nurse_hours,
			band_low_nurse_hours, band_high_nurse_hours, nurses_cover, floor_nurses, recommended, decided_by,
			method_version, seed, draws, input_json, result_json, created_by, created_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
			p.WardID, p.CensusID, p.CensusRevision, p.Date.String(), p.ShiftID, p.ShiftName,
			formatTime(p.Start), formatTime(p.End), p.ShiftHours, p.TotalPatients, p.CoverLevel, p.ExpectedNurseHours, p.CoverNurseHours,
			p.BandLowNurseHours, p.BandHighNurseHours, p.NursesCover, nullInt(p.Floor), p.Recommended, p.DecidedBy,
			p.MethodVersion, strconv.FormatUint(p.Seed, 10), p.Draws, p.Input, p.Result, p.CreatedBy, formatTime(p.CreatedAt))
		if err != nil {
			return err
		}
		if p.ID, err = res.LastInsertId(); err != nil {
			return err
		}
		stored, err := findOneProjection(ctx, tx, p.ID)
		if err != nil {
			return err
		}
		p.Counts, p.Start, p.End = stored.Counts, stored.Start, stored.End
		return tx.audit(wardload.ActionProjectionCreate, nil, stored)
	})
	if err != nil {
		*c, *p = c0, p0
	}
	return err
}

func nullInt(v *int) any {
	if v == nil {
		return nil
	}
	return *v
}

// FindProjectionByID returns ENOTFOUND if there is no such projection.
func (s *Store) FindProjectionByID(ctx context.Context, id int64) (*wardload.Projection, error) {
	return findOneProjection(ctx, s.reader(ctx), id)
}

// FindProjections returns matches newest first (date, shift start and
// census revision descending, then ID descending) and the total.
func (s *Store) FindProjections(ctx context.Context, f wardload.ProjectionFilter) ([]*wardload.Projection, int, error) {
	return findProjections(ctx, s.reader(ctx), f, 0)
}

func findOneProjection(ctx context.Context, q querier, id int64) (*wardload.Projection, error) {
	ps, _, err := findProjections(ctx, q, wardload.ProjectionFilter{}, id)
	if err != nil {
		return nil, err
	}
	if len(ps) == 0 {
		return nil, wardload.NotFound("Projection")
	}
	return ps[0], nil
}

const projectionColumns = `p.id, p.ward_id, p.census_id, p.census_revision, p.date, p.shift_id, p.shift_name,
	p.start_at, p.end_at, p.shift_hours, p.total_patients, p.cover_level, p.expected_nurse_hours, p.cover_nurse_hours,
	p.band_low_nurse_hours, p.band_high_nurse_hours, p.nurses_cover, p.floor_nurses, p.recommended, p.decided_by,
	p.method_version, p.seed, p.draws, p.input_json, p.result_json, p.created_by, p.created_at`

func findProjections(ctx context.Context, q querier, f wardload.ProjectionFilter, id int64) ([]*wardload.Projection, int, error) {
	where, args := []string{"1 = 1"}, []any{}
	add := func(cond string, v any) { where, args = append(where, cond), append(args, v) }
	if id != 0 {
		add("p.id = ?", id)
	}
	if f.WardID != nil {
		add("p.ward_id = ?", *f.WardID)
	}
	if f.ShiftID != nil {
		add("p.shift_id = ?", *f.ShiftID)
	}
	if f.From != nil {
		add("p.date >= ?", f.From.String())
	}
	if f.To != nil {
		add("p.date <= ?", f.To.String())
	}
	if f.LatestOnly {
		where = append(where, `p.census_revision = (SELECT MAX(l.census_revision) FROM projections l
			WHERE l.ward_id = p.ward_id AND l.date = p.date AND l.shift_id = p.shift_id)`)
	}
	cond := strings.Join(where, " AND ")
	// Without a page the total is the number of rows: spare the count
	// query (the projection page looks one up by ID).
	total := -1
	if f.Offset > 0 || f.Limit > 0 {
		if err := q.QueryRowContext(ctx, `SELECT COUNT(*) FROM projections p WHERE `+cond, args...).Scan(&total); err != nil {
			return nil, 0, err
		}
	}
	rows, err := q.QueryContext(ctx, page(`SELECT `+projectionColumns+` FROM projections p WHERE `+cond+`
		ORDER BY p.date DESC, p.start_at DESC, p.census_revision DESC, p.id DESC`, f.Offset, f.Limit), args...)
	if err != nil {
		return nil, 0, err
	}
	defer rows.Close()
	var ps []*wardload.Projection
	for rows.Next() {
		p, err := scanProjection(rows)
		if err != nil {
			return nil, 0, err
		}
		ps = append(ps, p)
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	rows.Close()
	for _, p := range ps {
		if p.Counts, err = censusCounts(ctx, q, p.CensusID); err != nil {
			return nil, 0, err
		}
	}
	if total < 0 {
		total = len(ps)
	}
	return ps, total, nil
}

func scanProjection(r scanner) (*wardload.Projection, error) {
	var p wardload.Projection
	var d, start, end, seed, created string
	var floor sql.NullInt64
	if err := r.Scan(&p.ID, &p.WardID, &p.CensusID, &p.CensusRevision, &d, &p.ShiftID, &p.ShiftName,
		&start, &end, &p.ShiftHours, &p.TotalPatients, &p.CoverLevel, &p.ExpectedNurseHours, &p.CoverNurseHours,
		&p.BandLowNurseHours, &p.BandHighNurseHours, &p.NursesCover, &floor, &p.Recommended, &p.DecidedBy,
		&p.MethodVersion, &seed, &p.Draws, &p.Input, &p.Result, &p.CreatedBy, &created); err != nil {
		return nil, err
	}
	var err error
	if p.Date, err = parseDate(d); err != nil {
		return nil, err
	}
	if p.Start, err = parseTime(start); err != nil {
		return nil, err
	}
	if p.End, err = parseTime(end); err != nil {
		return nil, err
	}
	if p.CreatedAt, err = parseTime(created); err != nil {
		return nil, err
	}
	if p.Seed, err = strconv.ParseUint(seed, 10, 64); err != nil {
		return nil, err
	}
	if floor.Valid {
		n := int(floor.Int64)
		p.Floor = &n
	}
	return &p, nil
}

// FindShiftRevisions returns the census revisions of one dated shift,
// newest first, with their projections' IDs and recommendations, in one
// query.
func (s *Store) FindShiftRevisions(ctx context.Context, wardID int64, d wardload.Date, shiftID int64) ([]*wardload.ShiftRevision, error) {
	rows, err := s.reader(ctx).QueryContext(ctx, `SELECT c.id, c.revision, c.entered_at,
			COALESCE((SELECT SUM(n.patients) FROM census_counts n WHERE n.census_id = c.id), 0),
			COALESCE(p.id, 0), COALESCE(p.recommended, 0), c.nurses_on_duty, c.support_on_duty
		FROM census c LEFT JOIN projections p ON p.census_id = c.id
		WHERE c.ward_id = ? AND c.date = ? AND c.shift_id = ?
		ORDER BY c.revision DESC`, wardID, d.String(), shiftID)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var rs []*wardload.ShiftRevision
	for rows.Next() {
		var r wardload.ShiftRevision
		var entered string
		if err := rows.Scan(&r.CensusID, &r.Revision, &entered, &r.TotalPatients, &r.ProjectionID, &r.Recommended, &r.Staff.Nurses, &r.Staff.Support); err != nil {
			return nil, err
		}
		if r.EnteredAt, err = parseTime(entered); err != nil {
			return nil, err
		}
		rs = append(rs, &r)
	}
	return rs, rows.Err()
}
