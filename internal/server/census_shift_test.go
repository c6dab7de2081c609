package server

import (
	"context"
	"net/http/httptest"
	"net/url"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"golang.org/x/net/html"

	"wardload/internal/wardload"
)

// changeoverFixture is the census fixture with ward A's shifts moved to
// Day 07:30 and Night 19:30 (12.5 hours each) and the clock at 07:10 on
// 2 March 2026 in Dublin (UTC+0 then): the Day shift starts in 20 minutes
// and the Night of 1 March ends in 50.
func changeoverFixture(t *testing.T) *censusFixture {
	t.Helper()
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	hours := 12.5
	for _, p := range []struct {
		sh    **wardload.ShiftPattern
		start int
	}{{&f.a.day, 450}, {&f.a.night, 1170}} {
		start := p.start
		up, err := f.st.UpdateShiftPattern(ctx, (*p.sh).ID, wardload.ShiftPatternUpdate{StartMinute: &start, NominalHours: &hours})
		if err != nil {
			t.Fatal(err)
		}
		*p.sh = up
	}
	f.clock.mu.Lock()
	f.clock.t = time.Date(2026, 3, 2, 7, 10, 0, 0, time.UTC)
	f.clock.mu.Unlock()
	return f
}

func TestCensusChangeoverOffersStartingShiftFirst(t *testing.T) {
	f := changeoverFixture(t)
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	want := []string{
		"Day shift, Mon 2 Mar 07:30–20:00 (starts in 20 min)",
		"Night shift, Sun 1 Mar 19:30–08:00 (ends in 50 min)",
	}
	if got := byTestID(t, body, "shift-choice"); !slices.Equal(got, want) {
		t.Errorf("choices %q, want %q", got, want)
	}
	// The first choice is the one selected and the one the form posts.
	if !strings.Contains(body, `aria-current="true"`) || strings.Count(body, `aria-current="true"`) != 1 {
		t.Error("not exactly one choice is marked current")
	}
	dayURL := "/wards/w-a/census?" + url.Values{"date": {"2026-03-02"}, "shift": {strconv.FormatInt(f.a.day.ID, 10)}}.Encode()
	i := strings.Index(body, `aria-current="true"`)
	if j := strings.LastIndex(body[:i], "href="); j < 0 || !strings.Contains(body[j:i], strings.ReplaceAll(dayURL, "&", "&amp;")) {
		t.Errorf("the current choice is not the Day shift of 2 March (%s)", dayURL)
	}
	if v, _ := attrByID(t, body, "census-date", "value"); v != "2026-03-02" {
		t.Errorf("date = %q, want 2026-03-02", v)
	}
	if got := byTestID(t, body, "census-shift"); !slices.Equal(got, []string{"Day, from 07:30, 12.5 hours"}) {
		t.Errorf("chosen shift %q", got)
	}
	if got := byTestID(t, body, "census-save-target"); len(got) != 1 || !strings.Contains(got[0], "Saving stores the census for Day shift on Mon 2 Mar 2026 (07:30–20:00).") {
		t.Errorf("save target %q", got)
	}

	// Choosing the running night keeps both choices, now marking the night.
	nightURL := "/wards/w-a/census?" + url.Values{"date": {"2026-03-01"}, "shift": {strconv.FormatInt(f.a.night.ID, 10)}}.Encode()
	_, body = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", nightURL, nil)))
	if got := byTestID(t, body, "shift-choice"); !slices.Equal(got, want) {
		t.Errorf("choices for the night %q", got)
	}
	i = strings.Index(body, `aria-current="true"`)
	if j := strings.LastIndex(body[:max(i, 0)], "href="); i < 0 || !strings.Contains(body[j:i], strings.ReplaceAll(nightURL, "&", "&amp;")) {
		t.Error("the night is not the current choice")
	}
	if got := byTestID(t, body, "census-save-target"); len(got) != 1 || !strings.Contains(got[0], "Night shift on Sun 1 Mar 2026 (19:30–08:00)") || strings.Contains(got[0], "ended") {
		t.Errorf("save target %q", got)
	}

	// At midday only the running Day shift is likely: no choices shown.
	f.clock.Add(5 * time.Hour)
	_, body = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if got := byTestID(t, body, "shift-choice"); len(got) != 0 {
		t.Errorf("at 12:10 choices %q, want none", got)
	}
	if got := byTestID(t, body, "census-save-target"); len(got) != 1 || !strings.Contains(got[0], "Day shift on Mon 2 Mar 2026") {
		t.Errorf("at 12:10 save target %q", got)
	}
}

