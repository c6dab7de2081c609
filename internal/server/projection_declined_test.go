package server

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"net/http/httptest"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/getkin/kin-openapi/openapi3"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// probabilityText matches a chance as the page and export word one: "8.4%
// (7.2–9.8%)", "< 0.19%", "> 99.8%".
var probabilityText = regexp.MustCompile(`\d%\s*\(|[<>]\s*\d+(\.\d+)?%`)

// noCareTimeFigures fails if the page shows any figure of the care-time
// part: a declined projection has no band, chart, headcount at cover,
// shortfall table or probability.
func noCareTimeFigures(tb testing.TB, body string) {
	tb.Helper()
	for _, id := range []string{"nurses-cover", "care-giving", "expected-nurse-hours", "band-name", "band-low", "band-high",
		"cover-nurse-hours", "chart", "shortfall", "shortfall-row", "shortfall-chance", "calibration", "calibration-warning"} {
		if got := byTestID(tb, body, id); len(got) != 0 {
			tb.Errorf("declined projection shows %s: %q", id, got)
		}
	}
	if m := probabilityText.FindString(body); m != "" {
		tb.Errorf("declined projection shows a probability (%q)", m)
	}
}

// Tier t4 has patients and no observations at all: the census is stored
// with a declined projection. On Day (ratio floor 5 per nurse, nurse in
// charge extra) the recommendation is the floor alone; on Night (no floor)
// there is none. Page, shift list, export and API all say so, and none of
// them shows a probability.
func TestDeclinedProjection(t *testing.T) {
	f := newCensusFixture(t)
	day := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 1)
	night := f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.night, 4, 6, 3, 1)
	for _, p := range []*wardload.Projection{day, night} {
		if p.DecidedBy != stats.DecidedByInsufficient {
			t.Fatalf("%s: decided by %q, want %q", p.ShiftName, p.DecidedBy, stats.DecidedByInsufficient)
		}
	}
	from, to := wardload.Date{Year: 2026, Month: 3, Day: 1}, wardload.Date{Year: 2026, Month: 3, Day: 2}
	_, rows, err := export.Rows(context.Background(), f.st, f.wardA, from, to)
	if err != nil || len(rows) != 2 {
		t.Fatalf("export rows %d, %v", len(rows), err)
	}
	for _, tc := range []struct {
		p           *wardload.Projection
		row         export.Row
		recommended string
		decided     string
	}{
		// 14 patients at 5 per nurse, plus the nurse in charge: 3 + 1.
		{day, rows[1], "4", "The ratio floor of 4 nurses alone"},
		{night, rows[0], "none", "There is no recommendation"},
	} {
		t.Run(tc.p.ShiftName, func(t *testing.T) {
			for _, who := range []string{pNurseA, pManagerA} {
				_, body := f.do(t, f.as(t, who, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", tc.p.ID), nil)))
				if got := byTestID(t, body, "recommended"); !slices.Equal(got, []string{tc.recommended}) {
					t.Errorf("recommended %q, want %q", got, tc.recommended)
				}
				if got := byTestID(t, body, "decided-text"); len(got) != 1 || !strings.HasPrefix(got[0], tc.decided) {
					t.Errorf("decided text %q, want it to start %q", got, tc.decided)
				}
				want := "Insufficient observations — need about 8 more in tier t4 (Tier 4 · one to one)."
				if got := byTestID(t, body, "need-more"); !slices.Equal(got, []string{want}) {
					t.Errorf("need-more %q, want %q", got, want)
				}
				if got := byTestID(t, body, "tier-need-more"); !slices.Equal(got, []string{"yes", "yes", "yes", "need about 8 more"}) {
					t.Errorf("tier data %q", got)
				}
				noCareTimeFigures(t, body)
				if strings.Contains(body, "rests on care time alone") {
					t.Error("a declined page says its recommendation rests on care time")
				}
				// Always: the floor used and the caution, once.
				if got := byTestID(t, body, "floor-rule"); !slices.Equal(got, []string{tc.row.FloorRule}) {
					t.Errorf("floor rule %q, export %q", got, tc.row.FloorRule)
				}
				if got := byTestID(t, body, "projection-caution"); !slices.Equal(got, []string{stats.Caution}) {
					t.Errorf("caution %q", got)
				}
				// The page and the export agree.
				checkExportedOnPage(t, "declined", body, tc.row)
			}
			r := tc.row
			if r.DataSufficient || r.DecidedBy != stats.DecidedByInsufficient || r.Shortfall != nil || r.BandLowNurseHours != nil ||
				r.ExpectedNurseHours != nil || r.NursesCover != nil || !strings.Contains(strings.Join(r.Insufficient, " "), "tier t4") {
				t.Errorf("export row %+v", r)
			}
			if (r.Recommended == nil) != (tc.recommended == "none") || (r.Recommended != nil && strconv.Itoa(*r.Recommended) != tc.recommended) {
				t.Errorf("export recommended %v, want %s", r.Recommended, tc.recommended)
			}
		})
	}

	// The shift list marks both and shows no care-time figure.
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/projections?from=2026-03-01&to=2026-03-02", nil)))
	if got := byTestID(t, body, "row-recommended"); !slices.Equal(got, []string{"4 insufficient data", "none insufficient data"}) {
		t.Errorf("list recommended %q", got)
	}
	if got := byTestID(t, body, "row-cover"); !slices.Equal(got, []string{"–", "–"}) {
		t.Errorf("list at cover %q", got)
	}

	// The download: CSV with empty cells, JSON with nulls that conform
	// to the API's document.
	_, csvBody := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/projections.csv?from=2026-03-01&to=2026-03-02", nil)))
	recs, err := csv.NewReader(strings.NewReader(csvBody)).ReadAll()
	if err != nil || len(recs) != 3 {
		t.Fatalf("CSV %d records, %v", len(recs), err)
	}
	col := map[string]int{}
	for i, c := range recs[0] {
		col[c] = i
	}
	for i, want := range []string{"", "4"} { // Night of the 1st, Day of the 2nd
		rec := recs[i+1]
		if rec[col["recommended_nurses"]] != want || rec[col["data_sufficient"]] != "false" || rec[col["decided_by"]] != "insufficient_data" {
			t.Errorf("CSV row %d: recommended %q sufficient %q decided %q", i+1, rec[col["recommended_nurses"]], rec[col["data_sufficient"]], rec[col["decided_by"]])
		}
		for _, c := range []string{"shortfall_simulated_share", "shortfall_text", "band_low_nurse_hours", "nurses_at_cover"} {
			if rec[col[c]] != "" {
				t.Errorf("CSV row %d: %s = %q", i+1, c, rec[col[c]])
			}
		}
		if probabilityText.MatchString(strings.Join(rec, ",")) {
			t.Errorf("CSV row %d shows a probability: %q", i+1, rec)
		}
	}
	_, jsonBody := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/projections.json?from=2026-03-01&to=2026-03-02", nil)))
	doc := loadOpenAPI(t)
	schema := doc.Paths.Value("/api/v1/projections").Get.Responses.Status(200).Value.Content.Get("application/json").Schema
	if err := schema.Value.VisitJSON(decodeJSON(t, []byte(jsonBody)), openapi3.MultiErrors()); err != nil {
		t.Errorf("declined rows do not conform to openapi.json:\n%v", err)
	}
	var got struct{ Rows []map[string]json.RawMessage }
	if err := json.Unmarshal([]byte(jsonBody), &got); err != nil {
		t.Fatal(err)
	}
	if string(got.Rows[0]["recommended_nurses"]) != "null" || string(got.Rows[1]["recommended_nurses"]) != "4" || string(got.Rows[0]["shortfall_text"]) != "null" {
		t.Errorf("JSON recommended %s / %s, shortfall %s", got.Rows[0]["recommended_nurses"], got.Rows[1]["recommended_nurses"], got.Rows[0]["shortfall_text"])
	}

	// A correction with an observed tier 4 count of 0 projects normally;
	// its page lists the declined revision as having no recommendation.
	fixed := f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.night, 4, 6, 3, 0)
	_, body = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", fixed.ID), nil)))
	items := byTestID(t, body, "revision-item")
	if len(items) != 2 || !strings.Contains(items[1], "no recommendation (too few observations and no ratio floor)") || strings.Contains(items[1], "0 nurses") {
		t.Errorf("revisions %q", items)
	}
}

