package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// handCSV: tier a 10, 20, 30; tier b 50, 70; tier c one observation,
// census 0. Too few observations for version 2 (MinTierObservations).
const handCSV = "tier,care_minutes,window_hours\na,10,8\na,20,8\na,30,8\nb,50,8\nb,70,8\nc,5,8\n"

func runProjectCLI(t *testing.T, stdin string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	return runStdin(t, stdin, append([]string{"project"}, args...)...)
}

// runStdin runs a command in-process with stdin.
func runStdin(t *testing.T, stdin string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(stdin), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
	code = run(context.Background(), args, e)
	return code, out.String(), errb.String()
}

// dayOnly keeps the header and the Day rows of a historyCSV file: one
// shift a day, so the occurrences differ only by the shift-level effect
// (the model has no Day/Night term).
func dayOnly(csv string) string {
	var b strings.Builder
	for i, l := range strings.Split(strings.TrimSuffix(csv, "\n"), "\n") {
		if i == 0 || strings.Contains(l, ",Day,") {
			b.WriteString(l + "\n")
		}
	}
	return b.String()
}

// withoutOccurrences drops the date and shift columns of a historyCSV file.
func withoutOccurrences(csv string) string {
	var b strings.Builder
	for l := range strings.SplitSeq(strings.TrimSuffix(csv, "\n"), "\n") {
		f := strings.Split(l, ",")
		b.WriteString(strings.Join(f[2:], ",") + "\n")
	}
	return b.String()
}

// projectJSON is the part of stats.Projection's JSON the tests read, with
// nullable fields as pointers so that null is seen as null.
type projectJSON struct {
	DataSufficient bool     `json:"data_sufficient"`
	Insufficient   []string `json:"insufficient"`
	Bands          []stats.Band
	Shortfall      []stats.Shortfall
	ShiftEffect    struct {
		Estimated   bool     `json:"estimated"`
		SDLog       *float64 `json:"sd_log"`
		Occurrences int      `json:"occurrences"`
		Reason      string   `json:"reason"`
	} `json:"shift_effect"`
	Trend struct {
		Estimated bool     `json:"estimated"`
		Percent   *float64 `json:"percent_per_28_days"`
		Low       *float64 `json:"low"`
		High      *float64 `json:"high"`
		Reason    string   `json:"reason"`
	} `json:"trend"`
	Tiers      []stats.TierFit `json:"tiers"`
	HeldOut    []stats.HeldOut `json:"held_out"`
	Simulation struct {
		Draws int    `json:"draws"`
		Seed  uint64 `json:"seed"`
	} `json:"simulation"`
	Nurses struct {
		Cover       *int   `json:"cover"`
		Floor       *int   `json:"floor"`
		Recommended *int   `json:"recommended"`
		DecidedBy   string `json:"decided_by"`
		InCharge    int    `json:"in_charge"`
	} `json:"nurses"`
	Warnings []string `json:"warnings"`
	Caution  string   `json:"caution"`
}

// decodeProjection decodes exactly one JSON value from out.
func decodeProjection(t *testing.T, out string) projectJSON {
	t.Helper()
	dec := json.NewDecoder(strings.NewReader(out))
	var p projectJSON
	if err := dec.Decode(&p); err != nil {
		t.Fatalf("%v in %q", err, out)
	}
	if err := dec.Decode(new(any)); !errors.Is(err, io.EOF) {
		t.Errorf("more than one JSON value on stdout: %v", err)
	}
	return p
}

