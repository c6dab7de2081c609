package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"strings"
	"testing"

	"wardload/internal/simstudy"
	"wardload/internal/stats"
)

// censusCSV writes days of the first battery scenario's invented census
// (two shifts, three tiers) as a census file.
func censusCSV(days int) string {
	sc := simstudy.CensusScenarios()[0]
	sc.Weeks = (days + 6) / 7
	var b strings.Builder
	b.WriteString("date,shift,tier,patients\n")
	for _, c := range simstudy.GenerateCensus(sc, 1) {
		if c.Date > "2026-01-04" && dayIndex(c.Date) < days {
			fmt.Fprintf(&b, "%s,%s,%s,%d\n", c.Date, c.Shift, c.Tier, c.Patients)
		}
	}
	return b.String()
}

// dayIndex counts days from the scenario's start, 2026-01-05.
func dayIndex(date string) int {
	var y, m, d int
	fmt.Sscanf(date, "%d-%d-%d", &y, &m, &d)
	days := map[int]int{1: 0, 2: 31, 3: 59, 4: 90, 5: 120, 6: 151, 7: 181, 8: 212}[m]
	return days + d - 5
}

func TestForecastCommandReport(t *testing.T) {
	code, out, errs := runStdin(t, censusCSV(56), "forecast", "-", "--beds", "60", "--weeks", "2", "--draws", "500")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{
		"Census forecast from -, 2026-03-02 to 2026-03-15 (2 weeks), quasipoisson (" + stats.CensusMethodVersion + ")",
		"History 2026-01-05 to 2026-03-01, 56 dated days; 60 beds; 500 draws, seed 1.",
		"Tier t1: 112 dated shifts", "Median census [80% band, 90% band] per tier and in total:\ndate        day  shift  t1", "2026-03-02  Mon  Day", "2026-03-15  Sun  Night",
		stats.CensusCaution,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if n := strings.Count(out, "\n2026-03-"); n != 28 {
		t.Errorf("%d dated shift lines, want 28 (14 days × 2 shifts)", n)
	}
}

func TestForecastCommandJSONAndCSV(t *testing.T) {
	in := censusCSV(35)
	code, out, errs := runStdin(t, in, "forecast", "-", "--beds", "60", "--from", "2026-02-16", "--draws", "300", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var fc stats.CensusForecast
	if err := json.Unmarshal([]byte(out), &fc); err != nil {
		t.Fatal(err)
	}
	// The 35 days end on 2026-02-08; from 2026-02-16 for the default 6 weeks.
	if fc.From != "2026-02-16" || fc.To != "2026-03-29" || len(fc.Shifts) != 84 || len(fc.Shifts[0].Tiers) != 3 || fc.Shifts[0].Horizon != 8 {
		t.Errorf("JSON from %s to %s, %d shifts, first horizon %d", fc.From, fc.To, len(fc.Shifts), fc.Shifts[0].Horizon)
	}
	code, out, errs = runStdin(t, in, "forecast", "-", "--beds", "60", "--from", "2026-02-16", "--draws", "300", "--csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(recs[0], ",") != "date,weekday,shift,horizon_days,tier,mean,median,low_80,high_80,low_90,high_90,beds,beds_bound_share,method_version" {
		t.Errorf("CSV header %v", recs[0])
	}
	// 84 dated shifts × (3 tiers + total); the CSV agrees with the JSON.
	if len(recs) != 1+84*4 || recs[4][4] != "total" || recs[1][6] != fmt.Sprint(fc.Shifts[0].Tiers[0].Median) {
		t.Errorf("%d CSV rows; row 1 %v, JSON median %d", len(recs), recs[1], fc.Shifts[0].Tiers[0].Median)
	}
}

func TestForecastCommandRefuses(t *testing.T) {
	good := censusCSV(35)
	for _, tc := range []struct {
		name, stdin string
		args        []string
		want        string
	}{
		{"short history", censusCSV(13), []string{"--beds", "60"}, "The census history has 13 dated day(s); a forecast needs at least 4 weeks (28 days), so 3 more weeks of census history are needed."},
		{"no beds", good, nil, "--beds is required"},
		{"weeks 14", good, []string{"--beds", "60", "--weeks", "14"}, "--weeks: the horizon must be from 1 to 13 weeks."},
		{"from in history", good, []string{"--beds", "60", "--from", "2026-02-01"}, "--from: The forecast must start after the newest census date, 2026-02-08."},
		{"beds too few", good, []string{"--beds", "5"}, "--beds: The census of 2026-01-05"},
		{"family", good, []string{"--beds", "60", "--family", "zip"}, `--family: "zip" is not quasipoisson or nb2.`},
		{"no patients column", "date,shift,tier\n2026-01-05,D,t1\n", []string{"--beds", "60"}, `line 1: there is no "patients" column`},
		{"fraction", "date,shift,tier,patients\n2026-01-05,D,t1,1.5\n", []string{"--beds", "60"}, `line 2, column "patients": "1.5" is not a whole number`},
		{"negative", "date,shift,tier,patients\n2026-01-05,D,t1,-1\n", []string{"--beds", "60"}, `line 2, column "patients": "-1"`},
		{"duplicate", "date,shift,tier,patients\n2026-01-05,D,t1,1\n2026-01-05,D,t1,2\n", []string{"--beds", "60"}, "line 3: 2026-01-05, shift D, tier t1 is already on line 2."},
		{"bad date", "date,shift,tier,patients\n2026-02-30,D,t1,1\n", []string{"--beds", "60"}, `line 2, column "date": "2026-02-30" is not a date`},
		{"json and csv", good, []string{"--beds", "60", "--json", "--csv"}, "give --json or --csv, not both"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runStdin(t, tc.stdin, append([]string{"forecast", "-"}, tc.args...)...)
			if code != exitUsage || out != "" || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, stdout %q, stderr %q; want 2 and %q", code, out, errs, tc.want)
			}
		})
	}
}
