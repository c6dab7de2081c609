package export_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/sqlite"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

var ctx = wardload.WithActor(context.Background(), wardload.Actor{UserID: 3, Name: "c.nurse"})

func must(tb testing.TB, err error) {
	tb.Helper()
	if err != nil {
		tb.Fatal(err)
	}
}

func day(s string) wardload.Date {
	d, err := wardload.ParseDate(s)
	if err != nil {
		panic(err)
	}
	return d
}

// fixture is fixed store content: an invented ward in Europe/London with
// two tiers and Day/Night shifts, three weeks of invented observations
// (a fixed formula, no randomness), a ratio floor on nights only, and
// projections saved by projector at fixed clock times: 28 March Day (then
// corrected, so only revision 2 may appear), 28 March Night (over the
// spring change: 11.5 real hours) and 29 March Day. Invented data.
type fixture struct {
	st    *sqlite.Store
	ward  *wardload.Ward
	tiers []*wardload.Tier
}

func seed(t *testing.T) *fixture {
	t.Helper()
	clock := time.Date(2026, 3, 28, 7, 40, 0, 0, time.UTC)
	st, err := sqlite.Open(context.Background(), sqlite.Config{Path: filepath.Join(t.TempDir(), "w.db"), Now: func() time.Time { return clock }})
	must(t, err)
	t.Cleanup(func() { st.Close() })
	must(t, st.Migrate(context.Background()))
	f := &fixture{st: st}
	f.ward = &wardload.Ward{Code: "w9-west", Name: "Ward 9 West (invented)", TimeZone: "Europe/London"}
	must(t, st.CreateWard(ctx, f.ward))
	for i, code := range []string{"t1", "t2"} {
		tr := &wardload.Tier{WardID: f.ward.ID, Code: code, Label: "Tier " + code, DisplayOrder: i}
		must(t, st.CreateTier(ctx, tr))
		f.tiers = append(f.tiers, tr)
	}
	dayP := &wardload.ShiftPattern{WardID: f.ward.ID, Name: "Day", StartMinute: 450, NominalHours: 12.5}
	nightP := &wardload.ShiftPattern{WardID: f.ward.ID, Name: "Night", StartMinute: 1170, NominalHours: 12.5}
	must(t, st.CreateShiftPattern(ctx, dayP))
	must(t, st.CreateShiftPattern(ctx, nightP))
	set := wardload.DefaultSettings(f.ward.ID)
	set.LookbackWeeks = 3
	set.Beds = 20
	set.Floors = []wardload.RatioFloor{{ShiftID: nightP.ID, PatientsPerNurse: 7}}
	must(t, st.SaveSettings(ctx, set))
	var obs []*wardload.Observation
	for i, d := 0, day("2026-03-06"); d.Before(day("2026-03-28")); i, d = i+1, d.AddDays(1) {
		for k, tr := range f.tiers {
			for s, sp := range []*wardload.ShiftPattern{dayP, nightP} {
				minutes := float64(60*(k+1)) + float64((i*7+k*3+s*5)%11)*6
				obs = append(obs, &wardload.Observation{WardID: f.ward.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d, WindowHours: 12.5, CareMinutes: minutes})
			}
		}
	}
	_, err = st.CreateObservations(ctx, obs)
	must(t, err)
	svc := &projector.Service{Store: st, Now: func() time.Time { return clock }, Draws: 2000}
	save := func(d string, sp *wardload.ShiftPattern, t1, t2 int, at time.Time) {
		t.Helper()
		clock = at
		_, _, err := svc.Save(ctx, f.ward.ID, day(d), sp.ID, []wardload.TierCount{{TierID: f.tiers[0].ID, Patients: t1}, {TierID: f.tiers[1].ID, Patients: t2}}, wardload.StaffOnDuty{}, wardload.PlannedMovement{})
		must(t, err)
	}
	save("2026-03-28", dayP, 9, 6, time.Date(2026, 3, 28, 7, 40, 0, 0, time.UTC))
	save("2026-03-28", dayP, 8, 7, time.Date(2026, 3, 28, 8, 5, 0, 0, time.UTC))
	save("2026-03-28", nightP, 10, 6, time.Date(2026, 3, 28, 19, 45, 0, 0, time.UTC))
	save("2026-03-29", dayP, 7, 7, time.Date(2026, 3, 29, 6, 50, 0, 0, time.UTC))
	// End-of-shift records at 08:30 UTC on the 29th: the Day of the 28th
	// (then corrected: only revision 2 may appear) and its Night, which
	// ended 07:00 UTC; the Day of the 29th is running and has none.
	clock = time.Date(2026, 3, 29, 8, 30, 0, 0, time.UTC)
	record := func(d string, sp *wardload.ShiftPattern, r wardload.ShiftRecord) {
		t.Helper()
		r.WardID, r.Date, r.ShiftID = f.ward.ID, day(d), sp.ID
		must(t, st.CreateShiftRecord(ctx, &r))
	}
	record("2026-03-28", dayP, wardload.ShiftRecord{Worked: wardload.StaffOnDuty{Nurses: new(4)}, Admissions: 1, Discharges: 2})
	record("2026-03-28", dayP, wardload.ShiftRecord{Worked: wardload.StaffOnDuty{Nurses: new(3), Support: new(1)}, Admissions: 2, Discharges: 2,
		CareLeftUndone: true, CareCategory: wardload.CareMobility})
	record("2026-03-28", nightP, wardload.ShiftRecord{Worked: wardload.StaffOnDuty{Nurses: new(5)}, Admissions: 0, Discharges: 1})
	return f
}

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		must(t, os.WriteFile(path, got, 0o644))
		return
	}
	want, err := os.ReadFile(path)
	must(t, err)
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from the golden file (run go test -update after checking the change):\ngot:\n%s\nwant:\n%s", name, got, want)
	}
}

