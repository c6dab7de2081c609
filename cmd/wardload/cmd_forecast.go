package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"
	"unicode"
	"unicode/utf8"

	"wardload/internal/csvfile"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "forecast", summary: "forecast each tier's census on every dated shift of the coming weeks from a census history", run: runForecast})
}

// patientsColumn is the census file's count column.
const patientsColumn = "patients"

var forecastSummary = `Forecast the census of every tier on every dated shift of the coming weeks from the ward's
census history. CENSUS.csv (or - for standard input) has the columns "date" (YYYY-MM-DD),
"shift" (any name), "tier" and "patients" (a whole number), one row per tier and dated
shift. A dated shift with no row at all is missing, not zero patients; a dated shift with
rows for some tiers counts the others as 0. At least 4 weeks (28 dated days) of history
are needed.

Each tier's counts are modelled by a log-linear quasi-Poisson regression (or negative
binomial, --family nb2) with weekday and shift effects, their interaction where the
history supports it, and a trend; the predictive distribution is simulated with the
uncertainty of the estimated parameters, and in every draw the tiers' total is held to
--beds, the tiers sharing the beds in proportion. Printed per dated shift and tier: the
median and the central bands (--levels) of the census. A shift not recorded in the last
4 weeks is taken as retired and not forecast.

With --observations OBS.csv (care observations as "wardload project" reads them, with
"date" and "shift" columns naming each observation's shift) it also forecasts every dated
shift's direct care: each census draw is run through the care model of its shift pattern
(fitted to that shift's observations, as a projection is), giving per dated shift the
nurse-hours at the cover level, the ratio floor for the census at the cover percentile,
the recommended headcount and how much of the spread comes from not knowing the census.
--shift-hours and --direct-care are then required. Defaults: --weeks 6 (at most 13), --from the day after the newest census
date, --levels 0.8,0.9, --draws 4000, --seed 1, --family quasipoisson, --cover 0.9.

` + stats.CensusCaution

// forecastFlags maps the fields named by stats.ForecastCensus's errors to flags.
var forecastFlags = map[string]string{
	"from": "--from", "weeks": "--weeks", "beds": "--beds", "levels": "--levels", "draws": "--draws", "family": "--family",
}

