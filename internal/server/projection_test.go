package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net/http/httptest"
	"slices"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/export"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// mustProject posts a census for ward cw as principal p and returns the
// stored projection.
func (f *censusFixture) mustProject(tb testing.TB, p string, cw *censusWard, date string, shift *wardload.ShiftPattern, counts ...int) *wardload.Projection {
	tb.Helper()
	// confirm_ended: several callers post shifts that ended before the
	// fixture's clock; the question itself is tested in census_shift_test.go.
	form := map[string][]string{"date": {date}, "shift": {strconv.FormatInt(shift.ID, 10)}, "confirm_ended": {"1"}}
	for i, t := range cw.tiers {
		form["tier_"+t.Code] = []string{strconv.Itoa(counts[i])}
	}
	res, body := f.do(tb, f.as(tb, p, post("/wards/"+cw.ward.Code+"/census", form)))
	loc := res.Header.Get("Location")
	if res.StatusCode != 303 {
		tb.Fatalf("census post: %d\n%s", res.StatusCode, body)
	}
	id, err := strconv.ParseInt(loc[strings.LastIndex(loc, "/")+1:], 10, 64)
	if err != nil {
		tb.Fatalf("Location %q", loc)
	}
	pr, err := f.st.FindProjectionByID(context.Background(), id)
	if err != nil {
		tb.Fatal(err)
	}
	return pr
}

// exportedOnPage maps the page's data-testid of each figure the roster
// export carries to the export's text of it.
func exportedOnPage(row export.Row) map[string]string {
	opt := func(n *int, none string) string {
		if n == nil {
			return none
		}
		return strconv.Itoa(*n)
	}
	m := map[string]string{
		"recommended":        opt(row.Recommended, "none"),
		"floor-nurses":       opt(row.Floor, "none"),
		"floor-rule":         row.FloorRule,
		"decided-by":         row.DecidedBy,
		"shift-hours":        export.FormatHours(row.ShiftHours),
		"census-total":       strconv.Itoa(row.TotalPatients),
		"revision":           strconv.Itoa(row.CensusRevision),
		"method-version":     row.MethodVersion,
		"projection-caution": row.Caution,
	}
	// A declined projection shows no figure of the care-time part, the
	// cover level it could not be held to included.
	if row.DataSufficient {
		m["cover-level"] = export.FormatLevel(row.CoverLevel)
		m["nurses-cover"] = opt(row.NursesCover, "")
		m["expected-nurse-hours"] = export.FormatHours(*row.ExpectedNurseHours)
		m["band-low"] = export.FormatHours(*row.BandLowNurseHours)
		m["band-high"] = export.FormatHours(*row.BandHighNurseHours)
	}
	return m
}

// TestProjectionPageShowsTheExportsFigures: every figure the roster
// export carries appears on the page with exactly the export's digits,
// the band under its level, and the shortfall chance of the recommended
// row as the export words it.
func TestProjectionPageShowsTheExportsFigures(t *testing.T) {
	f := newCensusFixture(t)
	withFloor := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 0)
	noFloor := f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.night, 5, 5, 2, 0)
	from, to := wardload.Date{Year: 2026, Month: 3, Day: 1}, wardload.Date{Year: 2026, Month: 3, Day: 2}
	_, rows, err := export.Rows(context.Background(), f.st, f.wardA, from, to)
	if err != nil || len(rows) != 2 {
		t.Fatalf("export rows %d, %v", len(rows), err)
	}
	for i, p := range []*wardload.Projection{noFloor, withFloor} { // rows are oldest first
		row := rows[i]
		_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
		checkExportedOnPage(t, row.Shift, body, row)

		if !row.DataSufficient || row.Shortfall == nil || row.BandLevel == nil {
			t.Fatalf("%s: the fixture's projections have enough data: %+v", row.Shift, row)
		}
		level := coverPercent(*row.BandLevel)
		if got := byTestID(t, body, "band-name"); !slices.Equal(got, []string{level + " band"}) {
			t.Errorf("%s band name %q, want %q", row.Shift, got, level+" band")
		}
		if got := byTestID(t, body, "chart-band-label"); !slices.Equal(got, []string{level + " band"}) {
			t.Errorf("%s chart band label %q, want the band's name %q", row.Shift, got, level+" band")
		}
		rec := recommendedRow(t, body)
		if rec["shortfall-chance"] != row.Shortfall.Text || rec["shortfall-nurses"] != strconv.Itoa(*row.Recommended)+" recommended" {
			t.Errorf("%s recommended shortfall row %v, export %q at %d", row.Shift, rec, row.Shortfall.Text, *row.Recommended)
		}
		// And the stored projection agrees with both.
		if *row.Recommended != p.Recommended {
			t.Errorf("export recommended %d, stored %d", *row.Recommended, p.Recommended)
		}
	}
	if withFloor.Floor == nil || noFloor.Floor != nil {
		t.Fatalf("fixture: Day should have a floor and Night none (%v, %v)", withFloor.Floor, noFloor.Floor)
	}
}

