package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"wardload/internal/establishment"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "establishment", summary: "nurse-hours a year and FTE to fund from the last weeks of projections", run: runEstablishment})
}

var establishmentSummary = `Estimate the establishment of one or more wards from the newest projection of every dated
shift in the last --weeks weeks up to --end: nurse-hours a year (the mean of each shift pattern's
dated shifts × ` + strconv.FormatFloat(establishment.DaysPerYear, 'f', -1, 64) + ` days; shifts without a projection are left out, not counted
as zero) and FTE = hours ÷ (--fte-hours × (1 − --headroom)), per ward and in total, with a
bootstrap band over the weeks. --fte-hours (the paid hours of one full-time post a year) and
--headroom (the share of those hours not available for rostered work: leave, holidays, study,
sickness) are the hospital's own figures and have no default. A headroom set as an uplift u on
rostered hours is entered as u/(1+u) (22% uplift: 0.1803).
--basis recommended (default) funds each shift's recommended headcount (never below the ratio
floor) × its real hours; --basis expected funds the expected nurse-hours of care alone (no floor).

` + stats.Caution

func runEstablishment(ctx context.Context, e *env, args []string) int {
	const name = "establishment"
	fs := newFlagSet(e, name, "", establishmentSummary)
	wardsFlag := fs.String("ward", "", "ward codes, comma-separated (required)")
	weeks := fs.Int("weeks", 8, "weeks of projections, ending at --end")
	endFlag := fs.String("end", "", "last shift date, YYYY-MM-DD; default yesterday (UTC)")
	fteHours := fs.Float64("fte-hours", 0, "paid hours of one FTE a year, the hospital's figure (required)")
	headroom := fs.Float64("headroom", -1, "share of paid hours not available for rostered work, 0 ≤ h < 1 (required; 0.22 for 22%)")
	basis := fs.String("basis", "recommended", "recommended or expected")
	level := fs.Float64("level", 0.9, "two-sided level of the band")
	draws := fs.Int("draws", 20_000, "bootstrap draws")
	seed := fs.Uint64("seed", 1, "bootstrap seed")
	format := fs.String("format", "text", "text, csv or json")
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
	set := flagsSet(fs)
	for _, f := range []string{"fte-hours", "headroom"} {
		if !set[f] {
			return usageErr("--%s is required: it is the hospital's own figure (see --help)", f)
		}
	}
	params := establishment.Params{HoursPerFTE: *fteHours, Headroom: *headroom, Level: *level, Draws: *draws, Seed: *seed}
	if err := params.Validate(); err != nil {
		flag := map[string]string{"fte_hours": "--fte-hours", "headroom": "--headroom", "level": "--level", "draws": "--draws"}[wardload.ErrorField(err)]
		return usageErr("%s: %s", flag, wardload.ErrorMessage(err))
	}
	if *basis != "recommended" && *basis != "expected" {
		return usageErr("--basis must be recommended or expected")
	}
	if *format != "text" && *format != "csv" && *format != "json" {
		return usageErr("--format must be text, csv or json")
	}
	if *weeks < 1 || *weeks > 520 {
		return usageErr("--weeks must be between 1 and 520")
	}
	end := wardload.DateOf(e.clock().UTC()).AddDays(-1)
	if *endFlag != "" {
		if end, err = wardload.ParseDate(*endFlag); err != nil {
			return usageErr("--end: %s", wardload.ErrorMessage(err))
		}
	}
	from := end.AddDays(-7**weeks + 1)

	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	defer st.Close()
	var wards []establishment.Ward
	floors := map[string][]string{}
	for _, code := range codes {
		w, rules, err := establishmentWard(ctx, st, code, from, end, *weeks, *basis)
		if err != nil {
			return reportError(e, name, err)
		}
		wards = append(wards, w)
		floors[code] = rules
	}
	res, err := establishment.Estimate(wards, *weeks, params)
	if err != nil {
		return reportError(e, name, err)
	}
	rep := establishmentReport{From: from.String(), To: end.String(), Basis: *basis, Params: params, Result: res, Floors: floors, Codes: codes}
	switch *format {
	case "json":
		err = rep.writeJSON(e.stdout)
	case "csv":
		err = rep.writeCSV(e.stdout)
	default:
		rep.writeText(e.stdout)
	}
	if err != nil {
		return reportError(e, name, err)
	}
	return exitOK
}

