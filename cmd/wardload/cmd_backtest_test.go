package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// runBacktestJSON runs backtest on csv with --json and decodes the result.
func runBacktestJSON(t *testing.T, csv string, args ...string) *stats.BacktestResult {
	t.Helper()
	code, out, errs := runCSVCommand(t, csv, append([]string{"backtest", "FILE", "--json"}, args...)...)
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var res stats.BacktestResult
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	return &res
}

// binomialTolerance is three binomial standard errors of a share p
// measured on n checks, 3·√(p(1−p)/n): a calibrated model's coverage
// falls outside it about 0.3% of the time if the checks were independent.
// They are not quite (a shift's patients share its effect; successive
// weeks share training weeks), so this was checked, not assumed: over 40
// seeds of historyCSV(seed, 30, 0, 1, 12) the standardised deviations
// (coverage − p)/√(p(1−p)/n) of every row and level had SD 0.7–1.15 and
// mean −0.8 to 0 (the model covers up to about one SE less than nominal).
func binomialTolerance(p float64, n int) float64 {
	return 3 * math.Sqrt(p*(1-p)/float64(n))
}

// A calibrated history (the model's own assumptions: lognormal tiers, a
// lognormal shift effect, no drift) gives coverage near nominal for every
// band level and the cover level, per tier and for shift totals.
func TestBacktestCalibratedFile(t *testing.T) {
	csv, newest, checkedObs := historyCSV(1, 30, 0, 1, 12)
	res := runBacktestJSON(t, csv, "--shift-hours", "12")
	// 30 weeks from 5 January: the newest date is 2 August 2026; 12 weeks
	// back from it start on 11 May.
	if res.To != newest || newest != "2026-08-02" || res.From != "2026-05-11" || res.Weeks != 12 {
		t.Errorf("period %s to %s (%d weeks), want 2026-05-11 to %s (12)", res.From, res.To, res.Weeks, newest)
	}
	if res.Skipped != 0 || res.Totals.Checked != 12*7*2 {
		t.Errorf("skipped %d, shift totals checked %d; want 0 and every Day and Night of 12 weeks (168)", res.Skipped, res.Totals.Checked)
	}
	sum := 0
	for _, r := range res.Tiers {
		sum += r.Checked
	}
	if sum != checkedObs || len(res.Tiers) != 3 {
		t.Errorf("%d observations checked in %d tiers, want %d in 3", sum, len(res.Tiers), checkedObs)
	}
	if len(res.Levels) != 3 || res.Levels[0] != 0.5 || res.Levels[1] != 0.8 || res.Levels[2] != 0.9 || res.Cover != 0.9 {
		t.Errorf("levels %v, cover %v; want the defaults 0.5, 0.8, 0.9 and 0.9", res.Levels, res.Cover)
	}
	for _, row := range append([]stats.BacktestRow{res.Totals}, res.Tiers...) {
		pit := 0
		for _, c := range row.PIT {
			pit += c
		}
		if pit != row.Checked {
			t.Errorf("%s: PIT histogram holds %d, checked %d", row.Name, pit, row.Checked)
		}
		for i, l := range res.Levels {
			if tol := binomialTolerance(l, row.Checked); math.Abs(row.Coverage[i]-l) > tol {
				t.Errorf("%s: %g band covers %.3f, want %g ± %.3f", row.Name, l, row.Coverage[i], l, tol)
			}
		}
		if tol := binomialTolerance(res.Cover, row.Checked); math.Abs(row.CoverHit-res.Cover) > tol {
			t.Errorf("%s: %.3f at or under the cover quantile, want %g ± %.3f", row.Name, row.CoverHit, res.Cover, tol)
		}
	}

	code, out, errs := runCSVCommand(t, csv, "backtest", "FILE", "--shift-hours", "12")
	if code != exitOK || errs != "" {
		t.Fatalf("text: exit %d, stderr %q", code, errs)
	}
	for _, want := range []string{res.Sentence, "expected", "in 80% band", "at or under 90%", "shift totals  168", "tier t3", "PIT histogram"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "points short") {
		t.Errorf("a calibrated history is reported short:\n%s", out)
	}
}