// recommendedRow returns the cells of the shortfall table's recommended
// row by data-testid.
func recommendedRow(tb testing.TB, body string) map[string]string {
	tb.Helper()
	nurses := byTestID(tb, body, "shortfall-nurses")
	for i, n := range nurses {
		if strings.HasSuffix(n, "recommended") {
			row := map[string]string{"shortfall-nurses": n}
			for _, id := range []string{"shortfall-capacity", "shortfall-chance", "shortfall-care-giving"} {
				if cells := byTestID(tb, body, id); i < len(cells) {
					row[id] = cells[i]
				}
			}
			return row
		}
	}
	tb.Fatalf("no recommended row among %q", nurses)
	return nil
}

// TestProjectionPageSaysCoverWithoutFloatNoise: a cover level of 0.57 is
// "57%" everywhere on the page (100*0.57 is 56.99999999999999 in float64).
func TestProjectionPageSaysCoverWithoutFloatNoise(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	st, err := f.st.FindSettings(ctx, f.wardA.ID)
	if err != nil {
		t.Fatal(err)
	}
	st.CoverLevel = 0.57
	if err := f.st.SaveSettings(ctx, st); err != nil {
		t.Fatal(err)
	}
	p := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 0)
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
	if strings.Contains(body, "56.99") || strings.Count(body, "57%") < 3 {
		t.Errorf("cover level 0.57: page has %d × \"57%%\", 56.99 present: %v", strings.Count(body, "57%"), strings.Contains(body, "56.99"))
	}
}

