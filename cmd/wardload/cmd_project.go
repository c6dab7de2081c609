package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"wardload/internal/csvfile"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "project", summary: "project one shift's care minutes and nurses from timed observations", run: runProject})
}

// Defaults of the project command. They are starting points, not advice.
const (
	defaultLevels  = "0.8,0.9"
	defaultCover   = 0.9
	defaultDraws   = 10_000
	defaultSeed    = 1
	defaultColumn  = "care_minutes"
	windowColumn   = "window_hours"
	allTiers       = "all" // the one group of a file without a tier column
	projectSummary = `Project the direct care minutes of one shift from timed care observations and a census,
and the nurses they need. FILE is a CSV file (or - for standard input) with a care minutes
column and optionally a "tier" column (without one, all rows are one tier named "all") and
a "window_hours" column (the hours each observation covered). Minutes observed over a window
other than the shift are scaled to the shift assuming a constant care rate.

The expected total and its variance add up tier by tier; bands are normal approximations,
and a seeded two-level bootstrap (resample each tier's observations, then its patients)
gives the simulated quantiles. Recommended nurses = the larger of the simulated need at the
cover level (rounded up) and the ratio floor (--patients-per-nurse).

Defaults: --levels 0.8,0.9, --cover 0.9, --draws 10000, --seed 1, --column care_minutes,
shortfall table from the lower of the mean need and the floor up to recommended + 3.

` + stats.Caution
)

// projectFlags maps the fields named by stats.Project's errors to flags.
var projectFlags = map[string]string{
	"shift_hours":          "--shift-hours",
	"direct_care_fraction": "--direct-care",
	"levels":               "--levels",
	"cover_level":          "--cover",
	"draws":                "--draws",
	"census":               "--census",
	"nurses_to":            "--nurses-from/--nurses-to",
	"patients_per_nurse":   "--patients-per-nurse",
}

