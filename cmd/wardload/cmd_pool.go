package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"

	"wardload/internal/pool"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "pool", summary: "size a float pool for wards' shifts running at one time, by pooled risk", run: runPool})
}

var poolSummary = `Size the float pool for the shifts of several wards that run at one instant (--at, default
now): the smallest number of float nurses F such that the chance that some ward is still short
after the floats are sent where they are needed, P(Σ max(0, need − staff) > F), is at most
1 − cover. Each ward's need is the headcount law of its newest stored projection for that dated
shift (its shortfall table), never below its ratio floor; staff is the nurses on duty entered
with that census, else --staff, else the ratio floor. Compared with the sum of per-ward buffers
(each ward staffed alone to the cover level). Exact convolution for independent wards; the
sensitivity to a common correlation ρ (--rho) under a one-factor Gaussian copula, by quadrature
over the common factor, checked by a seeded simulation (--draws, --seed). Assumes
any float can work on any of these wards.

` + stats.Caution

// defaultRhos is the correlation sensitivity shown unless --rho says otherwise.
const defaultRhos = "0,0.3,0.6"

func runPool(ctx context.Context, e *env, args []string) int {
	const name = "pool"
	fs := newFlagSet(e, name, "", poolSummary)
	wardsFlag := fs.String("ward", "", "ward codes, comma-separated (required)")
	atFlag := fs.String("at", "", "the instant, RFC 3339 (2026-03-10T20:00:00Z); default now")
	cover := fs.Float64("cover", 0.9, "cover level: the chance that no ward is short after the floats, 0.5–0.999")
	staffFlag := fs.String("staff", "", "staff per ward, CODE=N,... (overrides the nurses on duty entered with the census)")
	rhoFlag := fs.String("rho", defaultRhos, "common correlations for the sensitivity, comma-separated, 0–0.95")
	draws := fs.Int("draws", 100_000, "simulation draws per correlation")
	seed := fs.Uint64("seed", 1, "simulation seed")
	asJSON := fs.Bool("json", false, "print the result as JSON")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	usageErr := func(format string, args ...any) int { return usageError(e, name, format, args...) }
	if fs.NArg() != 0 {
		return usageErr("takes no arguments (see --help)")
	}
	codes, err := wardList(*wardsFlag)
	if err != nil {
		return usageErr("%v", err)
	}
	at := e.clock()
	if *atFlag != "" {
		if at, err = time.Parse(time.RFC3339, *atFlag); err != nil {
			return usageErr("--at must be an RFC 3339 instant with its offset, e.g. 2026-03-10T20:00:00Z")
		}
	}
	staff, err := parseStaff(*staffFlag, codes)
	if err != nil {
		return usageErr("--staff: %v", err)
	}
	rhos, err := parseRhos(*rhoFlag)
	if err != nil {
		return usageErr("--rho: %v", err)
	}
	if !(*cover >= pool.MinCover && *cover <= pool.MaxCover) {
		return usageErr("--cover must be between %g and %g", pool.MinCover, pool.MaxCover)
	}
	if *draws < pool.MinDraws || *draws > pool.MaxDraws {
		return usageErr("--draws must be between %d and %d", pool.MinDraws, pool.MaxDraws)
	}

	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	defer st.Close()
	rep := poolReport{At: at.UTC().Format(time.RFC3339), Cover: *cover, Caution: stats.Caution, Left: []string{}}
	var wards []pool.Ward
	for _, code := range codes {
		pw, err := poolWardOf(ctx, st, code, at, staff)
		var skip *skipWard
		switch {
		case errors.As(err, &skip):
			rep.Left = append(rep.Left, skip.reason)
			continue
		case err != nil:
			return reportError(e, name, err)
		}
		rep.Wards = append(rep.Wards, pw.row)
		wards = append(wards, pw.ward)
		if rep.TableDraws == 0 || pw.draws < rep.TableDraws {
			rep.TableDraws = pw.draws
		}
	}
	if len(wards) == 0 {
		fmt.Fprintf(e.stderr, "wardload %s: no ward has a projection to pool at %s:\n  %s\n", name, rep.At, strings.Join(rep.Left, "\n  "))
		return exitUsage
	}
	exact, err := pool.Exact(wards, *cover)
	if err != nil {
		return reportError(e, name, err)
	}
	rep.Exact = exact
	for i := range rep.Wards {
		rep.Wards[i].Buffer = exact.Buffers[i]
		rep.Wards[i].ShortWithBuffer = wards[i].Need.Above(wards[i].Staff + exact.Buffers[i])
	}
	for _, rho := range rhos {
		q, err := pool.Correlated(wards, *cover, rho)
		if err != nil {
			return reportError(e, name, err)
		}
		sim, err := pool.Simulate(wards, *cover, rho, *draws, *seed)
		if err != nil {
			return reportError(e, name, err)
		}
		rep.Sensitivity = append(rep.Sensitivity, q)
		rep.Simulated = append(rep.Simulated, sim)
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep.jsonForm()); err != nil {
			return reportError(e, name, err)
		}
		return exitOK
	}
	rep.write(e.stdout)
	return exitOK
}

