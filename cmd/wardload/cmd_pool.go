package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
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
	usageErr := func(format string, args ...any) int {
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, fmt.Sprintf(format, args...))
		return exitUsage
	}
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
		case wardload.ErrorCode(err) == wardload.ENOTFOUND:
			return usageErr("no ward with code %q (see wardload ward list)", code)
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
	ward, err := st.FindWardByCode(ctx, code)
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

func (r *poolReport) write(w io.Writer) {
	fmt.Fprintf(w, "Float pool for the shifts running at %s, cover level %s\n\n", r.At, pct(r.Cover))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "ward\tshift\tstaff\tratio floor\trecommended\town buffer\tchance short with own buffer")
	for _, row := range r.Wards {
		floor := "none"
		if row.Floor != nil {
			floor = strconv.Itoa(*row.Floor)
		}
		fmt.Fprintf(tw, "%s\t%s %s\t%d (%s)\t%s\t%d\t%d\t%s\n", row.Ward, row.Date, row.Shift, row.Staff, row.StaffSource,
			floor, row.Recommended, row.Buffer, chance(row.ShortWithBuffer, r.TableDraws))
	}
	tw.Flush()
	fmt.Fprintln(w, "\nRatio floors used:")
	for _, row := range r.Wards {
		fmt.Fprintf(w, "  %s: %s\n", row.Ward, row.FloorRule)
	}
	for _, l := range r.Left {
		fmt.Fprintf(w, "Left out: %s\n", l)
	}
	x := r.Exact
	fmt.Fprintf(w, "\nEach ward staffed alone to the cover level: %d extra nurses in all; the chance that some ward is short then: %s (independent wards).\n",
		x.SumBuffers, chance(x.AnyShortBuffered, r.TableDraws))
	fewer := ""
	if x.Floats > 0 {
		fewer = fmt.Sprintf(" (with %d: %s)", x.Floats-1, chance(x.ShortFewer, r.TableDraws))
	}
	fmt.Fprintf(w, "Float pool, independent wards (exact convolution): %d nurses; the chance that some ward is still short after sending them where needed: %s%s.\n",
		x.Floats, chance(x.Short, r.TableDraws), fewer)
	fmt.Fprintf(w, "Pooling gain: %d nurses fewer than the sum of the wards' own buffers.\n", x.Gain)
	if len(r.Sensitivity) > 0 {
		fmt.Fprintf(w, "\nIf the wards' needs move together (one-factor Gaussian copula, common correlation ρ; quadrature, and a simulation of %d draws as a check):\n", r.Simulated[0].Draws)
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "ρ\tfloat pool\tchance some ward short\twith own buffers only\tsimulated: pool, chance")
		for i, q := range r.Sensitivity {
			s := r.Simulated[i]
			fmt.Fprintf(tw, "%g\t%d\t%s\t%s\t%d, %s\n", q.Rho, q.Floats, chance(q.Short, r.TableDraws),
				chance(q.AnyShortBuffered, r.TableDraws), s.Floats, stats.ProbabilityText(s.ShortDraws, s.Draws))
		}
		tw.Flush()
	}
	if x.Unplaced > 0 {
		fmt.Fprintf(w, "\nA chance of %s lies beyond the wards' shortfall tables and is counted as short whatever the pool.\n", chance(x.Unplaced, r.TableDraws))
	}
	_, hi := stats.WilsonInterval(0, r.TableDraws)
	fmt.Fprintf(w, "\nChances rest on shortfall tables simulated with at least %d draws each: a chance below %s cannot be told from 0.\n",
		r.TableDraws, pct(hi))
	fmt.Fprintf(w, "Method: need = the projection's headcount law, at least the ratio floor; floats go where needed, so the hospital is short when Σ max(0, need − staff) > F (Eppen 1979, risk pooling; newsvendor critical fractile).\n")
	fmt.Fprintf(w, "\n%s\n", r.Caution)
}