func runForecast(ctx context.Context, e *env, args []string) int {
	const name = "forecast"
	fs := newFlagSet(e, name, "CENSUS.csv | --ward CODE", forecastSummary)
	wardCode := fs.String("ward", "", "forecast this ward from its census, observations and settings in the database instead of files")
	from := fs.String("from", "", "first forecast date, YYYY-MM-DD, after the newest census date (default: the day after it)")
	weeks := fs.Int("weeks", stats.DefaultForecastWeeks, fmt.Sprintf("weeks forecast, 1 to %d", stats.MaxForecastWeeks))
	beds := fs.Int("beds", 0, "the ward's beds: the tiers' total census never exceeds it (required)")
	levels := fs.String("levels", defaultLevels, fmt.Sprintf("central band levels, comma-separated, each from 0.01 to %g", stats.MaxCover))
	draws := fs.Int("draws", stats.DefaultCensusDraws, fmt.Sprintf("simulation draws per dated shift, 100 to %d", stats.MaxCensusDraws))
	seed := fs.Uint64("seed", defaultSeed, "seed of the simulation; the same seed gives the same result")
	family := fs.String("family", "quasipoisson", "count model: quasipoisson or nb2 (negative binomial)")
	asJSON := fs.Bool("json", false, "print one JSON object instead of a report")
	asCSV := fs.Bool("csv", false, "print CSV, one row per dated shift and tier (and the total); with --observations, one row per dated shift")
	var wf workloadFlags
	fs.StringVar(&wf.observations, "observations", "", "care observations `FILE` (as project reads): also forecast nurse-hours and the headcount of every dated shift")
	fs.StringVar(&wf.shiftHours, "shift-hours", "", "with --observations: hours of every shift (12) or per shift (Day=12,Night=12) (required)")
	fs.Float64Var(&wf.directCare, "direct-care", 0, "with --observations: share of a nurse's shift available for direct care, from 0.1 to 1 (required)")
	fs.Float64Var(&wf.cover, "cover", defaultCover, fmt.Sprintf("with --observations: one-sided probability the staffed hours should cover, from %g to %g", stats.MinCover, stats.MaxCover))
	fs.Float64Var(&wf.ppn, "patients-per-nurse", 0, "with --observations: ratio floor, at most this many patients per nurse, as configured for your ward (0: no floor)")
	fs.BoolVar(&wf.chargeCounts, "charge-nurse-counts", false, "with --observations: the nurse in charge counts towards the ratio floor and gives direct care")
	fs.StringVar(&wf.column, "column", defaultColumn, "with --observations: name of the care minutes column")
	so := addStoreFlags(fs)
	files, code, ok := parseInterleaved(e, fs, args)
	if !ok {
		return code
	}
	usage := func(format string, a ...any) int {
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, fmt.Sprintf(format, a...))
		return exitUsage
	}
	set := flagsSet(fs)
	if *wardCode != "" {
		if len(files) != 0 {
			return usage("give a CENSUS.csv or --ward, not both")
		}
		for _, f := range []string{"beds", "levels", "observations", "shift-hours", "direct-care", "cover", "patients-per-nurse", "charge-nurse-counts", "column"} {
			if set[f] {
				return usage("--%s is for files; with --ward the ward's settings, shift patterns and observations are used", f)
			}
		}
	}
	switch {
	case *asJSON && *asCSV:
		return usage("give --json or --csv, not both")
	case set["weeks"] && (*weeks < 1 || *weeks > stats.MaxForecastWeeks):
		return usage("--weeks: the horizon must be from 1 to %d weeks.", stats.MaxForecastWeeks)
	case *wardCode != "":
	case len(files) != 1:
		return usage("give exactly one CENSUS.csv, or --ward CODE (see wardload forecast --help)")
	case !set["beds"]:
		return usage("--beds is required: the tiers' total census cannot exceed the ward's beds")
	}
	fam := stats.FamilyQuasiPoisson
	switch *family {
	case "quasipoisson":
	case "nb2":
		fam = stats.FamilyNegBin2
	default:
		return usage("--family: %q is not quasipoisson or nb2.", clip(*family))
	}
	lv, err := parseLevels(*levels)
	if err != nil {
		return usage("--levels: %s", wardload.ErrorMessage(err))
	}
	if set["from"] {
		if _, err := wardload.ParseDate(*from); err != nil {
			return usage("--from: %q is not a date (YYYY-MM-DD).", clip(*from))
		}
	}
	if *wardCode != "" {
		return runWardForecast(ctx, e, so, *wardCode, *from, *weeks, *draws, *seed, fam, *asJSON, *asCSV)
	}
	t, code, err := readProjectFile(e, files[0])
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %s: %s\n", name, files[0], oneLineMessage(err))
		return code
	}
	hist, newest, err := censusRows(t)
	if err != nil {
		return usage("%s: %s", files[0], oneLineMessage(err))
	}
	if !set["from"] {
		*from = nextDay(newest)
	}
	if wf.observations != "" {
		return runWorkloadForecast(e, files[0], wf, set, stats.CensusForecastInput{History: hist, From: *from, Weeks: *weeks, Beds: *beds,
			Levels: lv, Draws: *draws, Seed: *seed, Family: fam}, *asJSON, *asCSV)
	}
	for _, f := range []string{"shift-hours", "direct-care", "cover", "patients-per-nurse", "charge-nurse-counts", "column"} {
		if set[f] {
			return usage("--%s goes with --observations", f)
		}
	}
	fc, err := stats.ForecastCensus(stats.CensusForecastInput{History: hist, From: *from, Weeks: *weeks, Beds: *beds,
		Levels: lv, Draws: *draws, Seed: *seed, Family: fam})
	if err != nil {
		if wardload.ErrorCode(err) != wardload.EINVALID {
			fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, wardload.ErrorMessage(err))
			return exitFailure
		}
		if f, ok := forecastFlags[wardload.ErrorField(err)]; ok {
			return usage("%s: %s", f, wardload.ErrorMessage(err))
		}
		return usage("%s: %s", files[0], wardload.ErrorMessage(err))
	}
	var b bytes.Buffer // buffered, so a failure never leaves half a report
	switch {
	case *asJSON:
		err = json.NewEncoder(&b).Encode(fc)
	case *asCSV:
		err = writeForecastCSV(&b, fc)
	default:
		err = writeForecast(&b, fc, files[0])
	}
	if err == nil {
		_, err = e.stdout.Write(b.Bytes())
	}
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: cannot write the result: %v\n", name, err)
		return exitFailure
	}
	return exitOK
}

// censusRows reads the census file's rows, refusing a bad cell or a
// repeated date, shift and tier with its line and column. It returns the
// newest date.
func censusRows(t *csvfile.Table) ([]stats.CensusCount, string, error) {
	for _, c := range []string{dateColumn, shiftColumn, csvfile.TierColumn, patientsColumn} {
		if t.Index(c) < 0 {
			return nil, "", wardload.Errorf(wardload.EINVALID, "line 1: there is no %q column; a census file needs %q, %q, %q and %q.",
				c, dateColumn, shiftColumn, csvfile.TierColumn, patientsColumn)
		}
	}
	dates, shifts, newest, err := occurrenceColumns(t)
	if err != nil {
		return nil, "", err
	}
	tiers, _ := t.Strings(csvfile.TierColumn)
	counts, _ := t.Strings(patientsColumn)
	seen := map[string]int{}
	out := make([]stats.CensusCount, len(t.Records))
	for i := range t.Records {
		line := t.Lines[i]
		tier := tiers[i]
		if tier == "" || utf8.RuneCountInString(tier) > maxShiftName || strings.IndexFunc(tier, unicode.IsControl) >= 0 {
			return nil, "", wardload.Errorf(wardload.EINVALID, "line %d, column %q: %q is not a tier code (one line of 1 to %d characters).", line, csvfile.TierColumn, clip(tier), maxShiftName)
		}
		c := strings.TrimSpace(counts[i])
		n, err := strconv.Atoi(c)
		if err != nil || strings.Trim(c, "0123456789") != "" || n > stats.MaxPatients {
			return nil, "", wardload.Errorf(wardload.EINVALID, "line %d, column %q: %q is not a whole number of patients from 0 to %d.", line, patientsColumn, clip(c), stats.MaxPatients)
		}
		key := dates[i] + "\x00" + shifts[i] + "\x00" + tier
		if prev, dup := seen[key]; dup {
			return nil, "", wardload.Errorf(wardload.EINVALID, "line %d: %s, shift %s, tier %s is already on line %d.", line, dates[i], clip(shifts[i]), clip(tier), prev)
		}
		seen[key] = line
		out[i] = stats.CensusCount{Date: dates[i], Shift: shifts[i], Tier: tier, Patients: n}
	}
	return out, newest, nil
}