// A projection stored by method 1, as older databases hold them, still
// renders: said to be method 1, its normal band named as such, shortfall
// chances with a Wilson interval rather than "± 0", and the export's
// figures to the digit.
func TestMethod1ProjectionRenders(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	date := wardload.Date{Year: 2026, Month: 3, Day: 2}
	counts := []wardload.TierCount{{TierID: f.a.tiers[0].ID, Patients: 4}, {TierID: f.a.tiers[1].ID, Patients: 6}, {TierID: f.a.tiers[2].ID, Patients: 3}}
	c, p, err := f.s.projector.Prepare(ctx, f.wardA.ID, date, f.a.day.ID, counts)
	if err != nil {
		t.Fatal(err)
	}
	v1 := mustMethod1(t, p)
	if err := f.st.CreateCensusProjection(ctx, c, p); err != nil {
		t.Fatal(err)
	}
	_, rows, err := export.Rows(ctx, f.st, f.wardA, date, date)
	if err != nil || len(rows) != 1 {
		t.Fatalf("export %d rows, %v", len(rows), err)
	}
	for _, who := range []string{pNurseA, pManagerA} {
		res, body := f.do(t, f.as(t, who, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
		if res.StatusCode != 200 {
			t.Fatalf("status %d\n%s", res.StatusCode, body)
		}
		if got := byTestID(t, body, "method-1"); len(got) != 1 || !strings.Contains(got[0], "Made with method 1") {
			t.Errorf("method 1 notice %q", got)
		}
		checkExportedOnPage(t, "method 1", body, rows[0])
		if got := byTestID(t, body, "band-name"); !slices.Equal(got, []string{"90% normal band"}) {
			t.Errorf("band name %q", got)
		}
		chances := byTestID(t, body, "shortfall-chance")
		if len(chances) != len(v1.Shortfall) {
			t.Errorf("%d shortfall rows, result has %d", len(chances), len(v1.Shortfall))
		}
		for _, ch := range chances {
			if bareZero(ch) || strings.Contains(ch, "±") {
				t.Errorf("shortfall chance %q", ch)
			}
		}
		if rec := recommendedRow(t, body); rec["shortfall-chance"] != rows[0].Shortfall.Text {
			t.Errorf("recommended row %v, export %q", rec, rows[0].Shortfall.Text)
		}
	}
}

// mustMethod1 turns a prepared projection into the one method 1 would
// have stored: its result is stats.ProjectV1 of the same model input, and
// the columns are read from that result as the method 1 projector did.
func mustMethod1(tb testing.TB, p *wardload.Projection) *stats.ProjectionV1 {
	tb.Helper()
	var in projector.Input
	if err := json.Unmarshal([]byte(p.Input), &in); err != nil {
		tb.Fatal(err)
	}
	in.Model.Calibration = nil
	v1, err := stats.ProjectV1(in.Model)
	if err != nil {
		tb.Fatal(err)
	}
	b, err := json.Marshal(v1)
	if err != nil {
		tb.Fatal(err)
	}
	p.Result, p.MethodVersion = string(b), stats.MethodVersionV1
	nh := func(m float64) float64 { return m / 60 / v1.DirectCareFraction }
	p.ExpectedNurseHours, p.CoverNurseHours = v1.NurseHours.Expected, v1.NurseHours.CoverSimulated
	p.BandLowNurseHours, p.BandHighNurseHours = nh(v1.Bands[0].Low), nh(v1.Bands[0].High)
	p.NursesCover, p.Floor, p.Recommended, p.DecidedBy = v1.Nurses.CoverSimulated, v1.Nurses.Floor, v1.Nurses.Recommended, v1.Nurses.DecidedBy
	return v1
}

// The ward's backtest shows under the headcount: as a sentence when the
// past projections kept their cover level, and in a warning box when they
// fell more than 5 points short.
func TestProjectionPageShowsCalibration(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	for i, tc := range []struct {
		inside int
		warn   bool
	}{{37, false}, {30, true}} {
		date := wardload.Date{Year: 2026, Month: 3, Day: 1 + i}
		c, p, err := f.s.projector.Prepare(ctx, f.wardA.ID, date, f.a.day.ID, []wardload.TierCount{{TierID: f.a.tiers[0].ID, Patients: 5}})
		if err != nil {
			t.Fatal(err)
		}
		var res stats.Projection
		if err := json.Unmarshal([]byte(p.Result), &res); err != nil {
			t.Fatal(err)
		}
		// An invented backtest: 40 shifts checked at the 90% level.
		cal := &stats.Calibration{Weeks: 12, Shifts: 40, Inside: tc.inside, Level: 0.9, Basis: "shift totals"}
		res.Calibration = cal
		b, err := json.Marshal(&res)
		if err != nil {
			t.Fatal(err)
		}
		p.Result = string(b)
		if err := f.st.CreateCensusProjection(ctx, c, p); err != nil {
			t.Fatal(err)
		}
		_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
		if got := byTestID(t, body, "calibration"); !slices.Equal(got, []string{cal.Sentence(0.9)}) {
			t.Errorf("inside %d: calibration %q, want %q", tc.inside, got, cal.Sentence(0.9))
		}
		if got := byTestID(t, body, "calibration-warning"); (len(got) == 1) != tc.warn {
			t.Errorf("inside %d of 40: warning box %q, want shown = %v", tc.inside, got, tc.warn)
		}
		if strings.Count(body, "In the last 12 weeks") != 1 {
			t.Errorf("inside %d: the calibration sentence shows %d times", tc.inside, strings.Count(body, "In the last 12 weeks"))
		}
	}
}

// An observation far beyond the tier's others is set aside by the model;
// the page names it, and a manager gets the link to the review where it
// can be excluded (a charge nurse, who may not use the review, is told
// who can).
func TestProjectionPageListsHeldOut(t *testing.T) {
	f := newCensusFixture(t)
	f.addObservations(t, f.a.tiers[0], 6000) // tier 1's care is about 60 minutes a shift
	p := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 0)
	var res stats.Projection
	if err := json.Unmarshal([]byte(p.Result), &res); err != nil {
		t.Fatal(err)
	}
	if len(res.HeldOut) != 1 || res.HeldOut[0].CareMinutes != 6000 {
		t.Fatalf("held out %+v, want the 6000-minute observation", res.HeldOut)
	}
	want := "6000 care minutes in tier t1 on 2026-02-01, far above the tier's other values: set aside as a likely entry error."
	for _, tc := range []struct {
		who    string
		review string
	}{{pNurseA, ""}, {pManagerA, fmt.Sprintf("/wards/w-a/review?shift=%d&weeks=8", f.a.day.ID)}} {
		_, body := f.do(t, f.as(t, tc.who, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
		if got := byTestID(t, body, "held-out-item"); !slices.Equal(got, []string{want}) {
			t.Errorf("%s: held out %q, want %q", tc.who, got, want)
		}
		if n := len(byTestID(t, body, "review-link")); (n == 1) != (tc.review != "") {
			t.Errorf("%s: %d review links", tc.who, n)
		} else if tc.review != "" {
			if got := byTestIDAttr(t, body, "review-link"); got != tc.review {
				t.Errorf("review link %q, want %q", got, tc.review)
			}
		}
		if strings.Count(body, "set aside as a likely entry error") != 1 {
			t.Errorf("%s: the held-out observation is named %d times", tc.who, strings.Count(body, "set aside as a likely entry error"))
		}
	}
}
