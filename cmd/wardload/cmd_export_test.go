package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"strings"
	"testing"
	"time"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/wardload"
)

// seedExport stores an invented ward "w3" (Europe/Dublin, tiers t1 and
// t2, one 12-hour Day shift) with two weeks of invented observations and
// projections of 10 and 11 March 2026, the 10th corrected once.
func seedExport(t *testing.T, dir string) *openedStore {
	t.Helper()
	st := openTestStore(t, dir)
	ctx := context.Background()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	w := &wardload.Ward{Code: "w3", Name: "Ward 3 (invented)", TimeZone: "Europe/Dublin"}
	must(st.CreateWard(ctx, w))
	var tiers []*wardload.Tier
	for i, code := range []string{"t1", "t2"} {
		tr := &wardload.Tier{WardID: w.ID, Code: code, Label: "Tier " + code, DisplayOrder: i}
		must(st.CreateTier(ctx, tr))
		tiers = append(tiers, tr)
	}
	sp := &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 480, NominalHours: 12}
	must(st.CreateShiftPattern(ctx, sp))
	var obs []*wardload.Observation
	for i := range 14 {
		d := wardload.Date{Year: 2026, Month: time.February, Day: 24}.AddDays(i)
		for k, tr := range tiers {
			for j := range 2 {
				obs = append(obs, &wardload.Observation{WardID: w.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d,
					WindowHours: 12, CareMinutes: float64(50*(k+1) + (i*13+j*7)%20)})
			}
		}
	}
	_, err := st.CreateObservations(ctx, obs)
	must(err)
	svc := &projector.Service{Store: st, Now: func() time.Time { return time.Date(2026, 3, 11, 9, 0, 0, 0, time.UTC) }, Draws: 1000}
	for _, c := range []struct {
		day    int
		t1, t2 int
	}{{10, 5, 3}, {10, 4, 4}, {11, 6, 2}} {
		_, _, err := svc.Save(ctx, w.ID, wardload.Date{Year: 2026, Month: time.March, Day: c.day}, sp.ID,
			[]wardload.TierCount{{TierID: tiers[0].ID, Patients: c.t1}, {TierID: tiers[1].ID, Patients: c.t2}}, wardload.StaffOnDuty{}, wardload.PlannedMovement{})
		must(err)
	}
	return st
}

func TestExportProjectionsMatchesExport(t *testing.T) {
	dir := t.TempDir()
	st := seedExport(t, dir)
	ctx := context.Background()
	w, err := st.FindWardByCode(ctx, "w3")
	if err != nil {
		t.Fatal(err)
	}
	from, to := wardload.Date{Year: 2026, Month: time.March, Day: 1}, wardload.Date{Year: 2026, Month: time.March, Day: 31}
	tiers, rows, err := export.Rows(ctx, st, w, from, to)
	if err != nil {
		t.Fatal(err)
	}
	var wantCSV, wantJSON bytes.Buffer
	if err := export.WriteCSV(&wantCSV, tiers, rows); err != nil {
		t.Fatal(err)
	}
	if err := export.WriteJSON(&wantJSON, w, from, to, tiers, rows); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		format string
		want   string
	}{{"csv", wantCSV.String()}, {"json", wantJSON.String()}} {
		code, out, errs := runCLI(t, dir, "", "export", "projections", "--ward", "w3", "--from", "2026-03-01", "--to", "2026-03-31", "--format", tc.format)
		if code != exitOK || errs != "" {
			t.Fatalf("%s: exit %d, stderr %q", tc.format, code, errs)
		}
		if out != tc.want {
			t.Errorf("%s: CLI output differs from export.Write:\n%s\nwant\n%s", tc.format, out, tc.want)
		}
	}
	// The CSV has the header and the two dated shifts, the 10th at revision 2.
	recs, err := csv.NewReader(strings.NewReader(wantCSV.String())).ReadAll()
	if err != nil || len(recs) != 3 || recs[1][1] != "2026-03-10" || recs[1][6] != "2" || recs[2][1] != "2026-03-11" {
		t.Fatalf("export rows = %v (%v)", recs, err)
	}
	// --format defaults to csv.
	if code, out, _ := runCLI(t, dir, "", "export", "projections", "--ward", "w3", "--from", "2026-03-01", "--to", "2026-03-31"); code != exitOK || out != wantCSV.String() {
		t.Errorf("default format: exit %d, output differs from CSV", code)
	}
}

func TestExportProjectionsBadInput(t *testing.T) {
	dir := t.TempDir()
	seedExport(t, dir)
	for _, tc := range []struct {
		name string
		args []string
		msg  string
	}{
		{"unknown ward", []string{"--ward", "nope", "--from", "2026-03-01", "--to", "2026-03-31"}, `no ward with code "nope"`},
		{"no ward", []string{"--from", "2026-03-01", "--to", "2026-03-31"}, "--ward is required"},
		{"bad from", []string{"--ward", "w3", "--from", "2026-02-30", "--to", "2026-03-31"}, "--from: Date \"2026-02-30\" is not a valid date"},
		{"no to", []string{"--ward", "w3", "--from", "2026-03-01"}, "--to is required"},
		{"to before from", []string{"--ward", "w3", "--from", "2026-03-31", "--to", "2026-03-01"}, "--to: The last date 2026-03-01 is before"},
		{"too long", []string{"--ward", "w3", "--from", "2020-01-01", "--to", "2026-03-01"}, "--to: An export covers at most 366 days."},
		{"bad format", []string{"--ward", "w3", "--from", "2026-03-01", "--to", "2026-03-31", "--format", "xlsx"}, "--format must be csv or json"},
		{"argument", []string{"--ward", "w3", "--from", "2026-03-01", "--to", "2026-03-31", "extra"}, "takes no arguments"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, dir, "", append([]string{"export", "projections"}, tc.args...)...)
			if code != exitUsage || out != "" {
				t.Fatalf("exit %d, stdout %q; want 2 and nothing", code, out)
			}
			if strings.Count(errs, "\n") != 1 || !strings.HasPrefix(errs, "wardload export projections: ") || !strings.Contains(errs, tc.msg) {
				t.Errorf("stderr %q, want one line with %q", errs, tc.msg)
			}
		})
	}
}
