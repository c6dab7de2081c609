package main

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"wardload/internal/stats"
)

// obsCSV writes invented care observations (seeded lognormal, a median of
// 60, 150 and 300 minutes by tier order) for every shift and tier of the
// census file, three per tier on each of its dated shifts, to a file in
// dir. keep filters the shifts.
func obsCSV(t *testing.T, census string, keep func(shift string) bool) string {
	t.Helper()
	r := rand.New(rand.NewPCG(8, 1))
	var b strings.Builder
	b.WriteString("date,shift,tier,window_hours,care_minutes\n")
	var tiers []string
	for line := range strings.SplitSeq(strings.TrimSpace(census), "\n") {
		f := strings.Split(line, ",")
		if f[0] == "date" || !keep(f[1]) {
			continue
		}
		if !slices.Contains(tiers, f[2]) {
			tiers = append(tiers, f[2])
		}
		med := []float64{60, 150, 300, 500}[slices.Index(tiers, f[2])%4]
		for range 3 {
			fmt.Fprintf(&b, "%s,%s,%s,12,%.1f\n", f[0], f[1], f[2], med*math.Exp(0.5*r.NormFloat64()))
		}
	}
	path := filepath.Join(t.TempDir(), "obs.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestForecastWorkloadCommand(t *testing.T) {
	census := censusCSV(56)
	obs := obsCSV(t, census, func(string) bool { return true })
	args := []string{"forecast", "-", "--beds", "60", "--weeks", "1", "--draws", "500", "--observations", obs,
		"--shift-hours", "12", "--direct-care", "0.8", "--patients-per-nurse", "5"}
	code, out, errs := runStdin(t, census, args...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{
		"Nurse-hours forecast from - and " + obs + ", 2026-03-02 to 2026-03-08",
		"Ratio floor used: at most 5 patients per nurse, plus 1 nurse in charge",
		"nurse-hours at 90%", stats.Caution, stats.CensusCaution,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if n := strings.Count(out, "\n2026-03-"); n != 14 {
		t.Errorf("%d dated shift lines, want 14", n)
	}

	code, js, errs := runStdin(t, census, append(args, "--json")...)
	if code != exitOK {
		t.Fatalf("--json: exit %d: %s", code, errs)
	}
	var wf stats.WorkloadForecast
	if err := json.Unmarshal([]byte(js), &wf); err != nil {
		t.Fatal(err)
	}
	if len(wf.Shifts) != 14 || wf.MethodVersion != stats.WorkloadMethodVersion || wf.Caution != stats.Caution {
		t.Fatalf("JSON: %d shifts, method %q", len(wf.Shifts), wf.MethodVersion)
	}
	for _, s := range wf.Shifts {
		if !s.DataSufficient || s.Nurses.Recommended == nil || *s.Nurses.Recommended < *s.Nurses.Floor {
			t.Errorf("%s %s: %+v", s.Date, s.Shift, s.Nurses)
		}
	}
	code, csvOut, errs := runStdin(t, census, append(args, "--csv")...)
	if code != exitOK {
		t.Fatalf("--csv: exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(csvOut), "\n")
	if len(lines) != 15 || !strings.HasPrefix(lines[0], "date,weekday,shift,horizon_days,census_median") {
		t.Errorf("CSV: %d lines, header %q", len(lines), lines[0])
	}
}

// Observations of one shift only: the other shift's dated shifts decline
// and show the floor alone, saying why.
func TestForecastWorkloadCommandDeclines(t *testing.T) {
	census := censusCSV(56)
	first := strings.Split(strings.Split(census, "\n")[1], ",")[1]
	obs := obsCSV(t, census, func(s string) bool { return s == first })
	code, out, errs := runStdin(t, census, "forecast", "-", "--beds", "60", "--weeks", "1", "--draws", "500", "--observations", obs,
		"--shift-hours", "12", "--direct-care", "0.8", "--patients-per-nurse", "5")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if n := strings.Count(out, "\nDeclined: "); n != 7 {
		t.Errorf("%d declined shifts, want 7 (the other shift, every day):\n%s", n, out)
	}
}

func TestForecastWorkloadCommandRefuses(t *testing.T) {
	census := censusCSV(56)
	obs := obsCSV(t, census, func(string) bool { return true })
	base := []string{"forecast", "-", "--beds", "60", "--weeks", "1", "--draws", "500"}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--observations", obs, "--direct-care", "0.8"}, "--shift-hours is required"},
		{[]string{"--observations", obs, "--shift-hours", "12"}, "--direct-care is required"},
		{[]string{"--observations", obs, "--shift-hours", "Day=12", "--direct-care", "0.8"}, "--shift-hours: no hours for shift"},
		{[]string{"--observations", obs, "--shift-hours", "30", "--direct-care", "0.8"}, "at most 25"},
		{[]string{"--observations", obs, "--shift-hours", "12", "--direct-care", "0.008"}, "--direct-care"},
		{[]string{"--observations", obs, "--shift-hours", "12", "--direct-care", "0.8", "--cover", "0.2"}, "--cover"},
		{[]string{"--observations", filepath.Join(t.TempDir(), "none.csv"), "--shift-hours", "12", "--direct-care", "0.8"}, "cannot open"},
		{[]string{"--cover", "0.9"}, "--cover goes with --observations"},
	} {
		code, out, errs := runStdin(t, census, append(slices.Clone(base), tc.args...)...)
		if code != exitUsage || out != "" || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr %q; want exit 2 and %q", tc.args, code, len(out), errs, tc.want)
		}
	}
}