func TestProjectionPageContent(t *testing.T) {
	f := newCensusFixture(t)
	p := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 0)
	var res stats.Projection
	if err := json.Unmarshal([]byte(p.Result), &res); err != nil {
		t.Fatal(err)
	}
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
	if got := byTestID(t, body, "recommended"); !slices.Equal(got, []string{strconv.Itoa(p.Recommended)}) {
		t.Errorf("recommended %q, stored %d", got, p.Recommended)
	}
	// 13 patients at 5 per nurse, plus the nurse in charge: 3 + 1.
	if got := byTestID(t, body, "floor-nurses"); !slices.Equal(got, []string{"4"}) {
		t.Errorf("floor %q, want 4", got)
	}
	if got := byTestID(t, body, "floor-rule"); len(got) != 1 || !strings.Contains(got[0], "at most 5 patients per nurse") || !strings.Contains(got[0], "nurse in charge") {
		t.Errorf("floor rule %q", got)
	}
	if !strings.Contains(body, `<svg xmlns="http://www.w3.org/2000/svg"`) || !strings.Contains(body, `class="chart-range"`) || strings.Count(body, `class="chart-cap`) != 3 {
		t.Error("no chart with a band and three capacity lines")
	}
	if got := byTestID(t, body, "shortfall-nurses"); len(got) != len(res.Shortfall) || len(got) == 0 {
		t.Errorf("shortfall rows %d, result has %d", len(got), len(res.Shortfall))
	}
	chances := byTestID(t, body, "shortfall-chance")
	for i, sf := range res.Shortfall {
		if i >= len(chances) || chances[i] != sf.Text {
			t.Errorf("shortfall at %d nurses: page %q, want the result's %q", sf.Nurses, chances[i:min(i+1, len(chances))], sf.Text)
		}
	}
	for _, c := range chances {
		if bareZero(c) || strings.Contains(c, "±") {
			t.Errorf("shortfall chance %q reads as a bare 0%% or with ±", c)
		}
	}
	// Day has a floor whose nurse in charge does not count: that nurse
	// gives no direct care either, and the page says so.
	if res.Nurses.InCharge != 1 {
		t.Fatalf("fixture: the Day floor's nurse in charge should be extra (in charge %d)", res.Nurses.InCharge)
	}
	if got := byTestID(t, body, "capacity-rule"); !slices.Equal(got, []string{res.CapacityRule}) || !strings.Contains(got[0], "+ 1") {
		t.Errorf("capacity rule %q, result %q", got, res.CapacityRule)
	}
	if got := byTestID(t, body, "care-giving"); !slices.Equal(got, []string{fmt.Sprintf("(%d giving direct care + 1 nurse in charge)", *res.Nurses.CareGiving)}) {
		t.Errorf("care-giving %q, result %d", got, *res.Nurses.CareGiving)
	}
	for i, g := range byTestID(t, body, "shortfall-care-giving") {
		if want := strconv.Itoa(res.Shortfall[i].CareGivingNurses); g != want || res.Shortfall[i].CareGivingNurses != res.Shortfall[i].Nurses-1 {
			t.Errorf("row %d: care-giving %q, result %d of %d nurses", i, g, res.Shortfall[i].CareGivingNurses, res.Shortfall[i].Nurses)
		}
	}
	// The caution once, with the page's figures; the layout's own line
	// stays in the footer. Method details are folded away.
	if got := byTestID(t, body, "projection-caution"); !slices.Equal(got, []string{stats.Caution}) || strings.Count(body, "not a staffing decision") != 1 {
		t.Errorf("caution %q, %d times \"not a staffing decision\"", got, strings.Count(body, "not a staffing decision"))
	}
	if !strings.Contains(body, `<details class="record" data-testid="method-details">`) {
		t.Error("method details are not in a closed details element")
	}
	for _, id := range []string{"shift-effect", "trend"} {
		if got := byTestID(t, body, id); len(got) != 1 || got[0] == "" {
			t.Errorf("%s line %q", id, got)
		}
	}
	if got := byTestID(t, body, "tier-patients"); !slices.Equal(got, []string{"4", "6", "3", "0"}) {
		t.Errorf("tier patients %q", got)
	}
	if got := byTestID(t, body, "insufficient"); len(got) != 0 {
		t.Errorf("a projection with enough data says insufficient: %q", got)
	}
	if got := byTestID(t, body, "draws"); !slices.Equal(got, []string{strconv.Itoa(p.Draws)}) {
		t.Errorf("draws %q", got)
	}
	if got := byTestID(t, body, "seed"); !slices.Equal(got, []string{strconv.FormatUint(p.Seed, 10)}) {
		t.Errorf("seed %q", got)
	}
	if got := byTestID(t, body, "caution"); len(got) != 1 {
		t.Errorf("layout caution %q", got)
	}
	// The fixture's data has 4-hour windows: the scaling warning shows.
	if w := strings.Join(byTestID(t, body, "warning"), " "); !strings.Contains(w, "scaled to the shift") {
		t.Errorf("warnings %q lack the scaled-window warning", w)
	}
	for _, bad := range []string{"<script", "<style", "style=", "onclick="} {
		if strings.Contains(body, bad) {
			t.Errorf("page contains %q (the CSP forbids it)", bad)
		}
	}
}