// writeForecast prints the forecast as a report: what it is, the model of
// each tier, one line per dated shift, notes and the caution.
func writeForecast(out io.Writer, fc *stats.CensusForecast, source string) error {
	fmt.Fprintf(out, "Census forecast from %s, %s to %s (%d weeks), %s (%s).\n", source, fc.From, fc.To, fc.Weeks, fc.Family, fc.MethodVersion)
	fmt.Fprintf(out, "History %s to %s, %d dated days; %d beds; %d draws, seed %d.\n\n", fc.HistoryFrom, fc.HistoryTo, fc.HistoryDays, fc.Beds, fc.Draws, fc.Seed)
	for _, m := range fc.Models {
		switch {
		case m.NeverPresent:
			fmt.Fprintf(out, "Tier %s: no patient in the history; forecast as none.\n", m.Tier)
		default:
			effects := "weekday × shift interaction"
			if !m.Interaction {
				effects = strings.TrimPrefix(m.Reason, "main effects: ")
				effects = "weekday and shift main effects, as " + effects
			}
			fmt.Fprintf(out, "Tier %s: %d dated shifts, %s; dispersion %.2f; trend %+.1f%% a week (SE %.1f).\n",
				m.Tier, m.Observations, effects, m.Dispersion, 100*m.TrendPerWeek, 100*m.TrendSE)
		}
	}
	fmt.Fprintf(out, "\nMedian census [%s] per tier and in total:\n", bandNames(fc.Levels))
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	fmt.Fprint(w, "date\tday\tshift")
	for _, m := range fc.Models {
		fmt.Fprintf(w, "\t%s", m.Tier)
	}
	fmt.Fprint(w, "\ttotal\tat beds\t\n")
	for _, s := range fc.Shifts {
		fmt.Fprintf(w, "%s\t%s\t%s", s.Date, s.Weekday[:3], s.Shift)
		for _, q := range append(s.Tiers, s.Total) {
			fmt.Fprintf(w, "\t%s", quantileText(q))
		}
		fmt.Fprintf(w, "\t%s\t\n", strconv.FormatFloat(100*s.BedsBound, 'f', 0, 64)+"%")
	}
	if err := w.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(out, "\n\"at beds\": the share of draws whose total was held to the beds. A band of whole patients holds at least its level of the forecast, often a few points more.")
	for _, n := range fc.Notes {
		fmt.Fprintln(out, n)
	}
	_, err := fmt.Fprintf(out, "\n%s\n", fc.Caution)
	return err
}

func bandNames(levels []float64) string {
	names := make([]string, len(levels))
	for i, l := range levels {
		names[i] = levelText(l) + " band"
	}
	return strings.Join(names, ", ")
}

// quantileText is "median [low–high, …]".
func quantileText(q stats.CensusQuantiles) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d [", q.Median)
	for i, band := range q.Bands {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%d–%d", band.Low, band.High)
	}
	b.WriteString("]")
	return b.String()
}

// writeForecastCSV writes one row per dated shift and tier (and "total"),
// with the method version on every row so a row read alone says what
// made it.
func writeForecastCSV(out io.Writer, fc *stats.CensusForecast) error {
	w := csv.NewWriter(out)
	head := []string{"date", "weekday", "shift", "horizon_days", "tier", "mean", "median"}
	for _, l := range fc.Levels {
		p := strings.TrimSuffix(levelText(l), "%")
		head = append(head, "low_"+p, "high_"+p)
	}
	head = append(head, "beds", "beds_bound_share", "method_version")
	w.Write(head)
	for _, s := range fc.Shifts {
		for _, q := range append(s.Tiers, s.Total) {
			row := []string{s.Date, s.Weekday, s.Shift, strconv.Itoa(s.Horizon), q.Tier,
				strconv.FormatFloat(q.Mean, 'f', 2, 64), strconv.Itoa(q.Median)}
			for _, b := range q.Bands {
				row = append(row, strconv.Itoa(b.Low), strconv.Itoa(b.High))
			}
			row = append(row, strconv.Itoa(fc.Beds), strconv.FormatFloat(s.BedsBound, 'f', 4, 64), fc.MethodVersion)
			w.Write(row)
		}
	}
	w.Flush()
	return w.Error()
}