func runProject(_ context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "project", "FILE", projectSummary)
	census := fs.String("census", "", "patients per tier on the shift, e.g. t1=4,t2=10 (tiers left out count 0) (required)")
	shiftHours := fs.Float64("shift-hours", 0, "length of the projected shift in hours, more than 0 and at most 25, the real length of a 24-hour shift over the autumn clock change (required)")
	windowHours := fs.Float64("window-hours", 0, "hours every observation covered; overrides a window_hours column (one of the two is required)")
	directCare := fs.Float64("direct-care", 0, "share of a nurse's shift available for direct care, more than 0 and at most 1 (required)")
	levels := fs.String("levels", defaultLevels, "two-sided levels of the normal bands, comma-separated, each between 0 and 1")
	cover := fs.Float64("cover", defaultCover, "one-sided probability the staffed hours should cover, between 0 and 1")
	draws := fs.Int("draws", defaultDraws, fmt.Sprintf("bootstrap draws, 1 to %d", stats.MaxDraws))
	seed := fs.Uint64("seed", defaultSeed, "seed of the bootstrap; the same seed gives the same result")
	nursesFrom := fs.Int("nurses-from", 0, "first headcount of the shortfall table (give with --nurses-to)")
	nursesTo := fs.Int("nurses-to", 0, "last headcount of the shortfall table (give with --nurses-from)")
	ppn := fs.Float64("patients-per-nurse", 0, "ratio floor: at most this many patients per nurse, as configured for your ward (0: no floor)")
	chargeCounts := fs.Bool("charge-nurse-counts", false, "the nurse in charge counts towards the ratio floor (otherwise one nurse is added)")
	column := fs.String("column", defaultColumn, "name of the care minutes column")
	asJSON := fs.Bool("json", false, "print one JSON object instead of a table")
	files, code, ok := parseInterleaved(e, fs, args)
	if !ok {
		return code
	}
	usage := func(format string, a ...any) int {
		fmt.Fprintf(e.stderr, "wardload project: "+format+"\n", a...)
		return exitUsage
	}
	if len(files) != 1 {
		return usage("give exactly one FILE (see wardload project --help)")
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	for _, name := range []string{"census", "shift-hours", "direct-care"} {
		if !set[name] {
			return usage("--%s is required", name)
		}
	}
	if set["nurses-from"] != set["nurses-to"] {
		return usage("--nurses-from and --nurses-to go together")
	}
	if set["window-hours"] && !(*windowHours > 0 && *windowHours <= 24) {
		return usage("--window-hours must be more than 0 and at most 24")
	}
	lv, err := parseLevels(*levels)
	if err != nil {
		return usage("--levels: %s", wardload.ErrorMessage(err))
	}

	table, code, err := readProjectFile(e, files[0])
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload project: %s: %s\n", files[0], oneLineMessage(err))
		return code
	}
	tiers, err := projectTiers(table, *column, *windowHours, set["window-hours"])
	if err != nil {
		return usage("%s: %s", files[0], oneLineMessage(err))
	}
	codes := make([]string, len(tiers))
	for i, t := range tiers {
		codes[i] = t.Code
	}
	counts, err := parseCensus(*census, codes)
	if err != nil {
		return usage("--census: %s", wardload.ErrorMessage(err))
	}
	for i := range tiers {
		tiers[i].Patients = counts[tiers[i].Code]
	}
	in := stats.ProjectionInput{
		Tiers: tiers, ShiftHours: *shiftHours, DirectCareFraction: *directCare,
		Levels: lv, Cover: *cover, Draws: *draws, Seed: *seed,
		NursesFrom: *nursesFrom, NursesTo: *nursesTo,
	}
	if *ppn != 0 { // NaN and negatives too: Project reports them against the flag

		in.Floor = &stats.FloorSpec{PatientsPerNurse: *ppn, ChargeNurseCounts: *chargeCounts}
	}
	p, err := stats.Project(in)
	if err != nil {
		if wardload.ErrorCode(err) != wardload.EINVALID {
			fmt.Fprintf(e.stderr, "wardload project: %s\n", wardload.ErrorMessage(err))
			return exitFailure
		}
		if flagName, ok := projectFlags[wardload.ErrorField(err)]; ok {
			return usage("%s: %s", flagName, wardload.ErrorMessage(err))
		}
		return usage("%s: %s", files[0], wardload.ErrorMessage(err))
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		if err := enc.Encode(p); err != nil {
			fmt.Fprintf(e.stderr, "wardload project: cannot write the result: %v\n", err)
			return exitFailure
		}
		return exitOK
	}
	if err := writeProjection(e.stdout, p); err != nil {
		fmt.Fprintf(e.stderr, "wardload project: cannot write the result: %v\n", err)
		return exitFailure
	}
	return exitOK
}

// readProjectFile reads FILE or, for "-", standard input. A file
// that cannot be opened is bad input (2), as in summarize and correlate:
// the argument names no readable file.
func readProjectFile(e *env, name string) (*csvfile.Table, int, error) {
	t, err := readTable(e, name)
	switch {
	case errors.Is(err, errCannotOpen):
		return nil, exitUsage, errors.New("cannot open the file")
	case wardload.ErrorCode(err) == wardload.EINVALID:
		return nil, exitUsage, err
	case err != nil:
		return nil, exitFailure, errors.New("cannot read the file")
	}
	return t, exitOK, nil
}