func TestProjectionOfAnotherWardIsNotFound(t *testing.T) {
	f := newCensusFixture(t)
	onB := f.mustProject(t, pAdmin, f.b, "2026-03-02", f.b.day, 2, 2, 2, 0)
	for _, p := range []string{pNurseA, pManagerA, pAdmin} {
		res, _ := f.do(t, f.as(t, p, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", onB.ID), nil)))
		if res.StatusCode != 404 {
			t.Errorf("%s: ward B's projection via ward A = %d, want 404", p, res.StatusCode)
		}
	}
	for _, id := range []string{"0", "abc", "99999"} {
		if res, _ := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/w-a/projections/"+id, nil))); res.StatusCode != 404 {
			t.Errorf("id %s = %d, want 404", id, res.StatusCode)
		}
	}
	if res, _ := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-b/projections/%d", onB.ID), nil))); res.StatusCode != 200 {
		t.Errorf("ward B's own page = %d", res.StatusCode)
	}
}

func TestShiftListAndDownloads(t *testing.T) {
	f := newCensusFixture(t)
	// Entered out of order; the list is newest first (date, then start).
	f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.day, 3, 3, 1, 0)
	f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 0)
	f.mustProject(t, pNurseA, f.a, "2026-02-20", f.a.night, 2, 2, 2, 0)
	f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.night, 5, 5, 2, 0)
	latest := f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.day, 3, 4, 1, 0) // revision 2
	f.mustProject(t, pAdmin, f.b, "2026-03-01", f.b.day, 9, 1, 1, 0)            // another ward

	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/projections", nil)))
	want := []string{"2026-03-02 Day", "2026-03-01 Night", "2026-03-01 Day", "2026-02-20 Night"}
	if got := byTestID(t, body, "projection-link"); !slices.Equal(got, want) {
		t.Errorf("list %q, want %q", got, want)
	}
	if got := byTestID(t, body, "row-total"); !slices.Equal(got, []string{"13", "12", "8", "6"}) {
		t.Errorf("totals %q (the Day of 1 March shows revision 2's 8)", got)
	}
	if !strings.Contains(body, fmt.Sprintf(`href="/wards/w-a/projections/%d"`, latest.ID)) {
		t.Error("no link to revision 2 of 1 March Day")
	}
	if len(byTestID(t, body, "download-csv")) != 0 {
		t.Error("a charge nurse sees the download links")
	}
	// A narrower range.
	_, body = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/projections?from=2026-03-01&to=2026-03-01", nil)))
	if got := byTestID(t, body, "projection-link"); !slices.Equal(got, want[1:3]) {
		t.Errorf("1 March only: %q", got)
	}
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/projections?from=2026-03-05&to=2026-03-01", nil)))
	if res.StatusCode != 400 || len(byTestID(t, body, "range-error")) != 1 {
		t.Errorf("reversed range: %d %q", res.StatusCode, byTestID(t, body, "range-error"))
	}

	// Managers get the downloads: byte for byte the export's output.
	_, body = f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/projections?from=2026-02-20&to=2026-03-02", nil)))
	csvURL := byTestIDAttr(t, body, "download-csv")
	if csvURL != "/wards/w-a/projections.csv?from=2026-02-20&to=2026-03-02" {
		t.Fatalf("CSV link %q", csvURL)
	}
	from, to := wardload.Date{Year: 2026, Month: 2, Day: 20}, wardload.Date{Year: 2026, Month: 3, Day: 2}
	tiers, rows, err := export.Rows(context.Background(), f.st, f.wardA, from, to)
	if err != nil {
		t.Fatal(err)
	}
	var wantCSV, wantJSON bytes.Buffer
	if err := export.WriteCSV(&wantCSV, tiers, rows); err != nil {
		t.Fatal(err)
	}
	if err := export.WriteJSON(&wantJSON, f.wardA, from, to, tiers, rows); err != nil {
		t.Fatal(err)
	}
	for _, d := range []struct {
		url, ctype, name string
		want             []byte
	}{
		{csvURL, "text/csv; charset=utf-8", "wardload-w-a-2026-02-20-2026-03-02.csv", wantCSV.Bytes()},
		{byTestIDAttr(t, body, "download-json"), "application/json; charset=utf-8", "wardload-w-a-2026-02-20-2026-03-02.json", wantJSON.Bytes()},
	} {
		res, got := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", d.url, nil)))
		if res.StatusCode != 200 || res.Header.Get("Content-Type") != d.ctype {
			t.Errorf("%s: %d %q", d.url, res.StatusCode, res.Header.Get("Content-Type"))
		}
		if cd := res.Header.Get("Content-Disposition"); cd != `attachment; filename="`+d.name+`"` {
			t.Errorf("%s: Content-Disposition %q", d.url, cd)
		}
		if got != string(d.want) {
			t.Errorf("%s differs from the export:\n%s\nwant\n%s", d.url, got, d.want)
		}
		if len(rows) != 4 {
			t.Errorf("export has %d rows, want 4", len(rows))
		}
	}
	if res, _ := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/projections.csv?from=nonsense", nil))); res.StatusCode != 400 {
		t.Errorf("bad range download = %d, want 400", res.StatusCode)
	}
}