// Care that jumps ×1.6 in the last two weeks is under-estimated until the
// model catches up: over the four weeks around the jump the cover hit
// rate of shift totals falls more than 5 points short, and the report says
// so; the same history without the jump does not. (Over 12 weeks the
// model's trend catches up within a few weeks and the shortfall is
// diluted to about 5–10 points, so the backtest looks at four.)
func TestBacktestJump(t *testing.T) {
	csv, _, _ := historyCSV(1, 30, 2, 1.6, 4)
	res := runBacktestJSON(t, csv, "--shift-hours", "12", "--weeks", "4")
	if res.Totals.Checked < stats.CalibrationMinShifts || !(res.Totals.CoverHit < res.Cover-0.05) {
		t.Errorf("after a ×1.6 jump %.3f of %d shift totals were under the cover quantile; want under %g",
			res.Totals.CoverHit, res.Totals.Checked, res.Cover-0.05)
	}
	_, out, _ := runCSVCommand(t, csv, "backtest", "FILE", "--shift-hours", "12", "--weeks", "4")
	flagged := false
	for line := range strings.SplitSeq(out, "\n") {
		flagged = flagged || strings.HasPrefix(line, "shift totals  ") && strings.Contains(line, "more than 5 points short")
	}
	if !strings.Contains(out, "That is more than 5 points short") || !flagged {
		t.Errorf("report does not say the hit rate is short:\n%s", out)
	}
	steady, _, _ := historyCSV(1, 30, 0, 1, 4)
	if res := runBacktestJSON(t, steady, "--shift-hours", "12", "--weeks", "4"); res.Totals.CoverHit < res.Cover-0.05 {
		t.Errorf("without the jump %.3f of shift totals were under the cover quantile: the test cannot tell", res.Totals.CoverHit)
	}
}

// Minutes over a window are scaled to --shift-hours at a constant rate;
// without a window column they are taken as per shift.
func TestBacktestFileScaling(t *testing.T) {
	dir := t.TempDir()
	read := func(csv string, shiftHours float64) []stats.BacktestObservation {
		t.Helper()
		path := filepath.Join(dir, "obs.csv")
		if err := os.WriteFile(path, []byte(csv), 0o600); err != nil {
			t.Fatal(err)
		}
		var errb bytes.Buffer
		e := &env{stdin: strings.NewReader(""), stdout: &bytes.Buffer{}, stderr: &errb}
		bo := &backtestOptions{set: map[string]bool{"shift-hours": shiftHours > 0}, column: defaultColumn, shiftHrs: shiftHours}
		obs, code := readBacktestFile(e, path, bo)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errb.String())
		}
		return obs
	}
	obs := read("date,shift,tier,care_minutes,window_hours\n2026-03-01,Day,t1,30,6\n2026-03-01,Day,t2,40,12\n", 12)
	want := []stats.BacktestObservation{
		{Tier: "t1", Date: "2026-03-01", Shift: "Day", Minutes: 60},
		{Tier: "t2", Date: "2026-03-01", Shift: "Day", Minutes: 40},
	}
	if len(obs) != 2 || obs[0] != want[0] || obs[1] != want[1] {
		t.Errorf("scaled to 12 h: %+v, want %+v", obs, want)
	}
	obs = read("tier,shift,date,care_minutes\nt1,Night,2026-03-02,33.5\n", 0)
	if len(obs) != 1 || obs[0] != (stats.BacktestObservation{Tier: "t1", Date: "2026-03-02", Shift: "Night", Minutes: 33.5}) {
		t.Errorf("per shift: %+v", obs)
	}
}