// TestCensusEndedShiftAsksFirst: a census for the night of 28 February
// (ended 08:00 on 1 March) posted at 07:10 on 2 March is not stored until
// confirmed; the question re-posts the same values with confirm_ended=1.
func TestCensusEndedShiftAsksFirst(t *testing.T) {
	f := changeoverFixture(t)
	form := url.Values{"date": {"2026-02-28"}, "shift": {strconv.FormatInt(f.a.night.ID, 10)},
		"tier_t1": {"4"}, "tier_t2": {"6"}, "tier_t3": {"3"}, "tier_t4": {"0"}}
	nc, np := f.counts(t)
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
	if res.StatusCode != 409 {
		t.Fatalf("status %d, want 409\n%s", res.StatusCode, body)
	}
	if nc2, np2 := f.counts(t); nc2 != nc || np2 != np {
		t.Fatalf("stored before confirmation: census %d→%d, projections %d→%d", nc, nc2, np, np2)
	}
	q := byTestID(t, body, "confirm-ended")
	if len(q) != 1 || !strings.Contains(q[0], "Night shift of Sat 28 Feb 2026 ended Sun 1 Mar 08:00") || !strings.Contains(q[0], "Nothing has been saved yet") {
		t.Errorf("question %q", q)
	}
	if got := byTestID(t, body, "census-save-target"); len(got) != 1 || !strings.Contains(got[0], "Night shift on Sat 28 Feb 2026 (19:30–08:00). This shift ended Sun 1 Mar 08:00.") {
		t.Errorf("save target %q", got)
	}
	if len(byTestID(t, body, "census-save")) != 0 || len(byTestID(t, body, "confirm-ended-save")) != 1 {
		t.Error("the form should offer only the confirming button")
	}
	// The question's form carries the typed values and the confirmation.
	posted := url.Values{}
	for _, name := range []string{"date", "shift", "tier_t1", "tier_t2", "tier_t3", "tier_t4", "confirm_ended"} {
		v, ok := namedInputValue(t, body, name)
		if !ok {
			t.Fatalf("the question's form lacks %s", name)
		}
		posted.Set(name, v)
	}
	for k := range form {
		if posted.Get(k) != form.Get(k) {
			t.Errorf("%s re-posted as %q, want %q", k, posted.Get(k), form.Get(k))
		}
	}
	if posted.Get("confirm_ended") != "1" {
		t.Errorf("confirm_ended = %q", posted.Get("confirm_ended"))
	}

	res, body = f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", posted)))
	m := projectionPath.FindStringSubmatch(res.Header.Get("Location"))
	if res.StatusCode != 303 || m == nil {
		t.Fatalf("confirmed: status %d Location %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}
	id, _ := strconv.ParseInt(m[1], 10, 64)
	p, err := f.st.FindProjectionByID(context.Background(), id)
	if err != nil {
		t.Fatal(err)
	}
	c, err := f.st.FindCensusByID(context.Background(), p.CensusID)
	if err != nil {
		t.Fatal(err)
	}
	if c.Date.String() != "2026-02-28" || c.ShiftID != f.a.night.ID || c.Total() != 13 {
		t.Errorf("stored census %s shift %d total %d", c.Date, c.ShiftID, c.Total())
	}
	if nc2, np2 := f.counts(t); nc2 != nc+1 || np2 != np+1 {
		t.Errorf("after confirmation: census %d→%d, projections %d→%d", nc, nc2, np, np2)
	}

	// The running night of 1 March has not ended: saved without a question.
	form.Set("date", "2026-03-01")
	if res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form))); res.StatusCode != 303 {
		t.Errorf("running night: status %d\n%s", res.StatusCode, body)
	}
}

// namedInputValue returns the value of the first input named name inside
// the census form (data-testid="census-form") of page, and whether there
// is one.
func namedInputValue(tb testing.TB, page, name string) (string, bool) {
	tb.Helper()
	doc, err := html.Parse(strings.NewReader(page))
	if err != nil {
		tb.Fatal(err)
	}
	var val string
	var found bool
	var walk func(n *html.Node, inForm bool)
	walk = func(n *html.Node, inForm bool) {
		if found {
			return
		}
		if n.Type == html.ElementNode && n.Data == "form" {
			for _, a := range n.Attr {
				inForm = inForm || (a.Key == "data-testid" && a.Val == "census-form")
			}
		}
		if inForm && n.Type == html.ElementNode && n.Data == "input" {
			attrs := map[string]string{}
			for _, a := range n.Attr {
				attrs[a.Key] = a.Val
			}
			if attrs["name"] == name {
				val, found = attrs["value"], true
				return
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c, inForm)
		}
	}
	walk(doc, false)
	return val, found
}