// establishmentWard reads the ward's newest projection of every dated
// shift from `from` to `end` as hours of the basis, and the ratio floors
// those projections used.
func establishmentWard(ctx context.Context, st wardload.Store, code string, from, end wardload.Date, weeks int, basis string) (establishment.Ward, []string, error) {
	ward, err := findWard(ctx, st, code)
	if err != nil {
		return establishment.Ward{}, nil, err
	}
	patterns, err := st.FindShiftPatterns(ctx, ward.ID)
	if err != nil {
		return establishment.Ward{}, nil, err
	}
	out := establishment.Ward{Ward: code}
	for _, p := range patterns {
		out.Patterns = append(out.Patterns, p.Name)
	}
	byID := map[int64]string{}
	for _, p := range patterns {
		byID[p.ID] = p.Name
	}
	ps, _, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &ward.ID, From: &from, To: &end, LatestOnly: true})
	if err != nil {
		return establishment.Ward{}, nil, err
	}
	seen := map[string]bool{}
	var rules []string
	for _, p := range ps {
		pattern, ok := byID[p.ShiftID]
		if !ok {
			continue // a pattern deleted since: not part of the ward's shifts now
		}
		declined := p.DecidedBy == stats.DecidedByInsufficient
		var hours float64
		switch {
		case basis == "expected" && !declined:
			hours = p.ExpectedNurseHours
		case basis == "recommended" && (!declined || p.Floor != nil):
			hours = float64(p.Recommended) * p.ShiftHours
		default:
			continue // nothing to fund from: counted as missing, not as zero
		}
		week := weeks - 1 - daysBetween(p.Date, end)/7
		out.Shifts = append(out.Shifts, establishment.Shift{Week: week, Pattern: pattern, Hours: hours})
		var res struct {
			Floor *struct {
				Description string `json:"description"`
			} `json:"floor_used"`
		}
		rule := "none configured"
		if json.Unmarshal([]byte(p.Result), &res) == nil && res.Floor != nil {
			rule = res.Floor.Description
		}
		if key := pattern + ": " + rule; !seen[key] {
			seen[key] = true
			rules = append(rules, key)
		}
	}
	return out, rules, nil
}

// daysBetween is the number of calendar days from a to b, counted at noon
// UTC so that no time-zone change shifts it.
func daysBetween(a, b wardload.Date) int {
	return int(math.Round(b.At(12, 0, time.UTC).Sub(a.At(12, 0, time.UTC)).Hours() / 24))
}

type establishmentReport struct {
	From, To string
	Basis    string
	Params   establishment.Params
	Result   *establishment.Result
	Floors   map[string][]string
	Codes    []string
}

func (r *establishmentReport) rows() []establishment.WardResult {
	rows := append([]establishment.WardResult{}, r.Result.Wards...)
	if len(rows) > 1 {
		rows = append(rows, r.Result.Total)
	}
	return rows
}