// Too few observations: the projection declines. Without a floor the
// recommendation is null; with --patients-per-nurse 4 it is the floor,
// ceil(5/4) + 1 = 3 (one nurse in charge on top), or ceil(5/4) = 2 when
// the nurse in charge counts (by hand).
func TestProjectCommandDeclinedJSON(t *testing.T) {
	base := []string{"-", "--census", "a=2,b=3", "--shift-hours", "8", "--direct-care", "0.5", "--json"}
	for _, tc := range []struct {
		name  string
		extra []string
		want  *int
	}{
		{"no floor", nil, nil},
		{"floor", []string{"--patients-per-nurse", "4"}, new(3)},
		{"floor, nurse in charge counts", []string{"--patients-per-nurse", "4", "--charge-nurse-counts"}, new(2)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runProjectCLI(t, handCSV, append(base, tc.extra...)...)
			if code != exitOK || errs != "" {
				t.Fatalf("exit %d, stderr %q", code, errs)
			}
			p := decodeProjection(t, out)
			if p.DataSufficient || p.Nurses.DecidedBy != stats.DecidedByInsufficient || p.Nurses.Cover != nil {
				t.Errorf("data_sufficient %v, decided_by %q, cover %v; want false, %q, null",
					p.DataSufficient, p.Nurses.DecidedBy, p.Nurses.Cover, stats.DecidedByInsufficient)
			}
			if (tc.want == nil) != (p.Nurses.Recommended == nil) || (tc.want != nil && *tc.want != *p.Nurses.Recommended) ||
				(tc.want != nil && (p.Nurses.Floor == nil || *p.Nurses.Floor != *tc.want)) {
				t.Errorf("recommended %v (floor %v), want %v", show(p.Nurses.Recommended), show(p.Nurses.Floor), show(tc.want))
			}
			if tc.want == nil && !strings.Contains(out, `"recommended":null`) {
				t.Errorf("recommended is not null in %s", out)
			}
			// a: 3 usable, b: 2 usable; c has no patients.
			need := stats.MinTierObservations
			want := []string{fmt.Sprintf("tier a: 3 usable, need about %d more", need-3), fmt.Sprintf("tier b: 2 usable, need about %d more", need-2)}
			if len(p.Insufficient) != 2 || !strings.Contains(p.Insufficient[0], want[0]) || !strings.Contains(p.Insufficient[1], want[1]) {
				t.Errorf("insufficient %q, want sentences with %q", p.Insufficient, want)
			}
			if len(p.Bands) != 0 || len(p.Shortfall) != 0 {
				t.Errorf("a declined projection shows %d bands and %d shortfall rows", len(p.Bands), len(p.Shortfall))
			}
		})
	}
	_, out, _ := runProjectCLI(t, handCSV, "-", "--census", "a=2,b=3", "--shift-hours", "8", "--direct-care", "0.5")
	for _, want := range []string{"Recommended nurses: none.", "Insufficient data:", "need about 5 more", stats.Caution} {
		if !strings.Contains(out, want) {
			t.Errorf("declined report lacks %q:\n%s", want, out)
		}
	}
	_, out, _ = runProjectCLI(t, handCSV, "-", "--census", "a=2,b=3", "--shift-hours", "8", "--direct-care", "0.5", "--patients-per-nurse", "4")
	if !strings.Contains(out, "Recommended nurses: 3, decided by the ratio floor alone: too few observations") {
		t.Errorf("declined report with a floor:\n%s", out)
	}
}

func show(n *int) string {
	if n == nil {
		return "null"
	}
	return fmt.Sprint(*n)
}

