package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"wardload/internal/csvfile"
	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "backtest", summary: "check past projections against what happened, from a CSV file or a ward: band coverage and PIT histogram", run: runBacktest})
}

// Defaults of the backtest command (those of stats.Backtest; the lookback
// and cover of a ward come from its settings).
const (
	defaultBacktestWeeks  = 12
	defaultBacktestLevels = "0.5,0.8,0.9"
	defaultBacktestDraws  = 2000
)

var backtestSummary = `Measure how well projections would have done on past data. For each of the last --weeks weeks,
the model of wardload project is fitted on each shift pattern's observations of the
--lookback-weeks weeks before that week, and every observation of the week is compared with
its predictive distribution (a rolling-origin backtest). Reported per tier and for shift
totals: how many were checked, the share inside each central band (--levels) against the
level expected, the share at or under the --cover quantile, and the histogram of the
probability integral transform (PIT) in tenths, flat when the model is calibrated.

Two sources:
  wardload backtest FILE          a CSV file (or - for stdin) with "date" (YYYY-MM-DD), "shift",
                                  "tier" and care minutes columns. Without a "window_hours"
                                  column the minutes are per patient per shift; with one, give
                                  --shift-hours and each value is scaled to the shift assuming a
                                  constant care rate. Every date and shift's observations are
                                  taken to cover all its patients, so each is also checked as a
                                  shift total.
  wardload backtest --ward CODE   the ward's included observations in the database (--db,
                                  --data-dir), scaled to each shift pattern's nominal hours,
                                  with the ward's cover level and lookback unless given. A shift
                                  is checked as a total only where the observations of that
                                  date and shift match its newest census tier by tier.

Defaults: --weeks 12, --levels 0.5,0.8,0.9, --draws 2000, --seed 1, --column care_minutes;
for FILE --lookback-weeks 8 and --cover 0.9 (a new ward's settings) and --end the newest
observation date; for --ward the ward's settings and --end yesterday in the ward's time zone.`

// backtestFlags maps the fields named by stats.Backtest's errors to flags.
var backtestFlags = map[string]string{
	"weeks":       "--weeks/--lookback-weeks",
	"cover_level": "--cover",
	"draws":       "--draws",
	"end":         "--end",
}

// How each source chooses the shift totals it checks, said under the table.
const (
	fileTotalsNote = "Every date and shift's observations are taken to cover all its patients, so each was also checked as a shift total."
	wardTotalsNote = "A shift was checked as a total only where its observations match its newest census tier by tier; shifts without a census were not."
)

// backtestOptions are the flags both sources share.
type backtestOptions struct {
	opts      stats.BacktestOptions
	set       map[string]bool
	column    string
	shiftHrs  float64
	asJSON    bool
	source    string // said in the report's first line
	totalNote string // how shift totals were chosen
}