func (r *establishmentReport) writeText(w io.Writer) {
	p := r.Params
	fmt.Fprintf(w, "Establishment from the projections of %s to %s (%d weeks), basis: %s\n", r.From, r.To, r.Result.Weeks, r.Basis)
	fmt.Fprintf(w, "FTE = nurse-hours a year ÷ (%g paid hours per FTE × (1 − %g headroom)) = hours ÷ %.1f available hours per FTE\n\n",
		p.HoursPerFTE, p.Headroom, p.HoursPerFTE*(1-p.Headroom))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	band := pct(p.Level)
	fmt.Fprintf(tw, "ward\tshifts\tnurse-hours a day\tnurse-hours a year (%s band)\tFTE (%s band)\n", band, band)
	for _, x := range r.rows() {
		fmt.Fprintf(tw, "%s\t%d\t%.1f\t%.0f (%.0f–%.0f)\t%.2f (%.2f–%.2f)\n", x.Ward, x.Shifts, x.HoursPerDay.Value,
			x.HoursYear.Value, x.HoursYear.Low, x.HoursYear.High, x.FTE.Value, x.FTE.Low, x.FTE.High)
	}
	tw.Flush()
	for _, x := range r.Result.Wards {
		if len(x.Missing) > 0 {
			fmt.Fprintf(w, "%s: no projection for shift %s in these weeks; it is left out, so the figures are too low.\n", x.Ward, strings.Join(x.Missing, ", "))
		}
	}
	fmt.Fprintln(w, "\nRatio floors used:")
	for _, c := range r.Codes {
		for _, rule := range r.Floors[c] {
			fmt.Fprintf(w, "  %s %s\n", c, rule)
		}
	}
	fmt.Fprintf(w, "\nThe band is a bootstrap over the %d weeks (%d draws, seed %d): how much the average moves with the weeks seen, not changes to come.\n",
		r.Result.Weeks, p.Draws, p.Seed)
	fmt.Fprintf(w, "Headroom is applied as ÷(1 − h): an FTE away for the share h of its paid hours works (1 − h) of them.\n")
	fmt.Fprintf(w, "\n%s\n", stats.Caution)
}

// writeCSV writes one row per ward (and the total), with the caution and
// the floors in leading comment-free metadata rows a spreadsheet shows.
func (r *establishmentReport) writeCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	f := func(x float64, prec int) string { return strconv.FormatFloat(x, 'f', prec, 64) }
	records := [][]string{{"ward", "from", "to", "weeks", "basis", "shifts", "nurse_hours_per_day", "nurse_hours_per_year",
		"nurse_hours_per_year_low", "nurse_hours_per_year_high", "fte", "fte_low", "fte_high", "band_level", "hours_per_fte", "headroom", "ratio_floors"}}
	for _, x := range r.rows() {
		floors := strings.Join(r.Floors[x.Ward], "; ")
		records = append(records, []string{x.Ward, r.From, r.To, strconv.Itoa(r.Result.Weeks), r.Basis, strconv.Itoa(x.Shifts),
			f(x.HoursPerDay.Value, 2), f(x.HoursYear.Value, 1), f(x.HoursYear.Low, 1), f(x.HoursYear.High, 1),
			f(x.FTE.Value, 3), f(x.FTE.Low, 3), f(x.FTE.High, 3), f(r.Params.Level, 3), f(r.Params.HoursPerFTE, 2), f(r.Params.Headroom, 4), floors})
	}
	records = append(records, []string{"caution", stats.Caution})
	if err := cw.WriteAll(records); err != nil {
		return err
	}
	return cw.Error()
}

func (r *establishmentReport) writeJSON(w io.Writer) error {
	type ward struct {
		establishment.WardResult
		Floors []string `json:"ratio_floors,omitempty"`
	}
	var wards []ward
	for _, x := range r.Result.Wards {
		wards = append(wards, ward{x, r.Floors[x.Ward]})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(struct {
		From        string                   `json:"from"`
		To          string                   `json:"to"`
		Weeks       int                      `json:"weeks"`
		Basis       string                   `json:"basis"`
		HoursPerFTE float64                  `json:"hours_per_fte"`
		Headroom    float64                  `json:"headroom"`
		Rule        string                   `json:"rule"`
		Level       float64                  `json:"band_level"`
		Draws       int                      `json:"draws"`
		Seed        uint64                   `json:"seed"`
		Wards       []ward                   `json:"wards"`
		Total       establishment.WardResult `json:"total"`
		Caution     string                   `json:"caution"`
	}{r.From, r.To, r.Result.Weeks, r.Basis, r.Params.HoursPerFTE, r.Params.Headroom,
		"fte = hours_per_year / (hours_per_fte * (1 - headroom))", r.Params.Level, r.Params.Draws, r.Params.Seed,
		wards, r.Result.Total, stats.Caution})
}