// With date and shift columns the shift-level effect and the trend are
// estimated; the projected date defaults to the day after the newest
// observation. The invented data have a shift effect of SD 0.2 on the log
// scale: over seeds 1–30 of this set-up the estimate ranged 0.15–0.23, so
// 0.1–0.3 is a loose check that the columns reached the model.
func TestProjectCommandShiftEffect(t *testing.T) {
	csv, newest, _ := historyCSV(2, 10, 0, 1, 0)
	csv = dayOnly(csv)
	args := []string{"-", "--census", "t1=4,t2=3,t3=2", "--shift-hours", "12", "--direct-care", "0.75", "--patients-per-nurse", "4"}
	code, out, errs := runProjectCLI(t, csv, append(args, "--json")...)
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	p := decodeProjection(t, out)
	se := p.ShiftEffect
	if !se.Estimated || se.SDLog == nil || *se.SDLog < 0.1 || *se.SDLog > 0.3 || se.Occurrences != 70 || se.Reason != "" {
		t.Errorf("shift effect %+v (sd %v); want estimated from 70 Day shifts, SD in 0.1–0.3", se, se.SDLog)
	}
	if tr := p.Trend; !tr.Estimated || tr.Low == nil || tr.High == nil || !(*tr.Low < *tr.Percent && *tr.Percent < *tr.High) {
		t.Errorf("trend %+v not estimated with an interval around it", tr)
	}
	if !p.DataSufficient || p.Nurses.Recommended == nil || len(p.Bands) != 2 {
		t.Fatalf("did not project: %s", out)
	}
	if newest != "2026-03-15" {
		t.Fatalf("newest date %s; the generator changed", newest)
	}
	code, out, errs = runProjectCLI(t, csv, args...)
	if code != exitOK || errs != "" {
		t.Fatalf("text: exit %d, stderr %q", code, errs)
	}
	for _, want := range []string{
		"Projection of one 12-hour shift on 2026-03-16 (" + stats.MethodVersion + ")",
		fmt.Sprintf("Recommended nurses: %d, decided by ", *p.Nurses.Recommended),
		"Capacity rule: The nurse in charge takes no patients",
		"Configured ratio floor: at most 4 patients per nurse",
		"80% predictive band", "90% predictive band", "P(shortfall)", "<- recommended",
		"used  held out", "need more", "Trend: ", "% per 4 weeks (95% interval ",
		fmt.Sprintf("Shift-level effect: SD %.3f on the log scale from 70 shift occurrences", *se.SDLog),
		stats.Caution,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	// Shortfall cells are Shortfall.Text: never a bare 0% or 100%.
	if bare := regexp.MustCompile(`(^|[^.\d])(0|100)%`).FindString(shortfallSection(out)); bare != "" {
		t.Errorf("shortfall table shows %q:\n%s", bare, out)
	}
	for _, r := range p.Shortfall {
		if !strings.Contains(out, r.Text) {
			t.Errorf("shortfall %d: %q not in the report", r.Nurses, r.Text)
		}
	}
	// --date moves the projected date.
	_, out, _ = runProjectCLI(t, csv, append(args, "--date", "2026-04-01")...)
	if !strings.Contains(out, "shift on 2026-04-01") {
		t.Errorf("--date not used:\n%s", out)
	}
}

// shortfallSection is the report from the shortfall header to the tier table.
func shortfallSection(out string) string {
	i, j := strings.Index(out, "P(shortfall)"), strings.Index(out, "\nTier ")
	if i < 0 || j < i {
		return ""
	}
	return out[i:j]
}

// Without date and shift columns the same observations give no shift
// effect and no trend, and the output says why (the model's reasons).
func TestProjectCommandNoOccurrences(t *testing.T) {
	csv, _, _ := historyCSV(2, 10, 0, 1, 0)
	csv = withoutOccurrences(dayOnly(csv))
	args := []string{"-", "--census", "t1=4,t2=3,t3=2", "--shift-hours", "12", "--direct-care", "0.75"}
	code, out, errs := runProjectCLI(t, csv, append(args, "--json")...)
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	p := decodeProjection(t, out)
	if p.ShiftEffect.Estimated || p.ShiftEffect.SDLog != nil || p.ShiftEffect.Reason == "" {
		t.Errorf("shift effect %+v; want not estimated, with a reason", p.ShiftEffect)
	}
	if p.Trend.Estimated || p.Trend.Reason == "" {
		t.Errorf("trend %+v; want not estimated, with a reason", p.Trend)
	}
	if !p.DataSufficient {
		t.Errorf("declined without dates: %q", p.Insufficient)
	}
	_, out, _ = runProjectCLI(t, csv, args...)
	for _, want := range []string{
		"Shift-level effect: could not be estimated: " + p.ShiftEffect.Reason + ".",
		"Trend: could not be estimated: " + p.Trend.Reason + ".",
		"Projection of one 12-hour shift (",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
}

// A value typed in hours instead of minutes (×60) is held out and named.
func TestProjectCommandHeldOut(t *testing.T) {
	csv, _, _ := historyCSV(3, 10, 0, 1, 0)
	lines := strings.Split(dayOnly(csv), "\n")
	var planted string
	for i, l := range lines {
		if f := strings.Split(l, ","); len(f) == 5 && f[2] == "t2" {
			var v float64
			fmt.Sscan(f[3], &v)
			f[3] = fmt.Sprintf("%.3f", v*60)
			lines[i], planted = strings.Join(f, ","), f[0]+" "+f[3]
			break
		}
	}
	csv = strings.Join(lines, "\n")
	args := []string{"-", "--census", "t1=4,t2=3,t3=2", "--shift-hours", "12", "--direct-care", "0.75"}
	_, out, _ := runProjectCLI(t, csv, append(args, "--json")...)
	p := decodeProjection(t, out)
	date, minutes, _ := strings.Cut(planted, " ")
	if len(p.HeldOut) != 1 || p.HeldOut[0].Tier != "t2" || p.HeldOut[0].Date != date || fmt.Sprintf("%.3f", p.HeldOut[0].CareMinutes) != minutes || p.HeldOut[0].Side != "above" {
		t.Errorf("held out %+v, want t2 %s above", p.HeldOut, planted)
	}
	_, out, _ = runProjectCLI(t, csv, args...)
	if !strings.Contains(out, "Held out (likely entry errors") || !strings.Contains(out, "tier t2 on "+date+": ") {
		t.Errorf("report does not list the held-out value:\n%s", out)
	}
}

// Flags may come before FILE; the seed and draws given are used; without
// --patients-per-nurse the floor is null; an explicit nurse range is used.
func TestProjectCommandFlagsFirst(t *testing.T) {
	csv, _, _ := historyCSV(2, 10, 0, 1, 0)
	path := filepath.Join(t.TempDir(), "obs.csv")
	if err := os.WriteFile(path, []byte(dayOnly(csv)), 0o600); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runProjectCLI(t, "", "--census", "t1=4,t2=3", "--shift-hours", "12", "--direct-care", "0.75",
		"--json", "--draws", "2000", "--seed", "9", path, "--nurses-from", "0", "--nurses-to", "1")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	p := decodeProjection(t, out)
	if p.Nurses.Floor != nil || p.Simulation.Draws != 2000 || p.Simulation.Seed != 9 || len(p.Shortfall) != 2 || p.Shortfall[1].Nurses != 1 {
		t.Errorf("floor %v, simulation %+v, %d shortfall rows", show(p.Nurses.Floor), p.Simulation, len(p.Shortfall))
	}
}

// --window-hours scales every row: 4-hour windows on an 8-hour shift
// double the minutes, so the median of 10, 20, …, 100 becomes 110. No
// tier column: one tier named "all".
func TestProjectCommandWindowFlagNoTier(t *testing.T) {
	csv := "care_minutes\n10\n20\n30\n40\n50\n60\n70\n80\n90\n100\n"
	code, out, errs := runProjectCLI(t, csv, "-", "--census", "all=2", "--shift-hours", "8",
		"--window-hours", "4", "--direct-care", "1", "--json")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	p := decodeProjection(t, out)
	if len(p.Tiers) != 1 || p.Tiers[0].Code != "all" || p.Tiers[0].MedianMinutes.Value != 110 {
		t.Errorf("tiers %+v", p.Tiers)
	}
	if !strings.Contains(strings.Join(p.Warnings, "\n"), "scaled to the shift") {
		t.Errorf("no scaling warning: %q", p.Warnings)
	}
}

// The reports, rendered from committed results so that they pin the
// command's wording and layout, not the model's numbers (which change
// with the model and are tested in internal/stats). The results were made
// with wardload-model/2 by
//
//	wardload project testdata/project_dated.csv --census t1=5,t2=4,t3=2 --shift-hours 12 \
//	    --direct-care 0.75 --patients-per-nurse 4 --draws 5000 --json
//	wardload project - --census a=2,b=3 --shift-hours 8 --direct-care 0.5 --patients-per-nurse 4 --json   (stdin: handCSV)
//
// go test ./cmd/wardload -run Golden -update rewrites the golden files.
func TestProjectReportsGolden(t *testing.T) {
	for _, tc := range []struct{ result, golden, date string }{
		{"project_dated.json", "project_dated.golden", "2026-01-26"},
		{"project_declined.json", "project_declined.golden", ""},
	} {
		var p stats.Projection
		mustReadJSON(t, filepath.Join("testdata", tc.result), &p)
		var b bytes.Buffer
		if err := writeProjection(&b, &p, tc.date); err != nil {
			t.Fatal(err)
		}
		compareGolden(t, filepath.Join("testdata", tc.golden), b.String())
	}
}

func mustReadJSON(t *testing.T, path string, v any) {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
}

// compareGolden compares got with the golden file, or rewrites it with -update.
func compareGolden(t *testing.T, path, got string) {
	t.Helper()
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (rerun with -update if the change is intended):\n--- got\n%s\n--- want\n%s", path, got, want)
	}
}

func TestProjectCommandHelp(t *testing.T) {
	code, out, errs := runProjectCLI(t, "", "--help")
	if code != exitOK || errs != "" || !strings.Contains(out, "Usage: wardload project") || !strings.Contains(out, "-census") ||
		!strings.Contains(out, "-date") || !strings.Contains(out, "log scale") || strings.Contains(out, "bootstrap") {
		t.Errorf("--help: exit %d, stdout %q, stderr %q", code, out, errs)
	}
}

func TestProjectCommandBadInput(t *testing.T) {
	base := []string{"--shift-hours", "8", "--direct-care", "0.5"}
	var dated strings.Builder
	dated.WriteString("date,shift,tier,care_minutes,window_hours\n")
	for i := range 9 {
		dated.WriteString(fmt.Sprintf("2026-03-%02d,Day,a,%d,8\n", i+1, 10+3*i))
	}
	equal := "tier,care_minutes,window_hours\n" + strings.Repeat("a,20,8\n", 9) + strings.Repeat("b,5,8\n", 3)
	tests := []struct {
		name  string
		stdin string
		args  []string
		want  string // in the one stderr line
	}{
		{"no file", handCSV, append([]string{"--census", "a=1"}, base...), "exactly one FILE"},
		{"census missing", handCSV, append([]string{"-"}, base...), "--census is required"},
		{"census unknown tier", handCSV, append([]string{"-", "--census", "z=1"}, base...), `--census: tier "z" is not in the file`},
		{"census duplicate", handCSV, append([]string{"-", "--census", "a=1,a=2"}, base...), "--census: tier \"a\" is given twice"},
		{"census negative", handCSV, append([]string{"-", "--census", "a=-1"}, base...), "--census: the count for a is negative"},
		{"census fraction", handCSV, append([]string{"-", "--census", "a=1.5"}, base...), "--census: the count for a, \"1.5\", is not a whole number"},
		{"shift hours missing", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0.5"}, "--shift-hours is required"},
		{"shift hours 30", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0.5", "--shift-hours", "30"}, "--shift-hours: "},
		{"direct care 0", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0", "--shift-hours", "8"}, "--direct-care: "},
		{"direct care 0.05", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0.05", "--shift-hours", "8"}, "--direct-care: the direct-care fraction must be from 0.1 to 1"},
		{"cover 1.5", handCSV, append([]string{"-", "--census", "a=1", "--cover", "1.5"}, base...), "--cover: "},
		{"cover 0.4", handCSV, append([]string{"-", "--census", "a=1", "--cover", "0.4"}, base...), "--cover: Cover level must be from 0.5 to 0.999"},
		{"cover 0.9995", handCSV, append([]string{"-", "--census", "a=1", "--cover", "0.9995"}, base...), "--cover: Cover level must be from 0.5 to 0.999"},
		{"levels text", handCSV, append([]string{"-", "--census", "a=1", "--levels", "0.8,x"}, base...), "--levels: "},
		{"levels 1", handCSV, append([]string{"-", "--census", "a=1", "--levels", "1"}, base...), "--levels: "},
		{"draws 0", handCSV, append([]string{"-", "--census", "a=1", "--draws", "0"}, base...), "--draws: "},
		{"draws 999", handCSV, append([]string{"-", "--census", "a=1", "--draws", "999"}, base...), "--draws: Simulation draws must be at least 1000"},
		{"nurses half", handCSV, append([]string{"-", "--census", "a=1", "--nurses-to", "4"}, base...), "--nurses-from and --nurses-to"},
		{"ratio negative", handCSV, append([]string{"-", "--census", "a=1", "--patients-per-nurse", "-2"}, base...), "--patients-per-nurse: "},
		{"bad cell", "tier,care_minutes,window_hours\na,10,8\na,1O,8\n", append([]string{"-", "--census", "a=1"}, base...), `line 3, column "care_minutes"`},
		{"negative minutes", "tier,care_minutes,window_hours\na,10,8\na,-4,8\n", append([]string{"-", "--census", "a=1"}, base...),
			`line 3, column "care_minutes": care minutes must be at least 0`},
		{"bad window", "tier,care_minutes,window_hours\na,10,8\na,4,0\n", append([]string{"-", "--census", "a=1"}, base...), `line 3, column "window_hours"`},
		{"no window", "tier,care_minutes\na,10\na,4\n", append([]string{"-", "--census", "a=1"}, base...), "--window-hours"},
		{"no column", handCSV, append([]string{"-", "--census", "a=1", "--column", "minutes"}, base...), `no column "minutes"`},
		{"draws not a number", handCSV, append([]string{"-", "--census", "a=1", "--draws", "many"}, base...), "-draws"},
		{"unknown flag", handCSV, append([]string{"-", "--census", "a=1", "--beds", "3"}, base...), "-beds"},
		{"missing file", "", append([]string{filepath.Join(t.TempDir(), "nope.csv"), "--census", "a=1"}, base...), "cannot open the file"},
		{"date not a date", strings.Replace(dated.String(), "2026-03-04", "2026-02-30", 1), append([]string{"-", "--census", "a=1"}, base...),
			`-: line 5, column "date": "2026-02-30" is not a date (YYYY-MM-DD`},
		{"date in another format", strings.Replace(dated.String(), "2026-03-04", "04/03/2026", 1), append([]string{"-", "--census", "a=1"}, base...),
			`line 5, column "date": "04/03/2026" is not a date`},
		{"date empty", strings.Replace(dated.String(), "2026-03-04", "", 1), append([]string{"-", "--census", "a=1"}, base...), `line 5, column "date"`},
		{"date too old", strings.Replace(dated.String(), "2026-03-04", "1026-03-04", 1), append([]string{"-", "--census", "a=1"}, base...), `line 5, column "date"`},
		{"shift empty", strings.Replace(dated.String(), "2026-03-04,Day", "2026-03-04,", 1), append([]string{"-", "--census", "a=1"}, base...),
			`line 5, column "shift": "" is not a shift name`},
		{"shift too long", strings.Replace(dated.String(), "2026-03-04,Day", "2026-03-04,"+strings.Repeat("x", 41), 1), append([]string{"-", "--census", "a=1"}, base...),
			`line 5, column "shift"`},
		{"shift without date", "shift,tier,care_minutes,window_hours\nDay,a,10,8\nDay,a,12,8\n", append([]string{"-", "--census", "a=1"}, base...),
			`there is a "shift" column but no "date" column`},
		{"--date not a date", dated.String(), append([]string{"-", "--census", "a=1", "--date", "tomorrow"}, base...), `--date: "tomorrow" is not a date`},
		{"--date before the observations", dated.String(), append([]string{"-", "--census", "a=1", "--date", "2026-03-05"}, base...), "--date: Tier a: observation date 2026-03-06 is after the projected date"},
		{"--date without dates", handCSV, append([]string{"-", "--census", "a=1", "--date", "2026-03-05"}, base...), `--date: - has no "date" column`},
		{"zero spread", equal, append([]string{"-", "--census", "a=2"}, base...),
			`-: column "care_minutes": Tier a: all 9 usable observations are equal, so its spread cannot be estimated`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runProjectCLI(t, tc.stdin, tc.args...)
			if code != exitUsage || out != "" {
				t.Errorf("exit %d (want %d), stdout %q", code, exitUsage, out)
			}
			if !strings.Contains(errs, tc.want) || strings.Count(errs, "\n") != 1 || !strings.HasPrefix(errs, "wardload project: ") {
				t.Errorf("stderr %q, want one line containing %q", errs, tc.want)
			}
		})
	}
}

func TestParseCensus(t *testing.T) {
	known := []string{"t1", "t2", "t3"}
	good := []struct {
		in   string
		want map[string]int
	}{
		{"t1=4,t2=10", map[string]int{"t1": 4, "t2": 10}},
		{" t1 = 0 , t3=7", map[string]int{"t1": 0, "t3": 7}},
		{"t2=10000", map[string]int{"t2": 10000}},
	}
	for _, tc := range good {
		got, err := parseCensus(tc.in, known)
		if err != nil || len(got) != len(tc.want) {
			t.Errorf("parseCensus(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
			continue
		}
		for k, v := range tc.want {
			if got[k] != v {
				t.Errorf("parseCensus(%q)[%s] = %d, want %d", tc.in, k, got[k], v)
			}
		}
	}
	for _, in := range []string{"", " ", "t1", "t1=", "=4", "t1=4,", "t1=4,t1=5", "t1=-1", "t1=+1", "t1=1.0",
		"t1=1e2", "t9=1", "t1=10001", "t1=99999999999999999999", "t1=4;t2=3", "t1=0x10"} {
		got, err := parseCensus(in, known)
		if err == nil || wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "census" {
			t.Errorf("parseCensus(%q) = %v, %v; want EINVALID census", in, got, err)
		}
	}
}

// FuzzParseCensus: parseCensus never panics, and whatever it accepts is a
// count from 0 to stats.MaxPatients for a known tier.
func FuzzParseCensus(f *testing.F) {
	for _, s := range []string{"t1=4,t2=10", "t1=-1", "t1=4,t1=4", " t2 = 3 ", "x=1", "t1=1e3", "=", ",,"} {
		f.Add(s)
	}
	known := []string{"t1", "t2"}
	f.Fuzz(func(t *testing.T, s string) {
		counts, err := parseCensus(s, known)
		if err != nil {
			if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "census" {
				t.Fatalf("parseCensus(%q) error %v is not EINVALID census", s, err)
			}
			return
		}
		for k, n := range counts {
			if (k != "t1" && k != "t2") || n < 0 || n > stats.MaxPatients {
				t.Fatalf("parseCensus(%q) accepted %s=%d", s, k, n)
			}
		}
	})
}

// A small tier whose few values are equal declines for want of
// observations (exit 0); only a tier with enough of them is refused.
func TestProjectCommandSmallEqualTierDeclines(t *testing.T) {
	csv := "tier,care_minutes,window_hours\na,20,8\na,20,8\na,20,8\n"
	code, out, errs := runProjectCLI(t, csv, "-", "--census", "a=2", "--shift-hours", "8", "--direct-care", "0.5", "--json")
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	if p := decodeProjection(t, out); p.DataSufficient || p.Nurses.DecidedBy != stats.DecidedByInsufficient {
		t.Errorf("data_sufficient %v, decided_by %q", p.DataSufficient, p.Nurses.DecidedBy)
	}
}
