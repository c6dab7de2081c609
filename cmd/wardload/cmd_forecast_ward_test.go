package main

import (
	"encoding/json"
	"regexp"
	"strings"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/stats"
)

// forecast --ward on the demo ward, on both stores: the same forecast
// from the same rows (same seed), every shift above its floor, the floors
// named, the caution said.
func TestForecastWardCommand(t *testing.T) {
	dir, _ := mustDemoDataDir(t)
	sqliteArgs := []string{"forecast", "--ward", demo.WardCode, "--weeks", "1", "--draws", "500", "--data-dir", dir}
	code, out, errs := runStdin(t, "", sqliteArgs...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"Ward " + demo.WardCode + " (", "Ratio floors used (the ward's settings): Day at most", "Night at most", stats.Caution, stats.CensusCaution} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if n := len(regexp.MustCompile(`(?m)^\d{4}-\d\d-\d\d  `).FindAllString(out, -1)); n != 14 {
		t.Errorf("%d dated shift lines, want 14:\n%s", n, out)
	}
	_, js, errs := runStdin(t, "", append(sqliteArgs, "--json")...)
	var lite stats.WorkloadForecast
	if err := json.Unmarshal([]byte(js), &lite); err != nil {
		t.Fatalf("%v: %s", err, errs)
	}
	for _, s := range lite.Shifts {
		if !s.DataSufficient || s.Nurses.Recommended == nil || s.Nurses.Floor == nil || *s.Nurses.Recommended < *s.Nurses.Floor {
			t.Errorf("%s %s: %+v %v", s.Date, s.Shift, s.Nurses, s.Insufficient)
		}
	}

	url, _ := mustDemoDatabase(t)
	_, js, errs = runStdin(t, "", "forecast", "--ward", demo.WardCode, "--weeks", "1", "--draws", "500", "--db", url, "--data-dir", t.TempDir(), "--json")
	var pg stats.WorkloadForecast
	if err := json.Unmarshal([]byte(js), &pg); err != nil {
		t.Fatalf("PostgreSQL: %v: %s", err, errs)
	}
	// The two demos are seeded at different moments; where their history
	// ends on the same day they must agree exactly.
	if pg.Census.HistoryTo != lite.Census.HistoryTo {
		t.Logf("not compared: the demos' census ends on %s (SQLite) and %s (PostgreSQL), seeded either side of midnight", lite.Census.HistoryTo, pg.Census.HistoryTo)
	} else {
		for i := range lite.Shifts {
			a, b := lite.Shifts[i], pg.Shifts[i]
			if a.CoverMinutes != b.CoverMinutes || *a.Nurses.Recommended != *b.Nurses.Recommended {
				t.Errorf("%s %s: SQLite %v / %d, PostgreSQL %v / %d", a.Date, a.Shift, a.CoverMinutes, *a.Nurses.Recommended, b.CoverMinutes, *b.Nurses.Recommended)
			}
		}
	}
}

func TestForecastWardCommandRefuses(t *testing.T) {
	dir, _ := mustDemoDataDir(t)
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--ward", "nope"}, `no ward with code "nope"`},
		{[]string{"--ward", demo.WardCode, "--beds", "20"}, "--beds is for files"},
		{[]string{"--ward", demo.WardCode, "--observations", "x.csv"}, "--observations is for files"},
		{[]string{"--ward", demo.WardCode, "census.csv"}, "not both"},
		{[]string{"--ward", demo.WardCode, "--weeks", "14"}, "--weeks: the horizon must be from 1 to 13 weeks"},
		{[]string{"--ward", demo.WardCode, "--json", "--csv"}, "give --json or --csv, not both"},
		{[]string{"--ward", demo.WardCode, "--from", "2020-01-01"}, "no census in the 52 weeks before 2020-01-01"},
	} {
		code, out, errs := runStdin(t, "", append(append([]string{"forecast"}, tc.args...), "--data-dir", dir)...)
		if code != exitUsage || out != "" || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr %q; want exit 2 and %q", tc.args, code, len(out), errs, tc.want)
		}
	}
}