// projectTiers groups the care minutes column by tier and attaches each
// row's window: the --window-hours value when given, else the
// window_hours column. Values are checked here, row by row, so that a bad
// cell is reported with its line and column.
func projectTiers(t *csvfile.Table, column string, window float64, windowFlag bool) ([]stats.TierSample, error) {
	groups, err := t.Groups(column)
	if err != nil {
		return nil, err
	}
	var windows *csvfile.Column
	if !windowFlag {
		if t.Index(windowColumn) < 0 {
			return nil, wardload.FieldErrorf(wardload.EINVALID, windowColumn,
				"there is no %q column; give --window-hours for the hours each observation covered.", windowColumn)
		}
		if windows, err = t.Floats(windowColumn); err != nil {
			return nil, err
		}
	}
	tiers := make([]stats.TierSample, len(groups))
	for i, g := range groups {
		ts := stats.TierSample{Code: g.Tier, CareMinutes: g.Values, WindowHours: make([]float64, len(g.Values))}
		if ts.Code == "" {
			ts.Code = allTiers
		}
		for j, v := range g.Values {
			line := t.Line(g.Rows[j])
			if v < 0 {
				return nil, wardload.FieldErrorf(wardload.EINVALID, column, "line %d, column %q: care minutes must be at least 0.", line, column)
			}
			w := window
			if windows != nil {
				w = windows.Values[g.Rows[j]-1]
				if !(w > 0 && w <= 24) {
					return nil, wardload.FieldErrorf(wardload.EINVALID, windowColumn, "line %d, column %q: the window must be more than 0 and at most 24 hours.", line, windowColumn)
				}
			}
			ts.WindowHours[j] = w
		}
		tiers[i] = ts
	}
	return tiers, nil
}

// parseCensus parses "t1=4,t2=10" into patients per tier. Every tier must
// be one of known (the tiers in the file); a tier may appear once; counts
// are whole numbers from 0 to stats.MaxPatients written with digits only.
// Tiers of the file left out count 0. Errors are EINVALID with Field
// "census" and a message meant to follow "--census: ".
func parseCensus(s string, known []string) (map[string]int, error) {
	bad := func(format string, a ...any) error {
		return wardload.FieldErrorf(wardload.EINVALID, "census", format, a...)
	}
	isKnown := map[string]bool{}
	for _, k := range known {
		isKnown[k] = true
	}
	counts := map[string]int{}
	if strings.TrimSpace(s) == "" {
		return nil, bad("give patients per tier, e.g. t1=4,t2=10.")
	}
	for _, item := range strings.Split(s, ",") {
		tier, num, found := strings.Cut(item, "=")
		tier, num = strings.TrimSpace(tier), strings.TrimSpace(num)
		if !found || tier == "" {
			return nil, bad("%q is not TIER=N (e.g. t1=4).", clip(item))
		}
		if !isKnown[tier] {
			return nil, bad("tier %q is not in the file (its tiers are %s).", clip(tier), strings.Join(sortedCopy(known), ", "))
		}
		if _, dup := counts[tier]; dup {
			return nil, bad("tier %q is given twice.", tier)
		}
		if strings.HasPrefix(num, "-") {
			return nil, bad("the count for %s is negative; patients are counted from 0.", tier)
		}
		if num == "" || strings.Trim(num, "0123456789") != "" {
			return nil, bad("the count for %s, %q, is not a whole number.", tier, clip(num))
		}
		n, err := strconv.Atoi(num)
		if err != nil || n > stats.MaxPatients {
			return nil, bad("the count for %s is more than %d.", tier, stats.MaxPatients)
		}
		counts[tier] = n
	}
	return counts, nil
}

// parseLevels parses a comma-separated list of band levels. Range checks
// are left to stats.Project so there is one rule.
func parseLevels(s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "levels", "%q is not a number.", clip(f))
		}
		out = append(out, v)
	}
	return out, nil
}

// clip shortens user text quoted back in a message.
func clip(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:40]) + "…"
	}
	return s
}

func sortedCopy(s []string) []string {
	c := append([]string(nil), s...)
	sort.Strings(c)
	return c
}

// oneLineMessage is the user-facing message of err on one line.
func oneLineMessage(err error) string {
	msg := err.Error()
	if wardload.ErrorCode(err) != wardload.EINTERNAL {
		msg = wardload.ErrorMessage(err)
	}
	return strings.Join(strings.Fields(msg), " ")
}