// checkExportedOnPage checks that each figure the export carries is on
// the page with the export's digits. Nurse-hours are shown to one decimal
// in an element whose value is the export's figure; the decision is an
// attribute, since the sentence beside it says it in words.
func checkExportedOnPage(tb testing.TB, what, body string, row export.Row) {
	tb.Helper()
	for id, want := range exportedOnPage(row) {
		switch id {
		case "decided-by":
			if got := testIDAttr(tb, body, "decided-text", "data-decided-by"); got != want {
				tb.Errorf("%s decided-by: page %q, export %q", what, got, want)
			}
		case "expected-nurse-hours", "band-low", "band-high":
			got := testIDAttr(tb, body, id, "value")
			v, _ := strconv.ParseFloat(want, 64)
			if text := byTestID(tb, body, id); got != want || !slices.Equal(text, []string{strconv.FormatFloat(v, 'f', 1, 64)}) {
				tb.Errorf("%s %s: page value %q shown as %q, export %q", what, id, got, text, want)
			}
		default:
			if got := byTestID(tb, body, id); !slices.Equal(got, []string{want}) {
				tb.Errorf("%s %s: page %q, export %q", what, id, got, want)
			}
		}
	}
}

// byTestIDAttr returns the href of the first element with data-testid=id.
func byTestIDAttr(tb testing.TB, page, id string) string {
	tb.Helper()
	return testIDAttr(tb, page, id, "href")
}

// testIDAttr returns the attribute attr of the first element with
// data-testid=id.
func testIDAttr(tb testing.TB, page, id, attr string) string {
	tb.Helper()
	i := strings.Index(page, `data-testid="`+id+`"`)
	if i < 0 {
		tb.Fatalf("no %s", id)
	}
	start := strings.LastIndex(page[:i], "<")
	tag := page[start : i+strings.Index(page[i:], ">")]
	j := strings.Index(tag, " "+attr+`="`)
	if j < 0 {
		tb.Fatalf("%s has no %s", id, attr)
	}
	v := tag[j+len(attr)+3:]
	return strings.ReplaceAll(v[:strings.Index(v, `"`)], "&amp;", "&")
}

// bareZero reports whether a probability text says a flat 0%: "0%" alone
// or "0.0%", not "< 0.19%" or "0.65% (0.38–1.1%)".
func bareZero(s string) bool {
	s = strings.TrimSpace(s)
	return s == "0%" || s == "0.0%" || s == "0.00%" || strings.HasPrefix(s, "0% ") || strings.HasPrefix(s, "0.0% ")
}