func runBacktest(ctx context.Context, e *env, args []string) int {
	const name = "backtest"
	fs := newFlagSet(e, name, "FILE | --ward CODE", backtestSummary)
	wardCode := fs.String("ward", "", "backtest this ward's observations in the database instead of a FILE")
	weeks := fs.Int("weeks", defaultBacktestWeeks, "weeks checked, counted back from --end, 1 to 104")
	lookback := fs.Int("lookback-weeks", 0, "weeks of history each check may use, 1 to 104 (default: the ward's lookback; 8 for FILE)")
	cover := fs.Float64("cover", 0, fmt.Sprintf("cover level whose one-sided hit rate is checked, from %g to %g (default: the ward's cover level; 0.9 for FILE)", stats.MinCover, stats.MaxCover))
	levels := fs.String("levels", defaultBacktestLevels, fmt.Sprintf("two-sided band levels, comma-separated, each from 0.01 to %g", stats.MaxCover))
	draws := fs.Int("draws", defaultBacktestDraws, "predictive draws per checked shift total, 100 to 1000000")
	seed := fs.Uint64("seed", defaultSeed, "seed of the simulation; the same seed gives the same result")
	end := fs.String("end", "", "last date checked, YYYY-MM-DD (default: the newest observation date for FILE, yesterday for --ward)")
	shiftHours := fs.Float64("shift-hours", 0, "FILE with a window_hours column: the shift length its minutes are scaled to, more than 0 and at most 25")
	column := fs.String("column", defaultColumn, "FILE: name of the care minutes column")
	asJSON := fs.Bool("json", false, "print one JSON object instead of a report")
	so := addStoreFlags(fs)
	files, code, ok := parseInterleaved(e, fs, args)
	if !ok {
		return code
	}
	usage := func(format string, a ...any) int {
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, fmt.Sprintf(format, a...))
		return exitUsage
	}
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	switch {
	case *wardCode == "" && len(files) != 1:
		return usage("give exactly one FILE, or --ward CODE (see wardload backtest --help)")
	case *wardCode != "" && len(files) != 0:
		return usage("give a FILE or --ward, not both")
	}
	// stats.Backtest reads a zero as "default"; given on the command line
	// it is a mistake, so it is refused here.
	for _, z := range []struct {
		flag string
		zero bool
	}{{"weeks", *weeks == 0}, {"lookback-weeks", *lookback == 0}, {"cover", *cover == 0}, {"draws", *draws == 0}} {
		if set[z.flag] && z.zero {
			return usage("--%s must not be 0 (see wardload backtest --help)", z.flag)
		}
	}
	lv, err := parseLevels(*levels)
	if err != nil {
		return usage("--levels: %s", wardload.ErrorMessage(err))
	}
	for _, l := range lv {
		if !(l >= 0.01 && l <= stats.MaxCover) {
			return usage("--levels: band levels must be from 0.01 to %g.", stats.MaxCover)
		}
	}
	if set["end"] {
		if _, err := wardload.ParseDate(*end); err != nil {
			return usage("--end: %s", wardload.ErrorMessage(err))
		}
	}
	bo := &backtestOptions{
		opts: stats.BacktestOptions{Weeks: *weeks, LookbackWeeks: *lookback, Cover: *cover, Levels: lv,
			Draws: *draws, Seed: *seed, End: *end},
		set: set, column: *column, shiftHrs: *shiftHours, asJSON: *asJSON,
	}
	var obs []stats.BacktestObservation
	if *wardCode != "" {
		for _, f := range []string{"shift-hours", "column"} {
			if set[f] {
				return usage("--%s is for FILE; with --ward each shift's own hours and the stored minutes are used", f)
			}
		}
		var code int
		obs, code = loadWardObservations(ctx, e, so, *wardCode, bo)
		if code != exitOK {
			return code
		}
	} else {
		var code int
		obs, code = readBacktestFile(e, files[0], bo)
		if code != exitOK {
			return code
		}
	}
	if bo.opts.LookbackWeeks == 0 {
		bo.opts.LookbackWeeks = wardload.DefaultSettings(0).LookbackWeeks
	}
	if bo.opts.Cover == 0 {
		bo.opts.Cover = wardload.DefaultSettings(0).CoverLevel
	}
	res, err := stats.Backtest(obs, bo.opts)
	if err != nil {
		if wardload.ErrorCode(err) != wardload.EINVALID {
			fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, wardload.ErrorMessage(err))
			return exitFailure
		}
		if f, ok := backtestFlags[wardload.ErrorField(err)]; ok {
			return usage("%s: %s", f, wardload.ErrorMessage(err))
		}
		return usage("%s: %s", bo.source, wardload.ErrorMessage(err))
	}
	var b bytes.Buffer // buffered, so a failure never leaves half a report
	if bo.asJSON {
		err = json.NewEncoder(&b).Encode(res)
	} else {
		err = writeBacktest(&b, res, bo)
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

// readBacktestFile reads FILE's date, shift, tier and care minutes
// columns (and window_hours, scaled to --shift-hours) into observations.
// Bad cells are refused with their line and column.
func readBacktestFile(e *env, file string, bo *backtestOptions) ([]stats.BacktestObservation, int) {
	bo.source = file
	bo.totalNote = fileTotalsNote
	usage := func(format string, a ...any) ([]stats.BacktestObservation, int) {
		fmt.Fprintf(e.stderr, "wardload backtest: %s\n", fmt.Sprintf(format, a...))
		return nil, exitUsage
	}
	if bo.set["shift-hours"] && !(bo.shiftHrs > 0 && bo.shiftHrs <= 25) {
		return usage("--shift-hours must be more than 0 and at most 25")
	}
	t, code, err := readProjectFile(e, file)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload backtest: %s: %s\n", file, oneLineMessage(err))
		return nil, code
	}
	for _, c := range []string{dateColumn, shiftColumn, csvfile.TierColumn} {
		if t.Index(c) < 0 {
			return usage("%s: line 1: there is no %q column; a backtest needs %q, %q, %q and %q.", file, c,
				dateColumn, shiftColumn, csvfile.TierColumn, bo.column)
		}
	}
	minutes, err := t.Floats(bo.column)
	if err != nil {
		return usage("%s: %s", file, oneLineMessage(err))
	}
	dates, shifts, _, err := occurrenceColumns(t)
	if err != nil {
		return usage("%s: %s", file, oneLineMessage(err))
	}
	tiers, _ := t.Strings(csvfile.TierColumn)
	var windows *csvfile.Column
	switch hasWindow := t.Index(windowColumn) >= 0; {
	case hasWindow && !bo.set["shift-hours"]:
		return usage("%s has a %q column: give --shift-hours, the shift length its minutes are scaled to", file, windowColumn)
	case !hasWindow && bo.set["shift-hours"]:
		return usage("--shift-hours: %s has no %q column, so its minutes are taken as per shift; leave --shift-hours out or add the column", file, windowColumn)
	case hasWindow:
		if windows, err = t.Floats(windowColumn); err != nil {
			return usage("%s: %s", file, oneLineMessage(err))
		}
	}
	obs := make([]stats.BacktestObservation, len(t.Records))
	for i := range t.Records {
		line := t.Lines[i]
		v := minutes.Values[i]
		if v < 0 {
			return usage("%s: line %d, column %q: care minutes must be at least 0.", file, line, bo.column)
		}
		if tiers[i] == "" {
			return usage("%s: line %d, column %q: the tier is empty.", file, line, csvfile.TierColumn)
		}
		if windows != nil {
			w := windows.Values[i]
			if !(w > 0 && w <= 24) {
				return usage("%s: line %d, column %q: the window must be more than 0 and at most 24 hours.", file, line, windowColumn)
			}
			v = v / w * bo.shiftHrs
		}
		obs[i] = stats.BacktestObservation{Tier: tiers[i], Date: dates[i], Shift: shifts[i], Minutes: v}
	}
	return obs, exitOK
}