// jsonForm is the report as JSON, with chances as numbers and each as text.
func (r *poolReport) jsonForm() any {
	type result struct {
		Method           string   `json:"method"`
		Rho              float64  `json:"rho"`
		Floats           int      `json:"floats"`
		Short            float64  `json:"short"`
		ShortText        string   `json:"short_text"`
		ShortFewer       *float64 `json:"short_with_one_fewer"`
		Draws            int      `json:"draws,omitempty"`
		SumBuffers       int      `json:"sum_of_own_buffers"`
		Gain             int      `json:"pooling_gain"`
		AnyShortBuffered float64  `json:"short_with_own_buffers"`
		Unplaced         float64  `json:"beyond_tables"`
	}
	conv := func(x *pool.Result, n int) result {
		out := result{Method: x.Method, Rho: x.Rho, Floats: x.Floats, Short: x.Short, ShortText: chance(x.Short, n), Draws: x.Draws,
			SumBuffers: x.SumBuffers, Gain: x.Gain, AnyShortBuffered: x.AnyShortBuffered, Unplaced: x.Unplaced}
		if x.Method == "simulation" {
			out.ShortText = stats.ProbabilityText(x.ShortDraws, x.Draws)
		}
		if !math.IsNaN(x.ShortFewer) {
			f := x.ShortFewer
			out.ShortFewer = &f
		}
		return out
	}
	sens, sims := []result{}, []result{}
	for i, s := range r.Sensitivity {
		sens = append(sens, conv(s, r.TableDraws))
		sims = append(sims, conv(r.Simulated[i], r.Simulated[i].Draws))
	}
	return struct {
		At          string    `json:"at"`
		Cover       float64   `json:"cover_level"`
		Wards       []poolRow `json:"wards"`
		Left        []string  `json:"left_out"`
		TableDraws  int       `json:"fewest_table_draws"`
		Exact       result    `json:"independent"`
		Sensitivity []result  `json:"correlation_sensitivity"`
		Simulated   []result  `json:"correlation_simulated"`
		Caution     string    `json:"caution"`
	}{r.At, r.Cover, r.Wards, r.Left, r.TableDraws, conv(r.Exact, r.TableDraws), sens, sims, r.Caution}
}

// chance says a probability that rests on simulations of at least n
// draws, never as a bare 0% or 100%: below the 95% Wilson upper bound of
// 0 in n (stats.WilsonInterval) it is "< that bound", above the lower
// bound of n in n "> that bound".
func chance(p float64, n int) string {
	_, hi := stats.WilsonInterval(0, max(n, 1))
	switch {
	case p < hi:
		return "< " + pct(hi)
	case p > 1-hi:
		return "> " + pct(1-hi)
	}
	return pct(p)
}

// pct prints a share as a percentage with two significant digits below
// 10%, never rounding to 0% or 100%.
func pct(p float64) string {
	x := 100 * p
	prec := 0
	switch {
	case x < 1:
		prec = 2
	case x < 10:
		prec = 1
	}
	s := strconv.FormatFloat(x, 'f', prec, 64)
	for prec < 8 {
		v, _ := strconv.ParseFloat(s, 64)
		if !(v == 0 && x > 0) && !(v == 100 && x < 100) {
			break
		}
		prec++
		s = strconv.FormatFloat(x, 'f', prec, 64)
	}
	return s + "%"
}

// wardList splits a comma-separated --ward value.
func wardList(s string) ([]string, error) {
	if strings.TrimSpace(s) == "" {
		return nil, errors.New("--ward is required")
	}
	var codes []string
	seen := map[string]bool{}
	for _, c := range strings.Split(s, ",") {
		c = strings.TrimSpace(c)
		if c == "" || seen[c] {
			return nil, fmt.Errorf("--ward: %q names a ward twice or not at all", s)
		}
		seen[c] = true
		codes = append(codes, c)
	}
	return codes, nil
}

// parseStaff reads CODE=N,... for wards named in --ward.
func parseStaff(s string, codes []string) (map[string]int, error) {
	out := map[string]int{}
	if strings.TrimSpace(s) == "" {
		return out, nil
	}
	known := map[string]bool{}
	for _, c := range codes {
		known[c] = true
	}
	for _, item := range strings.Split(s, ",") {
		code, v, ok := strings.Cut(strings.TrimSpace(item), "=")
		n, err := strconv.Atoi(v)
		if !ok || err != nil || n < 0 || n > pool.MaxHeadcount {
			return nil, fmt.Errorf("%q is not CODE=N with N a whole number from 0 to %d", item, pool.MaxHeadcount)
		}
		if !known[code] {
			return nil, fmt.Errorf("ward %q is not in --ward", code)
		}
		out[code] = n
	}
	return out, nil
}

// parseRhos reads the comma-separated correlations; "" or "none" gives none.
func parseRhos(s string) ([]float64, error) {
	if s = strings.TrimSpace(s); s == "" || s == "none" {
		return nil, nil
	}
	var out []float64
	for _, item := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(item), 64)
		if err != nil || !(v >= 0 && v <= pool.MaxRho) {
			return nil, fmt.Errorf("%q is not a correlation from 0 to %g", item, pool.MaxRho)
		}
		out = append(out, v)
	}
	return out, nil
}