// poolRow is one ward's line of the report.
type poolRow struct {
	Ward            string  `json:"ward"`
	Date            string  `json:"date"`
	Shift           string  `json:"shift"`
	ProjectionID    int64   `json:"projection_id"`
	Staff           int     `json:"staff"`
	StaffSource     string  `json:"staff_source"` // "on duty", "--staff", "ratio floor", "none"
	Floor           *int    `json:"ratio_floor"`  // headcount; null without one
	FloorRule       string  `json:"ratio_floor_rule"`
	Recommended     int     `json:"recommended"`
	Buffer          int     `json:"own_buffer"`
	ShortWithBuffer float64 `json:"short_with_own_buffer"`
}

// poolReport is what pool prints.
type poolReport struct {
	At          string
	Cover       float64
	Wards       []poolRow
	Left        []string // wards left out, and why
	TableDraws  int      // fewest draws behind a shortfall table: bounds what "exact" can resolve
	Exact       *pool.Result
	Sensitivity []*pool.Result // quadrature, one per ρ
	Simulated   []*pool.Result // the simulation check, one per ρ
	Caution     string
}

type poolWard struct {
	ward  pool.Ward
	row   poolRow
	draws int
}

// skipWard is a ward that has nothing to pool; the report says why.
type skipWard struct{ reason string }

func (s *skipWard) Error() string { return s.reason }

// poolWardOf finds the ward's dated shift running at `at`, its newest
// projection and staff, and turns the projection's shortfall table into
// its need.
func poolWardOf(ctx context.Context, st wardload.Store, code string, at time.Time, staff map[string]int) (*poolWard, error) {
	ward, err := findWard(ctx, st, code)
	if err != nil {
		return nil, err
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, err
	}
	patterns, err := st.FindShiftPatterns(ctx, ward.ID)
	if err != nil {
		return nil, err
	}
	var shift *wardload.ShiftPattern
	var date wardload.Date
	var start time.Time
	today := wardload.DateOf(at.In(loc))
	for _, d := range []wardload.Date{today.AddDays(-1), today} {
		for _, p := range patterns {
			s, end, _ := p.Window(d, loc)
			if !at.Before(s) && at.Before(end) && (shift == nil || s.After(start)) {
				shift, date, start = p, d, s
			}
		}
	}
	if shift == nil {
		return nil, &skipWard{fmt.Sprintf("%s: no shift runs at that time", code)}
	}
	ps, _, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &ward.ID, ShiftID: &shift.ID, From: &date, To: &date, LatestOnly: true, Limit: 1})
	if err != nil {
		return nil, err
	}
	if len(ps) == 0 {
		return nil, &skipWard{fmt.Sprintf("%s: no census yet for %s %s", code, date, shift.Name)}
	}
	p := ps[0]
	var res struct {
		Shortfall []struct {
			Nurses      int     `json:"nurses"`
			Probability float64 `json:"probability"`
		} `json:"shortfall"`
		Floor *struct {
			Description string `json:"description"`
		} `json:"floor_used"`
	}
	if err := json.Unmarshal([]byte(p.Result), &res); err != nil {
		return nil, fmt.Errorf("projection %d: result: %w", p.ID, err)
	}
	if len(res.Shortfall) == 0 {
		return nil, &skipWard{fmt.Sprintf("%s: the projection of %s %s declined (too few observations): no shortfall chances to pool", code, date, shift.Name)}
	}
	row := poolRow{Ward: code, Date: date.String(), Shift: shift.Name, ProjectionID: p.ID, Floor: p.Floor, Recommended: p.Recommended,
		FloorRule: "none configured"}
	if res.Floor != nil {
		row.FloorRule = res.Floor.Description
	}
	floor := 0
	if p.Floor != nil {
		floor = *p.Floor
	}
	revs, err := st.FindShiftRevisions(ctx, ward.ID, date, shift.ID)
	if err != nil {
		return nil, err
	}
	row.Staff, row.StaffSource = floor, "ratio floor"
	if p.Floor == nil {
		row.StaffSource = "none entered, no floor"
	}
	for _, r := range revs {
		if r.ProjectionID == p.ID && r.Staff.Nurses != nil {
			row.Staff, row.StaffSource = *r.Staff.Nurses, "on duty"
		}
	}
	if n, ok := staff[code]; ok {
		row.Staff, row.StaffSource = n, "--staff"
	}
	nurses := make([]int, len(res.Shortfall))
	chances := make([]float64, len(res.Shortfall))
	for i, s := range res.Shortfall {
		nurses[i], chances[i] = s.Nurses, s.Probability
	}
	need, err := pool.FromShortfall(code, nurses, chances, floor)
	if err != nil {
		return nil, err
	}
	return &poolWard{ward: pool.Ward{Need: need, Staff: row.Staff}, row: row, draws: p.Draws}, nil
}
