package export

import (
	"cmp"
	"context"
	"encoding/json"
	"fmt"
	"slices"
	"strconv"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// The board's horizons: the next 24 hours, and a week.
const (
	BoardDay  = 24 * time.Hour
	BoardWeek = 7 * 24 * time.Hour
)

// Status of a board row: what is known of the dated shift.
const (
	// StatusProjected: a census is in and the model estimated the care time.
	StatusProjected = "projected"
	// StatusFloorOnly: a census is in but too few observations to estimate
	// the care time; the recommendation is the ratio floor alone (or none).
	StatusFloorOnly = "floor_only"
	// StatusNoCensus: no census yet, so no estimate: a gap for the planner.
	StatusNoCensus = "no_census"
)

// Bound says how a board row's shortfall chance relates to the planned
// headcount: the stored table has a row for it (exact), or the planned
// headcount lies outside the table's range and the chance is that of the
// nearest row, as a bound on the unsafe side.
const (
	ChanceExact   = "exact"
	ChanceAtLeast = "at_least" // fewer planned than the table's first row: higher than that row's chance
	ChanceAtMost  = "at_most"  // more planned than its last row: at most that row's chance
)

// Board is every ward × dated shift that a viewer may see whose window
// overlaps From–To, most at risk first (see SortBoard), with one caution
// for all rows.
type Board struct {
	From, To    time.Time // UTC
	GeneratedAt time.Time // UTC, by the injected clock
	Caution     string
	Rows        []BoardRow
}

// BoardRow is one ward × dated shift of the board.
type BoardRow struct {
	Ward, WardName string
	Date           wardload.Date
	ShiftID        int64
	Shift          string
	Start, End     time.Time // in the ward's time zone
	Status         string    // StatusProjected, StatusFloorOnly or StatusNoCensus
	TotalPatients  *int      // nil without a census
	CensusRevision int       // 0 without a census
	CoverLevel     *float64
	Recommended    *int   // nil: no recommendation (no census, or declined without a floor)
	Floor          *int   // nil: no census, or no ratio floor configured
	FloorRule      string // the floor used, in words; "" without a census
	Planned        *int   // nurses planned; nil: none planned yet
	PlannedSupport *int
	// Difference is Planned − Recommended (negative: short); nil when
	// either is missing.
	Difference *int
	BelowFloor bool // planned fewer than the ratio floor
	// Chance is the chance of a shortfall with the planned nurses, from
	// the stored projection's table; nil without planned staff or an
	// estimate.
	Chance *BoardChance
	// ProjectionID is the stored projection the row reads (0: none).
	ProjectionID int64
}

// BoardChance is a shortfall chance read from a stored projection's
// per-headcount table, with the table's own words (never a bare 0 or 1).
type BoardChance struct {
	Nurses      int // the table row read: the planned headcount when Bound is exact
	Bound       string
	Probability float64 // the row's simulated share
	WilsonLow   float64
	WilsonHigh  float64
	Text        string
}

// BoardData is what BuildBoard reads from a store, so it can be read in
// few queries: the wards with their shift patterns, the newest projection
// of each dated shift in range and the planned staff.
type BoardData struct {
	Wards    []*wardload.Ward
	Patterns map[int64][]*wardload.ShiftPattern // by ward ID
	// Projections are the newest projection of each dated shift
	// (LatestOnly), any order.
	Projections []*wardload.Projection
	Planned     []*wardload.PlannedStaff
}

// LoadBoard reads the board's data for wards (those the viewer may see)
// from st for the window from–to: one query for the projections and one
// for the plans of all wards, and one per ward for its shift patterns.
func LoadBoard(ctx context.Context, st wardload.Store, wards []*wardload.Ward, from, to time.Time) (*BoardData, error) {
	d := &BoardData{Wards: wards, Patterns: make(map[int64][]*wardload.ShiftPattern, len(wards))}
	if len(wards) == 0 {
		return d, nil
	}
	ids := make([]int64, len(wards))
	for i, w := range wards {
		ids[i] = w.ID
		ps, err := st.FindShiftPatterns(ctx, w.ID)
		if err != nil {
			return nil, fmt.Errorf("board: shifts of %s: %w", w.Code, err)
		}
		d.Patterns[w.ID] = wardload.ActiveShifts(ps) // a retired shift is no gap to fill
	}
	// A dated shift's date is its local start date: a day either side of
	// the UTC window covers every time zone and a night that began the
	// evening before.
	first, last := wardload.DateOf(from.UTC()).AddDays(-2), wardload.DateOf(to.UTC()).AddDays(1)
	var f wardload.ProjectionFilter
	f.From, f.To, f.LatestOnly = &first, &last, true
	if len(wards) == 1 {
		f.WardID = &wards[0].ID
	}
	ps, _, err := st.FindProjections(ctx, f)
	if err != nil {
		return nil, fmt.Errorf("board: projections: %w", err)
	}
	d.Projections = ps
	if d.Planned, err = st.FindPlannedStaff(ctx, wardload.PlannedStaffFilter{WardIDs: ids, From: &first, To: &last}); err != nil {
		return nil, fmt.Errorf("board: planned staff: %w", err)
	}
	return d, nil
}

// BuildBoard returns the board of d for the window from–to (to after
// from), generated at now: one row per ward × shift pattern × date whose
// real window (ShiftPattern.Window in the ward's time zone) overlaps
// from–to, sorted by SortBoard. A row takes the newest projection of its
// dated shift, if any, and its planned staff, if any.
func BuildBoard(d *BoardData, from, to, now time.Time) (*Board, error) {
	type key struct {
		ward  int64
		date  wardload.Date
		shift int64
	}
	proj := make(map[key]*wardload.Projection, len(d.Projections))
	for _, p := range d.Projections {
		proj[key{p.WardID, p.Date, p.ShiftID}] = p
	}
	planned := make(map[key]*wardload.PlannedStaff, len(d.Planned))
	for _, p := range d.Planned {
		planned[key{p.WardID, p.Date, p.ShiftID}] = p
	}
	b := &Board{From: from.UTC(), To: to.UTC(), GeneratedAt: now.UTC(), Caution: stats.Caution}
	for _, w := range d.Wards {
		loc, err := w.Location()
		if err != nil {
			return nil, err
		}
		first, last := wardload.DateOf(from.In(loc)).AddDays(-1), wardload.DateOf(to.In(loc))
		for day := first; !last.Before(day); day = day.AddDays(1) {
			for _, sp := range d.Patterns[w.ID] {
				start, end, _ := sp.Window(day, loc)
				if !end.After(from) || !start.Before(to) {
					continue
				}
				k := key{w.ID, day, sp.ID}
				r := BoardRow{Ward: w.Code, WardName: w.Name, Date: day, ShiftID: sp.ID, Shift: sp.Name,
					Start: start, End: end, Status: StatusNoCensus}
				if pl := planned[k]; pl != nil {
					r.Planned, r.PlannedSupport = new(pl.Nurses), pl.Support
				}
				if p := proj[k]; p != nil {
					if err := r.fill(p); err != nil {
						return nil, err
					}
				}
				b.Rows = append(b.Rows, r)
			}
		}
	}
	SortBoard(b.Rows)
	return b, nil
}

// boardResult is what the board reads of a stored method 2 or 3 result:
// only these fields are decoded, which is cheaper than the whole result
// and unaffected by fields other versions add.
type boardResult struct {
	DataSufficient bool              `json:"data_sufficient"`
	Floor          *stats.FloorUsed  `json:"floor_used"`
	Shortfall      []stats.Shortfall `json:"shortfall"`
}

// decodeBoardResult reads the fields of p.Result the board needs; method
// 1 results go through DecodeResult.
func decodeBoardResult(p *wardload.Projection) (*Result, error) {
	if p.MethodVersion != stats.MethodVersion && p.MethodVersion != stats.MethodVersionV2 {
		return DecodeResult(p)
	}
	var br boardResult
	if err := json.Unmarshal([]byte(p.Result), &br); err != nil {
		return nil, wardload.Errorf(wardload.EINTERNAL, "The stored result of projection %d cannot be read.", p.ID)
	}
	return &Result{V2: &stats.Projection{DataSufficient: br.DataSufficient, Floor: br.Floor, Shortfall: br.Shortfall}}, nil
}

// fill sets the row's figures from its dated shift's stored projection.
func (r *BoardRow) fill(p *wardload.Projection) error {
	res, err := decodeBoardResult(p)
	if err != nil {
		return err
	}
	r.ProjectionID, r.CensusRevision = p.ID, p.CensusRevision
	r.TotalPatients, r.CoverLevel = new(p.TotalPatients), new(p.CoverLevel)
	r.Shift = p.ShiftName
	r.Floor, r.FloorRule = p.Floor, NoFloor
	if f := res.FloorUsed(); f != nil {
		r.FloorRule = f.Description
	}
	declined := res.V2 != nil && !res.V2.DataSufficient
	r.Status = StatusProjected
	if declined {
		r.Status = StatusFloorOnly
		r.Recommended = p.Floor
	} else {
		r.Recommended = new(p.Recommended)
	}
	if r.Planned == nil {
		return nil
	}
	n := *r.Planned
	if r.Recommended != nil {
		r.Difference = new(n - *r.Recommended)
	}
	r.BelowFloor = r.Floor != nil && n < *r.Floor
	if !declined {
		r.Chance = chanceWith(res, n)
	}
	return nil
}

// chanceWith reads the chance of a shortfall with n nurses from a stored
// result's per-headcount table. Outside the table's range it leans to the
// unsafe side, as the projection page does: fewer than the first row have
// a chance higher than that row's (ChanceAtLeast), more than the last row
// at most that row's (ChanceAtMost). nil for an empty table.
func chanceWith(res *Result, n int) *BoardChance {
	var rows []BoardChance
	if res.V2 != nil {
		for _, sf := range res.V2.Shortfall {
			rows = append(rows, BoardChance{Nurses: sf.Nurses, Probability: sf.Probability, WilsonLow: sf.Low, WilsonHigh: sf.High, Text: sf.Text})
		}
	} else if res.V1.Simulation.Draws > 0 {
		for _, sf := range res.V1.Shortfall {
			s := ShortfallV1(sf.Nurses, sf.SimulatedProbability, res.V1.Simulation.Draws)
			rows = append(rows, BoardChance{Nurses: s.Nurses, Probability: s.Probability, WilsonLow: s.WilsonLow, WilsonHigh: s.WilsonHigh, Text: s.Text})
		}
	}
	if len(rows) == 0 {
		return nil
	}
	var c BoardChance
	switch first, last := rows[0], rows[len(rows)-1]; {
	case n < first.Nurses:
		c, c.Bound = first, ChanceAtLeast
	case n > last.Nurses:
		c, c.Bound = last, ChanceAtMost
	default:
		i := slices.IndexFunc(rows, func(r BoardChance) bool { return r.Nurses == n })
		if i < 0 {
			return nil
		}
		c, c.Bound = rows[i], ChanceExact
	}
	return &c
}

// ChanceText says a board chance in words: the table's text, or for a
// bound "higher than with 6 nurses: 40% (38–42%)" / "at most that with 12
// nurses: < 0.02%".
func (c *BoardChance) ChanceText() string {
	nurses := strconv.Itoa(c.Nurses) + " nurses"
	if c.Nurses == 1 {
		nurses = "1 nurse"
	}
	switch c.Bound {
	case ChanceAtLeast:
		return "higher than with " + nurses + ": " + c.Text
	case ChanceAtMost:
		return "at most that with " + nurses + ": " + c.Text
	}
	return c.Text
}

// riskClass orders rows by what a planner must act on first: planned
// below the ratio floor (0); a shortfall chance with the planned staff
// (1); planned below the recommendation without a chance (2); nothing
// planned for a shift that has an estimate or floor (3); the rest (4).
func (r *BoardRow) riskClass() int {
	switch {
	case r.BelowFloor:
		return 0
	case r.Chance != nil:
		return 1
	case r.Difference != nil && *r.Difference < 0:
		return 2
	case r.Planned == nil && r.Recommended != nil:
		return 3
	}
	return 4
}

// SortBoard sorts rows most at risk first: by riskClass, then by the
// shortfall chance with the planned staff (highest first; a bound counts
// as its row's chance), then by how many short, then by start time and
// ward code, so the order is stable and complete.
func SortBoard(rows []BoardRow) {
	chance := func(r *BoardRow) float64 {
		if r.Chance == nil {
			return -1
		}
		return r.Chance.Probability
	}
	diff := func(r *BoardRow) int {
		if r.Difference == nil {
			return 0
		}
		return *r.Difference
	}
	slices.SortStableFunc(rows, func(a, b BoardRow) int {
		return cmp.Or(
			cmp.Compare(a.riskClass(), b.riskClass()),
			cmp.Compare(chance(&b), chance(&a)),
			cmp.Compare(diff(&a), diff(&b)),
			a.Start.Compare(b.Start),
			cmp.Compare(a.Ward, b.Ward),
			cmp.Compare(a.ShiftID, b.ShiftID),
		)
	})
}