func TestGoldenCSV(t *testing.T) {
	f := seed(t)
	tiers, rows, err := export.Rows(ctx, f.st, f.ward, day("2026-03-27"), day("2026-03-29"))
	must(t, err)
	var b bytes.Buffer
	must(t, export.WriteCSV(&b, tiers, rows))
	golden(t, "projections.csv.golden", b.Bytes())

	// RFC 4180: it reads back with a header and one record per dated
	// shift, oldest first, the corrected Day of the 28th as revision 2.
	recs, err := csv.NewReader(bytes.NewReader(b.Bytes())).ReadAll()
	must(t, err)
	if len(recs) != 4 || strings.Join(recs[0], ",") != strings.Join(export.Columns(tiers), ",") {
		t.Fatalf("records = %d, header %v", len(recs), recs[0])
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	want := []struct{ date, shift, start, end, hours, rev, total, t1, floor string }{
		// Europe/London in winter: offset +00:00, written out (not "Z").
		{"2026-03-28", "Day", "2026-03-28T07:30:00+00:00", "2026-03-28T20:00:00+00:00", "12.50", "2", "15", "8", ""},
		// Over the spring change: GMT to BST, 11.5 real hours.
		{"2026-03-28", "Night", "2026-03-28T19:30:00+00:00", "2026-03-29T08:00:00+01:00", "11.50", "1", "16", "10", "4"},
		{"2026-03-29", "Day", "2026-03-29T07:30:00+01:00", "2026-03-29T20:00:00+01:00", "12.50", "1", "14", "7", ""},
	}
	for i, w := range want {
		r := recs[i+1]
		got := []string{r[col["date"]], r[col["shift"]], r[col["start"]], r[col["end"]], r[col["shift_hours"]],
			r[col["census_revision"]], r[col["census_total"]], r[col["census_t1"]], r[col["ratio_floor_nurses"]]}
		exp := []string{w.date, w.shift, w.start, w.end, w.hours, w.rev, w.total, w.t1, w.floor}
		if strings.Join(got, "|") != strings.Join(exp, "|") {
			t.Errorf("row %d = %v, want %v", i+1, got, exp)
		}
		if r[col["caution"]] != stats.Caution || r[col["method_version"]] != stats.MethodVersion {
			t.Errorf("row %d lacks the caution or method", i+1)
		}
	}
	// The end-of-shift records as actual columns: the Day of the 28th at
	// its revision 2, its Night without support staff, none for the 29th.
	for i, w := range [][8]string{
		{"2", "3", "1", "2", "2", "true", wardload.CareMobility},
		{"1", "5", "", "0", "1", "false", ""},
		{"", "", "", "", "", "", ""},
	} {
		r := recs[i+1]
		got := [8]string{r[col["actual_record_revision"]], r[col["actual_nurses"]], r[col["actual_support_staff"]], r[col["actual_admissions"]],
			r[col["actual_discharges"]], r[col["care_left_undone"]], r[col["care_left_undone_category"]]}
		if got != w {
			t.Errorf("row %d actual columns = %q, want %q", i+1, got, w)
		}
	}
	// ceil(16/7) + 1 for the nurse in charge = 4, stated in words too.
	if rule := recs[2][col["ratio_floor_rule"]]; !strings.Contains(rule, "at most 7 patients per nurse") {
		t.Errorf("floor rule = %q", rule)
	}
	if rule := recs[1][col["ratio_floor_rule"]]; rule != export.NoFloor {
		t.Errorf("day floor rule = %q, want %q", rule, export.NoFloor)
	}
}

func TestGoldenJSON(t *testing.T) {
	f := seed(t)
	from, to := day("2026-03-27"), day("2026-03-29")
	tiers, rows, err := export.Rows(ctx, f.st, f.ward, from, to)
	must(t, err)
	var b bytes.Buffer
	must(t, export.WriteJSON(&b, f.ward, from, to, tiers, rows))
	golden(t, "projections.json.golden", b.Bytes())

	// Same content as the CSV: every CSV field, with the same digits.
	var csvBuf bytes.Buffer
	must(t, export.WriteCSV(&csvBuf, tiers, rows))
	recs, err := csv.NewReader(&csvBuf).ReadAll()
	must(t, err)
	var doc struct {
		Ward, From, To, Caution string
		Rows                    []map[string]json.RawMessage
	}
	dec := json.NewDecoder(bytes.NewReader(b.Bytes()))
	dec.UseNumber()
	must(t, dec.Decode(&doc))
	if doc.Ward != "w9-west" || doc.From != "2026-03-27" || doc.To != "2026-03-29" || doc.Caution != stats.Caution || len(doc.Rows) != len(recs)-1 {
		t.Fatalf("document head = %q %q %q, %d rows", doc.Ward, doc.From, doc.To, len(doc.Rows))
	}
	for i, rec := range recs[1:] {
		for j, c := range recs[0] {
			raw := doc.Rows[i][c]
			if code, ok := strings.CutPrefix(c, "census_"); ok && c != "census_revision" && c != "census_total" {
				var census map[string]json.RawMessage
				must(t, json.Unmarshal(doc.Rows[i]["census"], &census))
				raw = census[code]
			}
			got := string(raw)
			if strings.HasPrefix(got, `"`) {
				must(t, json.Unmarshal(raw, &got))
			}
			if got == "null" { // an empty CSV cell is null in the JSON
				got = ""
			}
			if got != rec[j] {
				t.Errorf("row %d %s: JSON %s, CSV %q", i+1, c, raw, rec[j])
			}
		}
	}
}

func TestRowsErrors(t *testing.T) {
	f := seed(t)
	for _, tc := range []struct {
		name, from, to, field string
	}{
		{"no from", "", "2026-03-29", "from"},
		{"no to", "2026-03-29", "", "to"},
		{"to before from", "2026-03-29", "2026-03-28", "to"},
		{"over a year", "2025-03-28", "2026-03-29", "to"},
	} {
		var from, to wardload.Date
		if tc.from != "" {
			from = day(tc.from)
		}
		if tc.to != "" {
			to = day(tc.to)
		}
		if _, _, err := export.Rows(ctx, f.st, f.ward, from, to); wardload.ErrorField(err) != tc.field {
			t.Errorf("%s: %v, want field %s", tc.name, err, tc.field)
		}
	}
	// A year to the day is allowed; an empty range gives a header only.
	tiers, rows, err := export.Rows(ctx, f.st, f.ward, day("2025-03-29"), day("2026-03-28"))
	must(t, err)
	if len(rows) != 2 {
		t.Errorf("rows up to the 28th = %d, want 2", len(rows))
	}
	_, rows, err = export.Rows(ctx, f.st, f.ward, day("2026-01-01"), day("2026-01-31"))
	must(t, err)
	var b bytes.Buffer
	must(t, export.WriteCSV(&b, tiers, rows))
	if strings.Count(b.String(), "\r\n") != 1 {
		t.Errorf("empty export = %q, want the header row only", b.String())
	}
}

func TestFormatHours(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		want string
	}{{12.5, "12.50"}, {7.333333333333333, "7.33"}, {-0.001, "0.00"}, {-1.5, "-1.50"}, {0.125, "0.12"}} {
		if got := export.FormatHours(tc.v); got != tc.want {
			t.Errorf("FormatHours(%v) = %q, want %q", tc.v, got, tc.want)
		}
	}
}