func TestBacktestBadInput(t *testing.T) {
	good := "date,shift,tier,care_minutes\n2026-03-01,Day,t1,30\n2026-03-02,Day,t1,35\n"
	window := "date,shift,tier,care_minutes,window_hours\n2026-03-01,Day,t1,30,6\n"
	for _, tc := range []struct {
		name, csv string
		args      []string
		want      string
	}{
		{"no source", good, nil, "give exactly one FILE, or --ward CODE"},
		{"file and ward", good, []string{"FILE", "--ward", "w1"}, "not both"},
		{"no shift column", "date,tier,care_minutes\n2026-03-01,t1,3\n", []string{"FILE"}, `there is no "shift" column`},
		{"no date column", "shift,tier,care_minutes\nDay,t1,3\n", []string{"FILE"}, `there is no "date" column`},
		{"no tier column", "date,shift,care_minutes\n2026-03-01,Day,3\n", []string{"FILE"}, `there is no "tier" column`},
		{"no minutes column", good, []string{"FILE", "--column", "minutes"}, `no column "minutes"`},
		{"bad date", "date,shift,tier,care_minutes\n2026-02-30,Day,t1,30\n", []string{"FILE"}, `line 2, column "date": "2026-02-30" is not a date`},
		{"empty shift", "date,shift,tier,care_minutes\n2026-03-01, ,t1,30\n", []string{"FILE"}, `line 2, column "shift"`},
		{"empty tier", "date,shift,tier,care_minutes\n2026-03-01,Day,,30\n", []string{"FILE"}, `line 2, column "tier": the tier is empty`},
		{"negative minutes", "date,shift,tier,care_minutes\n2026-03-01,Day,t1,-3\n", []string{"FILE"}, `line 2, column "care_minutes": care minutes must be at least 0`},
		{"minutes text", "date,shift,tier,care_minutes\n2026-03-01,Day,t1,3O\n", []string{"FILE"}, `line 2, column "care_minutes": "3O" is not a number`},
		{"window without --shift-hours", window, []string{"FILE"}, "give --shift-hours"},
		{"--shift-hours without window", good, []string{"FILE", "--shift-hours", "12"}, `--shift-hours: `},
		{"--shift-hours 30", window, []string{"FILE", "--shift-hours", "30"}, "--shift-hours must be more than 0 and at most 25"},
		{"window 0", "date,shift,tier,care_minutes,window_hours\n2026-03-01,Day,t1,30,0\n", []string{"FILE", "--shift-hours", "12"}, `line 2, column "window_hours"`},
		{"weeks 0", good, []string{"FILE", "--weeks", "0"}, "--weeks must not be 0"},
		{"weeks 200", good, []string{"FILE", "--weeks", "200"}, "--weeks/--lookback-weeks: "},
		{"lookback -1", good, []string{"FILE", "--lookback-weeks", "-1"}, "--weeks/--lookback-weeks: "},
		{"cover 0.4", good, []string{"FILE", "--cover", "0.4"}, "--cover: Cover level must be from 0.5 to 0.999"},
		{"cover 1", good, []string{"FILE", "--cover", "1"}, "--cover: "},
		{"draws 0", good, []string{"FILE", "--draws", "0"}, "--draws must not be 0"},
		{"draws 50", good, []string{"FILE", "--draws", "50"}, "--draws: "},
		{"levels 1", good, []string{"FILE", "--levels", "0.5,1"}, "--levels: band levels must be from 0.01 to 0.999"},
		{"levels text", good, []string{"FILE", "--levels", "half"}, "--levels: "},
		{"end not a date", good, []string{"FILE", "--end", "yesterday"}, "--end: "},
		{"ward with --shift-hours", good, []string{"--ward", "w1", "--shift-hours", "12"}, "--shift-hours is for FILE"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCSVCommand(t, tc.csv, append([]string{"backtest"}, tc.args...)...)
			oneLineRefusal(t, tc.name, code, out, errs)
			if !strings.Contains(errs, tc.want) || !strings.HasPrefix(errs, "wardload backtest: ") {
				t.Errorf("stderr %q, want it to contain %q", errs, tc.want)
			}
		})
	}
}

// Hand-worked: the largest count is a full block; others are
// ceil(8·c/max) eighths; zero is a space.
func TestSparkline(t *testing.T) {
	got := sparkline([10]int{0, 1, 2, 3, 4, 5, 6, 7, 8, 16})
	// 8·c/16 = c/2 → ceil: 0(space), 1, 1, 2, 2, 3, 3, 4, 4, 8 eighths.
	if want := " ▁▁▂▂▃▃▄▄█"; got != want {
		t.Errorf("sparkline = %q, want %q", got, want)
	}
	if got := sparkline([10]int{}); got != strings.Repeat(" ", 10) {
		t.Errorf("empty histogram = %q", got)
	}
}

// wardHistory is what seedBacktestWard stored, for the test's own count of
// what the backtest should check.
type wardHistory struct {
	covered    map[string]bool // date|shift → its newest census matches its included observations
	checkedObs map[string]int  // included observations per date|shift
	nightObs   *wardload.Observation
}