// writeProjection prints the projection as a readable report.
func writeProjection(out io.Writer, p *stats.Projection) error {
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }
	num := func(n stats.Number) string {
		if !n.Defined {
			return "–"
		}
		return f(n.Value)
	}
	fmt.Fprintf(w, "Projection of one %g-hour shift (%s)\n", p.ShiftHours, p.MethodVersion)
	fmt.Fprintf(w, "%d patients; direct-care fraction %g; cover level %g\n\n", p.Patients, p.DirectCareFraction, p.CoverLevel)
	fmt.Fprintln(w, "tier\tpatients\tobservations\tmean min/patient\tsd\texpected min\t")
	for _, t := range p.Tiers {
		fmt.Fprintf(w, "%s\t%d\t%d\t%s\t%s\t%s\n", t.Code, t.Patients, t.Observations, num(t.MeanMinutes), num(t.SDMinutes), f(t.ExpectedMinutes))
	}
	fmt.Fprintf(w, "\nExpected care minutes\t%s\t(sd %s = √(%s patient + %s estimate))\n",
		f(p.ExpectedMinutes), f(p.SDMinutes), f(p.VariancePatient), f(p.VarianceEstimate))
	for _, b := range p.Bands {
		fmt.Fprintf(w, "%g%% normal band\t%s .. %s\t\n", 100*b.Level, f(b.Low), f(b.High))
	}
	s := p.Simulation
	fmt.Fprintf(w, "Simulated (%d draws, seed %d)\tmean %s (MC SE %s)\tP10 %s  P50 %s  P90 %s\n",
		s.Draws, s.Seed, f(s.Mean), num(s.MeanSE), f(s.P10), f(s.P50), f(s.P90))
	fmt.Fprintln(w, "\nNurses\tunrounded\trounded up\t")
	n := p.Nurses
	fmt.Fprintf(w, "at the mean (%s nurse hours)\t%.2f\t%d\n", f(p.NurseHours.Expected), n.ExpectedUnrounded, n.Expected)
	fmt.Fprintf(w, "at %g cover, normal (%s h)\t%.2f\t%d\n", p.CoverLevel, f(p.NurseHours.Cover), n.CoverUnrounded, n.Cover)
	fmt.Fprintf(w, "at %g cover, simulated (%s h)\t%.2f\t%d\n", p.CoverLevel, f(p.NurseHours.CoverSimulated), n.CoverSimulatedUnrounded, n.CoverSimulated)
	if n.Floor != nil {
		fmt.Fprintf(w, "ratio floor\t\t%d\n", *n.Floor)
	} else {
		fmt.Fprintf(w, "ratio floor\t\tnone given\n")
	}
	fmt.Fprintf(w, "recommended\t\t%d\t(decided by %s)\n", n.Recommended, strings.ReplaceAll(n.DecidedBy, "_", " "))
	fmt.Fprintln(w, "\nNurses\tcapacity min\tP(shortfall) normal\tsimulated\t")
	for _, r := range p.Shortfall {
		fmt.Fprintf(w, "%d\t%s\t%.4f\t%.4f\n", r.Nurses, f(r.CapacityMinutes), r.Probability, r.SimulatedProbability)
	}
	if err := w.Flush(); err != nil {
		return err
	}
	if p.Floor != nil {
		fmt.Fprintf(out, "\n%s\n", p.Floor.Description)
	} else {
		// The model's warnings say no floor was applied; name the flag here.
		fmt.Fprintf(out, "\nNo ratio floor was given (--patients-per-nurse).\n")
	}
	if len(p.Warnings) > 0 {
		fmt.Fprintln(out, "\nWarnings:")
		for _, m := range p.Warnings {
			fmt.Fprintf(out, "  - %s\n", m)
		}
	}
	_, err := fmt.Fprintf(out, "\n%s\n", p.Caution)
	return err
}