// loadWardObservations reads the ward's included observations of the
// weeks checked and their lookback, each scaled to its shift pattern's
// nominal hours, and sets the ward's cover level and lookback where the
// flags left them, the end date (yesterday in the ward's time zone) and
// Covered, which compares an occurrence's observation counts with the
// newest census of that date and shift.
func loadWardObservations(ctx context.Context, e *env, so *storeOptions, code string, bo *backtestOptions) ([]stats.BacktestObservation, int) {
	const name = "backtest"
	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return nil, exitFailure
	}
	defer st.Close()
	ward, err := st.FindWardByCode(ctx, code)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		fmt.Fprintf(e.stderr, "wardload %s: no ward with code %q (see wardload ward list)\n", name, clip(code))
		return nil, exitUsage
	} else if err != nil {
		return nil, reportError(e, name, err)
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, reportError(e, name, err)
	}
	settings, err := st.FindSettings(ctx, ward.ID)
	if err != nil {
		return nil, reportError(e, name, err)
	}
	if !bo.set["cover"] {
		bo.opts.Cover = settings.CoverLevel
	}
	if !bo.set["lookback-weeks"] {
		bo.opts.LookbackWeeks = settings.LookbackWeeks
	}
	if !bo.set["end"] {
		bo.opts.End = wardload.DateOf(e.clock().In(loc)).AddDays(-1).String()
	}
	if bo.opts.Weeks < 1 || bo.opts.Weeks > wardload.MaxLookbackWeeks || bo.opts.LookbackWeeks < 1 || bo.opts.LookbackWeeks > wardload.MaxLookbackWeeks {
		fmt.Fprintf(e.stderr, "wardload %s: --weeks/--lookback-weeks: Weeks must be from 1 to %d.\n", name, wardload.MaxLookbackWeeks)
		return nil, exitUsage
	}
	to, _ := wardload.ParseDate(bo.opts.End)
	from := to.AddDays(-7*(bo.opts.Weeks+bo.opts.LookbackWeeks) + 1)
	// The projections' own loader (projector.LoadBacktest), so the
	// command and the review page read the same history the same way.
	data, err := (&projector.Service{Store: st}).LoadBacktest(ctx, ward.ID, from, to)
	if err != nil {
		return nil, reportError(e, name, err)
	}
	bo.opts.Covered = data.CoveredFunc()
	obs := data.Observations
	bo.source = fmt.Sprintf("ward %s (%s)", ward.Code, ward.Name)
	bo.totalNote = wardTotalsNote
	return obs, exitOK
}