// seedBacktestWard stores an invented ward "w9" (Asia/Tokyo; tiers t1, t2;
// 12-hour Day and Night shifts, Night observed over 6-hour windows) with
// cover level 0.8 and a 6-week lookback, ten weeks of observations from
// Monday 5 January to Sunday 15 March 2026, and for the last two weeks a
// census per shift that matches the observations (shift index % 3 == 0),
// is one patient off (== 1) or is missing (== 2). Three shifts get a
// second revision: one off (so the newest no longer matches) and two
// corrected to match (unequal, so that reading the oldest revision
// changes the count); one observation of a matching shift of 5 March is
// excluded, so that shift no longer matches.
func seedBacktestWard(t *testing.T, dir string) wardHistory {
	t.Helper()
	st := openTestStore(t, dir)
	ctx := context.Background()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	w := &wardload.Ward{Code: "w9", Name: "Ward 9 (invented)", TimeZone: "Asia/Tokyo"}
	must(st.CreateWard(ctx, w))
	var tiers []*wardload.Tier
	for i, code := range []string{"t1", "t2"} {
		tr := &wardload.Tier{WardID: w.ID, Code: code, Label: "Tier " + code, DisplayOrder: i}
		must(st.CreateTier(ctx, tr))
		tiers = append(tiers, tr)
	}
	day := &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 8 * 60, NominalHours: 12}
	night := &wardload.ShiftPattern{WardID: w.ID, Name: "Night", StartMinute: 20 * 60, NominalHours: 12}
	must(st.CreateShiftPattern(ctx, day))
	must(st.CreateShiftPattern(ctx, night))
	s := wardload.DefaultSettings(w.ID)
	s.CoverLevel, s.LookbackWeeks = 0.8, 6
	must(st.SaveSettings(ctx, s))

	h := wardHistory{covered: map[string]bool{}, checkedObs: map[string]int{}}
	r := rand.New(rand.NewPCG(9, 9))
	first := wardload.Date{Year: 2026, Month: time.January, Day: 5}
	type occ struct {
		date   wardload.Date
		shift  *wardload.ShiftPattern
		counts []wardload.TierCount
	}
	var obs []*wardload.Observation
	var occs []occ
	for d := range 70 {
		date := first.AddDays(d)
		for _, sp := range []*wardload.ShiftPattern{day, night} {
			window := 12.0
			if sp == night {
				window = 6
			}
			o := occ{date: date, shift: sp}
			for k, tr := range tiers {
				n := 1 + r.IntN(2)
				o.counts = append(o.counts, wardload.TierCount{TierID: tr.ID, Patients: n})
				for range n {
					minutes := math.Exp(math.Log(60*float64(k+1))+0.35*r.NormFloat64()) * window / 12
					obs = append(obs, &wardload.Observation{WardID: w.ID, TierID: tr.ID, ShiftID: sp.ID, Date: date,
						WindowHours: window, CareMinutes: math.Round(minutes*10) / 10})
				}
				if d >= 56 {
					h.checkedObs[date.String()+"|"+sp.Name] += n
				}
			}
			if d >= 56 {
				occs = append(occs, o)
			}
		}
	}
	_, err := st.CreateObservations(ctx, obs)
	must(err)
	for i, o := range occs {
		key := o.date.String() + "|" + o.shift.Name
		off := append([]wardload.TierCount(nil), o.counts...)
		off[0].Patients++
		switch i % 3 {
		case 0:
			must(st.CreateCensus(ctx, &wardload.Census{WardID: w.ID, Date: o.date, ShiftID: o.shift.ID, Counts: o.counts}))
			h.covered[key] = true
		case 1:
			must(st.CreateCensus(ctx, &wardload.Census{WardID: w.ID, Date: o.date, ShiftID: o.shift.ID, Counts: off}))
		}
		switch i {
		case 3: // corrected to one patient more: the newest no longer matches
			must(st.CreateCensus(ctx, &wardload.Census{WardID: w.ID, Date: o.date, ShiftID: o.shift.ID, Counts: off}))
			h.covered[key] = false
		case 4, 7: // corrected to the observed counts: now they match
			must(st.CreateCensus(ctx, &wardload.Census{WardID: w.ID, Date: o.date, ShiftID: o.shift.ID, Counts: o.counts}))
			h.covered[key] = true
		}
	}
	// Exclude one observation of a matching shift: its counts then differ
	// from the census.
	target := occs[6]
	for _, o := range obs {
		if o.Date == target.date && o.ShiftID == target.shift.ID {
			_, err := st.ExcludeObservation(ctx, o.ID, "entered twice", 1)
			must(err)
			key := target.date.String() + "|" + target.shift.Name
			h.covered[key] = false
			h.checkedObs[key]--
			break
		}
	}
	for _, o := range obs {
		if o.ShiftID == night.ID && o.Date == first.AddDays(60) {
			h.nightObs = o
			break
		}
	}
	return h
}

func runBacktestWard(t *testing.T, dir string, now time.Time, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" },
		now: func() time.Time { return now }}
	code := run(context.Background(), append([]string{"backtest", "--data-dir", dir}, args...), e)
	return code, out.String(), errb.String()
}

