package server

import (
	"context"
	"net/http/httptest"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// addObservations stores care minutes for tier on ward A's Day shift, one
// 12-hour observation a day from 1 February 2026 (invented values).
func (f *censusFixture) addObservations(tb testing.TB, tier *wardload.Tier, minutes ...float64) {
	tb.Helper()
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	var obs []*wardload.Observation
	d := wardload.Date{Year: 2026, Month: 2, Day: 1}
	for _, m := range minutes {
		obs = append(obs, &wardload.Observation{WardID: f.wardA.ID, TierID: tier.ID, ShiftID: f.a.day.ID, Date: d, WindowHours: 12, CareMinutes: m})
		d = d.AddDays(1)
	}
	if _, err := f.st.CreateObservations(ctx, obs); err != nil {
		tb.Fatal(err)
	}
}

// A projector refusal about something that is not a form field (here the
// stored care minutes of tier t4, which scale past stats.MaxShiftMinutes)
// used to come back as a 400 census page with no message at all: the page
// only shows errors of date, shift, tier_<code>, patients and tier.
func TestCensusShowsRefusalOfNonFormField(t *testing.T) {
	f := newCensusFixture(t)
	f.addObservations(t, f.a.tiers[3], 5e8, 6e8) // minutes in a 12-hour window: entry errors
	form := url.Values{"date": {"2026-03-02"}, "shift": {strconv.FormatInt(f.a.day.ID, 10)},
		"tier_t1": {"4"}, "tier_t2": {"6"}, "tier_t3": {"3"}, "tier_t4": {"1"}}
	nc, np := f.counts(t)
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
	if res.StatusCode != 400 {
		t.Fatalf("status %d, want 400", res.StatusCode)
	}
	summary := strings.Join(byTestID(t, body, "error-link"), " | ")
	if !strings.Contains(summary, "5e+08 minutes in 12 hours") {
		t.Errorf("the 400 page does not say what is wrong; error summary %q", summary)
	}
	if nc2, np2 := f.counts(t); nc2 != nc || np2 != np {
		t.Errorf("stored: census %d→%d, projections %d→%d", nc, nc2, np, np2)
	}
}

// Care minutes near the float64 limit passed import (finite, ≥ 0) before
// TestImportRefusesHostileNumbers' bound, so a database may hold them. The
// review page must still answer: it ran out of memory drawing the box plot
// axis (web.NewBoxAxis). Its summary then shows non-finite statistics for
// that tier, which is left as it is (the import no longer lets such values in).
func TestReviewWithHugeCareMinutes(t *testing.T) {
	f := newCensusFixture(t)
	f.addObservations(t, f.a.tiers[3], 1.7e308, 1.6e308, 50, 60)
	res, body := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/review", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
}

// Import: hostile numbers are refused with the line and column, nothing is
// stored. Care minutes that scale past stats.MaxShiftMinutes were stored
// before (finite, ≥ 0) and broke the review page and every projection of
// their tier.
func TestImportRefusesHostileNumbers(t *testing.T) {
	f := newReviewFixture(t)
	header := "date,shift,tier,window_hours,care_minutes\n"
	good := "2026-03-01,Day,t1,12.5,55\n"
	for _, tc := range []struct{ name, row, want string }{
		{"huge minutes", "2026-03-01,Day,t1,12,1.7e308\n", `line 3, column "care_minutes": "1.7e308" is too large`},
		{"largest cell", "2026-03-01,Day,t1,12,1e15\n", `line 3, column "care_minutes": 1e+15 minutes in 12 hours is more than wardload can use`},
		{"minutes past the model", "2026-03-01,Day,t1,1,500000\n", `line 3, column "care_minutes": 500000 minutes in 1 hours`},
		{"tiny window", "2026-03-01,Day,t1,1e-300,60\n", `line 3, column "care_minutes"`},
		{"NaN", "2026-03-01,Day,t1,12,NaN\n", `line 3, column "care_minutes"`},
		{"Inf", "2026-03-01,Day,t1,12,Inf\n", `line 3, column "care_minutes"`},
		{"1e309", "2026-03-01,Day,t1,12,1e309\n", `line 3, column "care_minutes"`},
		{"hex float", "2026-03-01,Day,t1,0x1p3,60\n", `line 3, column "window_hours"`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := wardObservations(t, f.st, f.ward.ID)
			res, body := f.do(t, f.as(t, pAdmin, upload(t, "/wards/"+demo.WardCode+"/observations/import", header+good+tc.row)))
			if res.StatusCode != 400 {
				t.Fatalf("status %d, want 400", res.StatusCode)
			}
			if msg := byTestID(t, body, "import-error-message"); len(msg) != 1 || !strings.Contains(msg[0], tc.want) {
				t.Errorf("message %q, want it to contain %q", msg, tc.want)
			}
			if after := wardObservations(t, f.st, f.ward.ID); after != before {
				t.Errorf("observations %d → %d after a refused file", before, after)
			}
		})
	}
	// The bound leaves real values alone: 12 hours of one-to-one care with
	// two nurses is 1440 minutes in a 12-hour window.
	res, body := f.do(t, f.as(t, pAdmin, upload(t, "/wards/"+demo.WardCode+"/observations/import", header+"2026-03-01,Day,t1,12,1440\n")))
	if res.StatusCode != 303 {
		t.Errorf("1440 minutes in 12 hours: status %d %q", res.StatusCode, byTestID(t, body, "import-error-message"))
	}
}