// writeBacktest prints the backtest: its sentence, a coverage table per
// tier and for shift totals, and the PIT histograms.
func writeBacktest(out io.Writer, r *stats.BacktestResult, bo *backtestOptions) error {
	fmt.Fprintf(out, "Backtest of %s, %s to %s: %d weeks, each projected from the %d weeks before it (%d draws, seed %d).\n\n",
		bo.source, r.From, r.To, r.Weeks, bo.opts.LookbackWeeks, bo.opts.Draws, bo.opts.Seed)
	fmt.Fprintf(out, "%s\n\n", r.Sentence)
	rows := append([]stats.BacktestRow{r.Totals}, r.Tiers...)
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	fmt.Fprint(w, "\tchecked")
	for _, l := range r.Levels {
		fmt.Fprintf(w, "\tin %s band", levelText(l))
	}
	fmt.Fprintf(w, "\tat or under %s\t\n", levelText(r.Cover))
	fmt.Fprint(w, "expected\t")
	for _, l := range r.Levels {
		fmt.Fprintf(w, "\t%s", levelText(l))
	}
	fmt.Fprintf(w, "\t%s\t\n", levelText(r.Cover))
	for _, row := range rows {
		fmt.Fprintf(w, "%s\t%d", rowName(row), row.Checked)
		for _, c := range row.Coverage {
			fmt.Fprintf(w, "\t%s", shareText(c, row.Checked))
		}
		fmt.Fprintf(w, "\t%s", shareText(row.CoverHit, row.Checked))
		if row.Checked >= stats.CalibrationMinShifts && row.CoverHit < r.Cover-0.05 {
			fmt.Fprint(w, "\tmore than 5 points short")
		}
		fmt.Fprint(w, "\t\n")
	}
	if err := w.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(out, "\n%s\n", bo.totalNote)
	if r.Skipped > 0 {
		fmt.Fprintf(out, "%d shift occurrences had too little history before them (fewer than %d usable observations in a tier with patients) and were not checked.\n",
			r.Skipped, stats.MinTierObservations)
	}
	fmt.Fprintln(out, "\nPIT histogram: counts in tenths, flat when calibrated, high on the right when care was under-estimated.")
	width := 0
	for _, row := range rows {
		width = max(width, len(rowName(row)))
	}
	fmt.Fprintf(out, "%-*s", width, "from")
	for i := range 10 {
		fmt.Fprintf(out, "%5.1f", float64(i)/10)
	}
	fmt.Fprintln(out)
	for _, row := range rows {
		fmt.Fprintf(out, "%-*s", width, rowName(row))
		for _, c := range row.PIT {
			fmt.Fprintf(out, "%5d", c)
		}
		fmt.Fprintf(out, "   |%s|\n", sparkline(row.PIT))
	}
	return nil
}

func rowName(row stats.BacktestRow) string {
	if row.Name == "shift totals" {
		return row.Name
	}
	return "tier " + row.Name
}

// shareText says a checked share with one decimal, or "–" when nothing was
// checked (a share of nothing is not 0%).
func shareText(share float64, checked int) string {
	if checked == 0 {
		return "–"
	}
	return strconv.FormatFloat(100*share, 'f', 1, 64) + "%"
}

// sparkline draws counts as one line of block characters, the largest as
// a full block, zero as a space.
func sparkline(counts [10]int) string {
	const blocks = "▁▂▃▄▅▆▇█"
	top := 0
	for _, c := range counts {
		top = max(top, c)
	}
	var b strings.Builder
	for _, c := range counts {
		if c == 0 {
			b.WriteByte(' ')
			continue
		}
		i := int(math.Ceil(8*float64(c)/float64(top))) - 1
		b.WriteString(string([]rune(blocks)[i]))
	}
	return b.String()
}