func TestBacktestWard(t *testing.T) {
	dir := t.TempDir()
	h := seedBacktestWard(t, dir)
	// 20:00 UTC on 16 March is 05:00 on the 17th in Tokyo: yesterday there
	// is the 16th (in UTC it would be the 15th).
	now := time.Date(2026, time.March, 16, 20, 0, 0, 0, time.UTC)
	code, out, errs := runBacktestWard(t, dir, now, "--ward", "w9", "--weeks", "2", "--json")
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var res stats.BacktestResult
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if res.To != "2026-03-16" || res.From != "2026-03-03" || res.Cover != 0.8 {
		t.Errorf("period %s to %s, cover %v; want 2026-03-03 to 2026-03-16 (yesterday in Tokyo) and the ward's 0.8", res.From, res.To, res.Cover)
	}
	// Checked: observations from 3 March (the 2 March ones fall just
	// before the two weeks ending on the 16th).
	wantTotals, wantObs := 0, 0
	for key, n := range h.checkedObs {
		if key[:10] >= "2026-03-03" {
			wantObs += n
			if h.covered[key] {
				wantTotals++
			}
		}
	}
	gotObs := 0
	for _, r := range res.Tiers {
		gotObs += r.Checked
	}
	if res.Totals.Checked != wantTotals || gotObs != wantObs || res.Skipped != 0 || wantTotals < 5 {
		t.Errorf("checked %d shift totals and %d observations (skipped %d); want %d and %d (0)",
			res.Totals.Checked, gotObs, res.Skipped, wantTotals, wantObs)
	}

	code, out, errs = runBacktestWard(t, dir, now, "--ward", "w9", "--end", "2026-03-15", "--weeks", "2", "--lookback-weeks", "4")
	if code != exitOK || errs != "" {
		t.Fatalf("text: exit %d, stderr %q", code, errs)
	}
	for _, want := range []string{"Backtest of ward w9 (Ward 9 (invented)), 2026-03-02 to 2026-03-15: 2 weeks, each projected from the 4 weeks before it",
		"at or under 80%", "only where its observations match its newest census"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}

	code, _, errs = runBacktestWard(t, dir, now, "--ward", "nope")
	if code != exitUsage || !strings.Contains(errs, `no ward with code "nope"`) {
		t.Errorf("unknown ward: exit %d, %q", code, errs)
	}
	code, _, errs = runBacktestWard(t, t.TempDir(), now, "--ward", "w9")
	if code != exitFailure || !strings.Contains(errs, "no wardload database") {
		t.Errorf("no database: exit %d, %q", code, errs)
	}
}

// Stored minutes are scaled to the shift pattern's nominal hours: a Night
// observation over 6 hours of a 12-hour shift counts double.
func TestBacktestWardScaling(t *testing.T) {
	dir := t.TempDir()
	h := seedBacktestWard(t, dir)
	var errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &bytes.Buffer{}, stderr: &errb}
	bo := &backtestOptions{set: map[string]bool{"end": true}, opts: stats.BacktestOptions{Weeks: 2, End: "2026-03-15"}}
	obs, code := loadWardObservations(context.Background(), e, &storeOptions{DataDir: dir}, "w9", bo)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	// Shift patterns are named "Name#ID" by projector.LoadBacktest.
	want := stats.BacktestObservation{Tier: "t1", Date: h.nightObs.Date.String(), Shift: "Night", Minutes: h.nightObs.CareMinutes * 2}
	found := false
	for _, o := range obs {
		found = found || (o.Tier == want.Tier && o.Date == want.Date && strings.HasPrefix(o.Shift, "Night#") && o.Minutes == want.Minutes)
	}
	if !found || bo.opts.Cover != 0.8 || bo.opts.LookbackWeeks != 6 {
		t.Errorf("%v not among the observations (or cover %v, lookback %d not the ward's 0.8 and 6)", want, bo.opts.Cover, bo.opts.LookbackWeeks)
	}
	// 2 + 6 weeks ending on 15 March start on 19 January.
	for _, o := range obs {
		if o.Date < "2026-01-19" || o.Date > "2026-03-15" {
			t.Fatalf("observation of %s is outside the 8 weeks loaded", o.Date)
		}
	}
}

// The backtest report, rendered from a committed result (see
// TestProjectReportsGolden) made with wardload-model/2 by
//
//	wardload backtest FILE --shift-hours 12 --weeks 4 --json   (FILE: historyCSV(1, 30, 2, 1.6, 4))
func TestBacktestReportGolden(t *testing.T) {
	var r stats.BacktestResult
	mustReadJSON(t, filepath.Join("testdata", "backtest_jump.json"), &r)
	bo := &backtestOptions{source: "history.csv", totalNote: fileTotalsNote,
		opts: stats.BacktestOptions{LookbackWeeks: 8, Draws: 2000, Seed: 1}}
	var b bytes.Buffer
	if err := writeBacktest(&b, &r, bo); err != nil {
		t.Fatal(err)
	}
	compareGolden(t, filepath.Join("testdata", "backtest_jump.golden"), b.String())
}
