package server

import (
	"context"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// relationFixture is the census fixture with ward A recording the factor
// "score" and Anscombe's (1973) set III in tier t4 (which has no other
// observations): x as the score, y as care minutes over a whole 12-hour
// Day shift, so the review's unit leaves y as it is.
func relationFixture(tb testing.TB) *censusFixture {
	tb.Helper()
	f := newCensusFixture(tb)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	if _, err := f.st.UpdateWard(ctx, f.wardA.ID, wardload.WardUpdate{FactorNames: []string{"score"}}); err != nil {
		tb.Fatal(err)
	}
	x := []float64{10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5}
	y := []float64{7.46, 6.77, 12.74, 7.11, 7.81, 8.84, 6.08, 5.39, 8.15, 6.42, 5.73}
	var obs []*wardload.Observation
	for i := range x {
		obs = append(obs, &wardload.Observation{WardID: f.wardA.ID, TierID: f.a.tiers[3].ID, ShiftID: f.a.day.ID,
			Date: wardload.Date{Year: 2026, Month: 2, Day: 10 + i}, WindowHours: 12, CareMinutes: y[i],
			Factors: map[string]float64{"score": x[i]}})
	}
	if _, err := f.st.CreateObservations(ctx, obs); err != nil {
		tb.Fatal(err)
	}
	return f
}

// The page's figures for Anscombe's set III against R 4.2.2 with
// x <- anscombe$x3; y <- anscombe$y3:
// cor(x, y) = 0.816286739489598, cor(x, y, method = "spearman") =
// 0.990909090909091, cor(x, y)^2 = 0.666324041066559,
// coef(lm(y ~ x)) = 3.00245454545454, 0.499727272727273,
// summary(lm(y ~ x))$sigma = 1.23631135139, and without the third pair
// cor(x[-3], y[-3]) = 0.999996553784828; all as the page rounds them.
func TestRelationPageAnscombeThree(t *testing.T) {
	f := relationFixture(t)
	t4 := strconv.FormatInt(f.a.tiers[3].ID, 10)
	res, body := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/relationship?factor=score&tier="+t4, nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	for id, want := range map[string]string{
		"relation-n":         "11",
		"relation-r":         "0.816",
		"relation-rho":       "0.991",
		"relation-r2":        "0.666",
		"relation-flagged":   "1",
		"relation-r-without": "1.000",
		"relation-line":      "Least-squares line: care = 3 + 0.4997 × score; residual SD 1.2 minutes.",
		"relation-tiers":     "Tier 4 · one to one only",
	} {
		if got := byTestID(t, body, id); len(got) != 1 || got[0] != want {
			t.Errorf("%s: %q, want %q", id, got, want)
		}
	}
	if got := byTestID(t, body, "relation-warnings"); len(got) != 1 || !strings.Contains(got[0], "outside the Tukey fences strongly influence") {
		t.Errorf("warnings %q: want the influence warning", got)
	}
	if got := byTestID(t, body, "relation-causation"); len(got) != 1 || !strings.Contains(got[0], "Correlation is not causation") {
		t.Errorf("causation sentence %q", got)
	}
	if n := strings.Count(body, `fill="#1f4e79" fill-opacity`); n != 10 {
		t.Errorf("%d filled points, want 10", n)
	}
	if n := strings.Count(body, `stroke="#b3261e"`); n != 1 {
		t.Errorf("%d flagged rings, want 1", n)
	}
	if len(byTestID(t, body, "relation-fit")) != 1 {
		t.Error("no fitted line")
	}
	if len(byTestID(t, body, "relation-across-tiers")) != 0 || len(byTestID(t, body, "relation-missing")) != 0 {
		t.Error("one tier, all with the factor: no pooling or missing note expected")
	}
	if len(byTestID(t, body, "caution")) != 1 {
		t.Error("no standing caution")
	}
}

// Across all tiers the census fixture's observations, which record no
// score, are counted out and the pooling is named.
func TestRelationPageAllTiers(t *testing.T) {
	f := relationFixture(t)
	_, body := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/relationship", nil)))
	if got := byTestID(t, body, "relation-n"); len(got) != 1 || got[0] != "11" {
		t.Errorf("n %q", got)
	}
	miss := byTestID(t, body, "relation-missing")
	if len(miss) != 1 || !strings.Contains(miss[0], "do not record score") {
		t.Errorf("missing note %q", miss)
	}
	if len(byTestID(t, body, "relation-across-tiers")) != 1 {
		t.Error("no note that all tiers are pooled")
	}
	_, review := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/review", nil)))
	if got := byTestIDAttr(t, review, "relation-link"); got != "/wards/w-a/relationship" {
		t.Errorf("review links to %q", got)
	}
}

func TestRelationPageBadInput(t *testing.T) {
	f := relationFixture(t)
	for _, q := range []string{"factor=weight", "tier=999999", "weeks=0", "weeks=x"} {
		res, body := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/relationship?"+q, nil)))
		if res.StatusCode == 200 || res.StatusCode >= 500 {
			t.Errorf("%s: status %d", q, res.StatusCode)
		}
		if strings.Contains(body, "relation-svg") {
			t.Errorf("%s: chart drawn", q)
		}
	}
	// Ward B records no factor: the page says so and the review has no link.
	_, body := f.do(t, f.as(t, pManagerB, httptest.NewRequest("GET", "/wards/w-b/relationship", nil)))
	if len(byTestID(t, body, "relation-none")) != 1 {
		t.Errorf("ward without factors:\n%s", body)
	}
	_, review := f.do(t, f.as(t, pManagerB, httptest.NewRequest("GET", "/wards/w-b/review", nil)))
	if len(byTestID(t, review, "relation-link")) != 0 {
		t.Error("review links to a relationship check of a ward without factors")
	}
}
