package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"
	"unicode"
	"unicode/utf8"

	"wardload/internal/csvfile"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "project", summary: "project one shift's care minutes and nurses from timed observations", run: runProject})
}

// Defaults of the project command. They are starting points, not advice.
const (
	defaultLevels = "0.8,0.9"
	defaultCover  = 0.9
	defaultDraws  = 10_000
	defaultSeed   = 1
	defaultColumn = "care_minutes"
	windowColumn  = "window_hours"
	dateColumn    = "date"  // optional: the date of each observation's shift, YYYY-MM-DD
	shiftColumn   = "shift" // optional, with dateColumn: the shift's name
	maxShiftName  = 40      // as wardload.ShiftPattern names
	allTiers      = "all"   // the one group of a file without a tier column
)

var projectSummary = `Project the direct care minutes of one shift from timed care observations and a census,
and the nurses they need. FILE is a CSV file (or - for standard input) with a care minutes
column and optionally a "tier" column (without one, all rows are one tier named "all"), a
"window_hours" column (the hours each observation covered), and "date" (YYYY-MM-DD) and
"shift" (any name) columns that together name the shift occurrence each observation was
made on. Minutes observed over a window other than the shift are scaled to the shift
assuming a constant care rate.

Each tier's care minutes are modelled on the log scale, with an effect shared by every
patient of one shift occurrence and a common trend, both estimated only from a date column
(with a shift column where a day has more than one shift); values far beyond a tier's
log-scale outer fences are set aside as likely entry errors. Totals are simulated from the
predictive distribution, which carries the uncertainty of the estimated parameters, and the
recommended headcount is the larger of the nurses needed at the cover level (rounded up)
and the ratio floor (--patients-per-nurse).

A tier with patients and fewer than ` + strconv.Itoa(stats.MinTierObservations) + ` usable observations makes the projection
decline: it names the tier and how many more observations it needs, recommends the ratio
floor alone (or nothing without a floor) and shows no shortfall chance. A tier whose
observations are all equal is refused as bad input.

Defaults: --levels 0.8,0.9, --cover 0.9, --draws 10000, --seed 1, --column care_minutes,
--date the day after the newest observation date (with a date column), shortfall table from
the lower of the mean need and the floor up to recommended + 3.

` + stats.Caution

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
	directCare := fs.Float64("direct-care", 0, "share of a nurse's shift available for direct care, from 0.1 to 1 (required)")
	levels := fs.String("levels", defaultLevels, fmt.Sprintf("two-sided levels of the predictive bands, comma-separated, each from 0.01 to %g", stats.MaxCover))
	cover := fs.Float64("cover", defaultCover, fmt.Sprintf("one-sided probability the staffed hours should cover, from %g to %g", stats.MinCover, stats.MaxCover))
	draws := fs.Int("draws", defaultDraws, fmt.Sprintf("simulation draws from the predictive distribution, %d to %d", stats.MinDraws, stats.MaxDraws))
	seed := fs.Uint64("seed", defaultSeed, "seed of the simulation; the same seed gives the same result")
	date := fs.String("date", "", "date of the projected shift, YYYY-MM-DD, from which observation ages count (needs a date column; default: the day after the newest observation date)")
	nursesFrom := fs.Int("nurses-from", 0, "first headcount of the shortfall table (give with --nurses-to)")
	nursesTo := fs.Int("nurses-to", 0, "last headcount of the shortfall table (give with --nurses-from)")
	ppn := fs.Float64("patients-per-nurse", 0, "ratio floor: at most this many patients per nurse, as configured for your ward (0: no floor)")
	chargeCounts := fs.Bool("charge-nurse-counts", false, "the nurse in charge counts towards the ratio floor and gives direct care (otherwise one nurse who takes no patients is added)")
	column := fs.String("column", defaultColumn, "name of the care minutes column")
	asJSON := fs.Bool("json", false, "print one JSON object instead of a report")
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
	// As the ward settings: under a tenth of a shift for direct care is a
	// typing error (0.0075 for 0.75) that would turn into absurd headcounts.
	if !(*directCare >= wardload.MinDirectCareFraction && *directCare <= 1) {
		return usage("--direct-care: the direct-care fraction must be from %g to 1.", wardload.MinDirectCareFraction)
	}
	if set["window-hours"] && !(*windowHours > 0 && *windowHours <= 24) {
		return usage("--window-hours must be more than 0 and at most 24")
	}
	if set["date"] {
		if _, err := time.Parse(time.DateOnly, *date); err != nil {
			return usage("--date: %q is not a date (YYYY-MM-DD).", clip(*date))
		}
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
	tiers, newest, err := projectTiers(table, *column, *windowHours, set["window-hours"])
	if err != nil {
		return usage("%s: %s", files[0], oneLineMessage(err))
	}
	switch {
	case set["date"] && newest == "":
		return usage("--date: %s has no %q column, so there are no observation dates to count from; leave --date out or add the column.", files[0], dateColumn)
	case !set["date"] && newest != "":
		*date = nextDay(newest)
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
		NursesFrom: *nursesFrom, NursesTo: *nursesTo, Date: *date,
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
		field := wardload.ErrorField(err)
		if flagName, ok := projectFlags[field]; ok {
			return usage("%s: %s", flagName, wardload.ErrorMessage(err))
		}
		if field == "date" && set["date"] {
			return usage("--date: %s", wardload.ErrorMessage(err))
		}
		if field == dateColumn || field == shiftColumn {
			return usage("%s: column %q: %s", files[0], field, wardload.ErrorMessage(err))
		}
		return usage("%s: %s", files[0], wardload.ErrorMessage(err))
	}
	// A tier with enough observations that are all equal makes the model
	// decline; on the command line that is a problem with the file (a
	// value pasted down a column, say), so it is refused like bad input,
	// with the model's reason. (A small tier declines for want of
	// observations, which is not bad input.)
	for _, t := range p.Tiers {
		if t.Patients > 0 && t.Used >= stats.MinTierObservations && t.LogSD.Defined && t.LogSD.Value == 0 {
			return usage("%s: column %q: %s", files[0], *column, zeroSpreadReason(p, t.Code))
		}
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		if err := enc.Encode(p); err != nil {
			fmt.Fprintf(e.stderr, "wardload project: cannot write the result: %v\n", err)
			return exitFailure
		}
		return exitOK
	}
	var b bytes.Buffer // buffered, so a failure never leaves half a report
	writeProjection(&b, p, *date)
	if _, err := e.stdout.Write(b.Bytes()); err != nil {
		fmt.Fprintf(e.stderr, "wardload project: cannot write the result: %v\n", err)
		return exitFailure
	}
	return exitOK
}

// zeroSpreadReason is the model's sentence on tier code (from
// Projection.Insufficient), or one of our own if it has none.
func zeroSpreadReason(p *stats.Projection, code string) string {
	for _, s := range p.Insufficient {
		if strings.HasPrefix(s, "Tier "+code+":") {
			return s
		}
	}
	return fmt.Sprintf("Tier %s: its usable observations are all equal, so its spread cannot be estimated.", code)
}

// nextDay returns the day after d (YYYY-MM-DD, already checked).
func nextDay(d string) string {
	day, _ := time.Parse(time.DateOnly, d)
	return day.AddDate(0, 0, 1).Format(time.DateOnly)
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
// row's window (the --window-hours value when given, else the
// window_hours column) and, when the file has them, its date and shift.
// It returns the newest date ("" without a date column). Values are
// checked here, row by row, so that a bad cell is reported with its line
// and column.
func projectTiers(t *csvfile.Table, column string, window float64, windowFlag bool) ([]stats.TierSample, string, error) {
	groups, err := t.Groups(column)
	if err != nil {
		return nil, "", err
	}
	var windows *csvfile.Column
	if !windowFlag {
		if t.Index(windowColumn) < 0 {
			return nil, "", wardload.FieldErrorf(wardload.EINVALID, windowColumn,
				"there is no %q column; give --window-hours for the hours each observation covered.", windowColumn)
		}
		if windows, err = t.Floats(windowColumn); err != nil {
			return nil, "", err
		}
	}
	dates, shifts, newest, err := occurrenceColumns(t)
	if err != nil {
		return nil, "", err
	}
	tiers := make([]stats.TierSample, len(groups))
	for i, g := range groups {
		ts := stats.TierSample{Code: g.Tier, CareMinutes: g.Values, WindowHours: make([]float64, len(g.Values))}
		if ts.Code == "" {
			ts.Code = allTiers
		}
		for j, v := range g.Values {
			row := g.Rows[j]
			line := t.Line(row)
			if v < 0 {
				return nil, "", wardload.FieldErrorf(wardload.EINVALID, column, "line %d, column %q: care minutes must be at least 0.", line, column)
			}
			w := window
			if windows != nil {
				w = windows.Values[row-1]
				if !(w > 0 && w <= 24) {
					return nil, "", wardload.FieldErrorf(wardload.EINVALID, windowColumn, "line %d, column %q: the window must be more than 0 and at most 24 hours.", line, windowColumn)
				}
			}
			ts.WindowHours[j] = w
			if dates != nil {
				ts.Dates = append(ts.Dates, dates[row-1])
			}
			if shifts != nil {
				ts.Shifts = append(ts.Shifts, shifts[row-1])
			}
		}
		tiers[i] = ts
	}
	return tiers, newest, nil
}

// occurrenceColumns reads the optional date and shift columns: every date
// cell must be a real YYYY-MM-DD date from 1900 on, every shift cell a
// name of one line and at most 40 characters. A shift column without a
// date column is refused: a shift's name alone does not say which
// occurrence it was. Both nil: no date column.
func occurrenceColumns(t *csvfile.Table) (dates, shifts []string, newest string, err error) {
	hasDate, hasShift := t.Index(dateColumn) >= 0, t.Index(shiftColumn) >= 0
	if hasShift && !hasDate {
		return nil, nil, "", wardload.FieldErrorf(wardload.EINVALID, shiftColumn,
			"line 1: there is a %q column but no %q column; a shift names an occurrence only with its date (YYYY-MM-DD).", shiftColumn, dateColumn)
	}
	if !hasDate {
		return nil, nil, "", nil
	}
	dates, _ = t.Strings(dateColumn)
	for i, d := range dates {
		day, perr := time.Parse(time.DateOnly, d)
		if perr != nil || day.Year() < 1900 {
			return nil, nil, "", wardload.FieldErrorf(wardload.EINVALID, dateColumn,
				"line %d, column %q: %q is not a date (YYYY-MM-DD, from 1900 on).", t.Lines[i], dateColumn, clip(d))
		}
		newest = max(newest, d)
	}
	if !hasShift {
		return dates, nil, newest, nil
	}
	shifts, _ = t.Strings(shiftColumn)
	for i, s := range shifts {
		if s == "" || utf8.RuneCountInString(s) > maxShiftName || strings.IndexFunc(s, unicode.IsControl) >= 0 {
			return nil, nil, "", wardload.FieldErrorf(wardload.EINVALID, shiftColumn,
				"line %d, column %q: %q is not a shift name (one line of 1 to %d characters).", t.Lines[i], shiftColumn, clip(s), maxShiftName)
		}
	}
	return dates, shifts, newest, nil
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
	for item := range strings.SplitSeq(s, ",") {
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
	for f := range strings.SplitSeq(s, ",") {
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

// writeProjection prints the projection as a readable report: the
// recommendation and what decided it first, then the rule, floor, bands,
// shortfall table, tiers, data basis, warnings and the caution. date is
// the projected shift's date ("" when unknown).
func writeProjection(out io.Writer, p *stats.Projection, date string) error {
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }
	num := func(n stats.Number) string {
		if !n.Defined {
			return "–"
		}
		return f(n.Value)
	}
	on := ""
	if date != "" {
		on = " on " + date
	}
	fmt.Fprintf(w, "Projection of one %g-hour shift%s (%s)\n", p.ShiftHours, on, p.MethodVersion)
	fmt.Fprintf(w, "%d patients; direct-care fraction %g; cover level %s\n\n", p.Patients, p.DirectCareFraction, levelText(p.CoverLevel))
	n := p.Nurses
	if n.Recommended != nil {
		fmt.Fprintf(w, "Recommended nurses: %d, decided by %s.\n", *n.Recommended, decidedByText(n, p.CoverLevel))
	} else {
		fmt.Fprintf(w, "Recommended nurses: none. Too few observations to estimate care time, and no ratio floor was given (--patients-per-nurse).\n")
	}
	fmt.Fprintf(w, "Capacity rule: %s\n", p.CapacityRule)
	if p.Floor != nil {
		fmt.Fprintf(w, "%s Floor: %d nurses.\n", p.Floor.Description, p.Floor.Nurses)
	} else {
		// The model's warnings say no floor was applied; name the flag here.
		fmt.Fprintf(w, "No ratio floor was given (--patients-per-nurse).\n")
	}
	if !p.DataSufficient {
		fmt.Fprintln(w, "\nInsufficient data: the care-time part of the projection declines; no band or shortfall chance is shown.")
		for _, s := range p.Insufficient {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	} else {
		nurseHours := func(minutes float64) string { return f(minutes / 60 / p.DirectCareFraction) }
		fmt.Fprintf(w, "\nCare minutes\texpected %s\tmedian %s\tat the %s cover level %s\n",
			num(p.ExpectedMinutes), num(p.MedianMinutes), levelText(p.CoverLevel), num(p.CoverMinutes))
		fmt.Fprintf(w, "Nurse hours\texpected %s\tmedian %s\tat the %s cover level %s\n",
			num(p.NurseHours.Expected), num(p.NurseHours.Median), levelText(p.CoverLevel), num(p.NurseHours.Cover))
		for _, b := range p.Bands {
			fmt.Fprintf(w, "%s predictive band\t%s to %s care minutes\t%s to %s nurse hours\n",
				levelText(b.Level), f(b.Low), f(b.High), nurseHours(b.Low), nurseHours(b.High))
		}
		fmt.Fprintf(w, "Care-giving nurses at the cover level\t%s, rounded up %d\tplus %d in charge = %d\n",
			num(n.CoverUnrounded), deref(n.CareGiving), n.InCharge, deref(n.Cover))
		fmt.Fprintln(w, "\nNurses\tcare-giving\tcapacity min\tP(shortfall), 95% interval\t")
		for _, r := range p.Shortfall {
			mark := ""
			if n.Recommended != nil && r.Nurses == *n.Recommended {
				mark = "\t<- recommended"
			}
			fmt.Fprintf(w, "%d\t%d\t%s\t%s%s\n", r.Nurses, r.CareGivingNurses, f(r.CapacityMinutes), r.Text, mark)
		}
	}
	fmt.Fprintln(w, "\nTier\tpatients\tobservations\tused\theld out\tmedian min/patient\tneed more\t")
	for _, t := range p.Tiers {
		need := "–"
		if t.NeedMore > 0 {
			need = strconv.Itoa(t.NeedMore)
		}
		fmt.Fprintf(w, "%s\t%d\t%d\t%d\t%d\t%s\t%s\n", t.Code, t.Patients, t.Observations, t.Used, t.HeldOut, num(t.MedianMinutes), need)
	}
	if err := w.Flush(); err != nil {
		return err
	}
	if len(p.HeldOut) > 0 {
		fmt.Fprintln(out, "\nHeld out (likely entry errors, beyond the tier's log-scale outer fence; review them):")
		for _, h := range p.HeldOut {
			fmt.Fprintf(out, "  - tier %s%s: %g minutes, far %s the tier's other values\n", h.Tier, onDate(h.Date), h.CareMinutes, h.Side)
		}
	}
	fmt.Fprintf(out, "\nTrend: %s\n", trendText(p.Trend))
	if p.Trend.Estimated {
		if p.Trend.Followed {
			fmt.Fprintln(out, "       The projection follows it to the projected shift.")
		} else {
			fmt.Fprintln(out, "       Not followed (not clear enough): the projection uses the lookback's level.")
		}
	}
	fmt.Fprintf(out, "Shift-level effect: %s\n", shiftEffectText(p.ShiftEffect))
	if p.DataSufficient {
		s := p.Simulation
		fmt.Fprintf(out, "Simulation: %d draws, seed %d; Monte Carlo standard error of the cover quantile %s minutes.\n", s.Draws, s.Seed, num(s.CoverSE))
	}
	fmt.Fprintf(out, "Method: %s\n", p.Method)
	if len(p.Warnings) > 0 {
		fmt.Fprintln(out, "\nWarnings:")
		for _, m := range p.Warnings {
			fmt.Fprintf(out, "  - %s\n", m)
		}
	}
	_, err := fmt.Fprintf(out, "\n%s\n", p.Caution)
	return err
}

// decidedByText says Nurses.DecidedBy in words.
func decidedByText(n stats.Nurses, cover float64) string {
	switch n.DecidedBy {
	case stats.DecidedByCover:
		return "care time at the " + levelText(cover) + " cover level (the ratio floor needs fewer or none was given)"
	case stats.DecidedByFloor:
		return "the ratio floor (care time at the " + levelText(cover) + " cover level needs fewer)"
	case stats.DecidedByBoth:
		return "care time at the " + levelText(cover) + " cover level and the ratio floor, which agree"
	case stats.DecidedByInsufficient:
		return "the ratio floor alone: too few observations to estimate care time"
	}
	return strings.ReplaceAll(n.DecidedBy, "_", " ")
}

// trendText says a Trend on one line.
func trendText(t stats.Trend) string {
	if !t.Estimated {
		return "could not be estimated: " + t.Reason + "."
	}
	return fmt.Sprintf("%s%% per 4 weeks (95%% interval %s%% to %s%%), common to all tiers.",
		signed(t.PercentPer28Days.Value), signed(t.Low.Value), signed(t.High.Value))
}

// shiftEffectText says a ShiftEffect on one line: the SD on the log scale
// and, for reading, the factor exp(SD) by which a shift one SD heavier
// raises every patient's care.
func shiftEffectText(s stats.ShiftEffect) string {
	if !s.Estimated {
		return "could not be estimated: " + s.Reason + "."
	}
	return fmt.Sprintf("SD %.3f on the log scale from %d shift occurrences (a shift one SD heavier needs about %s%% more care from every patient).",
		s.SDLog.Value, s.Occurrences, strconv.FormatFloat(100*math.Expm1(s.SDLog.Value), 'f', 0, 64))
}

// signed formats a percentage with its sign and no decimals, "+3", "−2".
func signed(v float64) string {
	s := strconv.FormatFloat(v, 'f', 0, 64)
	switch {
	case s == "0" || s == "-0":
		return "0"
	case strings.HasPrefix(s, "-"):
		return "−" + s[1:]
	}
	return "+" + s
}

// levelText says a probability level as a percentage, "90%", "97.5%".
func levelText(l float64) string {
	return strconv.FormatFloat(math.Round(100*l*1e6)/1e6, 'f', -1, 64) + "%"
}

func onDate(d string) string {
	if d == "" {
		return ""
	}
	return " on " + d
}

func deref(n *int) int {
	if n == nil {
		return 0
	}
	return *n
}
