package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"net/url"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

var projectionPath = regexp.MustCompile(`^/wards/w-a/projections/([0-9]+)$`)

// censusForm is a valid census post for the Day shift of 2 March 2026.
func (f *censusFixture) censusForm(day *wardload.ShiftPattern, counts ...string) url.Values {
	v := url.Values{"date": {"2026-03-02"}, "shift": {strconv.FormatInt(day.ID, 10)}}
	for i, t := range f.a.tiers {
		v.Set("tier_"+t.Code, counts[i])
	}
	return v
}

func TestCensusFormPreselectsCurrentShift(t *testing.T) {
	f := newCensusFixture(t)
	// 09:00 in Dublin on 2 March (UTC+0 then): the Day shift is running.
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	if v, _ := attrByID(t, body, "census-date", "value"); v != "2026-03-02" {
		t.Errorf("date = %q, want 2026-03-02", v)
	}
	if v, _ := attrByID(t, body, "census-date", "min"); v != "2026-02-16" {
		t.Errorf("min date = %q, want 2026-02-16 (14 days back)", v)
	}
	if v, _ := attrByID(t, body, "census-date", "max"); v != "2026-03-04" {
		t.Errorf("max date = %q, want 2026-03-04 (2 days ahead)", v)
	}
	if got := byTestID(t, body, "census-shift"); !slices.Equal(got, []string{"Day, from 08:00, 12 hours"}) {
		t.Errorf("chosen shift %q", got)
	}
	if !strings.Contains(body, fmt.Sprintf(`<option value="%d" selected>`, f.a.day.ID)) {
		t.Error("Day is not the selected option")
	}
	for _, tier := range f.a.tiers {
		id := "tier-" + tier.Code
		if v, _ := attrByID(t, body, id, "inputmode"); v != "numeric" {
			t.Errorf("%s inputmode %q", id, v)
		}
		if v, _ := attrByID(t, body, id, "aria-describedby"); v != id+"-desc" {
			t.Errorf("%s aria-describedby %q", id, v)
		}
		// The label may go on with the "carried" mark.
		if !strings.Contains(body, `<label for="`+id+`">`+tier.Label+` `) && !strings.Contains(body, `<label for="`+id+`">`+tier.Label+`</label>`) {
			t.Errorf("no label for %s", id)
		}
		if !strings.Contains(body, tier.Description) {
			t.Errorf("description of %s missing", tier.Code)
		}
	}
	if got := byTestID(t, body, "census-next-revision"); !slices.Equal(got, []string{"revision 1"}) {
		t.Errorf("next revision %q", got)
	}
}

func TestCensusCreateAndCorrect(t *testing.T) {
	f := newCensusFixture(t)
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", f.censusForm(f.a.day, "4", "6", "3", "0"))))
	m := projectionPath.FindStringSubmatch(res.Header.Get("Location"))
	if res.StatusCode != 303 || m == nil {
		t.Fatalf("status %d Location %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
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
	var got []int
	for _, tc := range c.Counts {
		got = append(got, tc.Patients)
	}
	if !slices.Equal(got, []int{4, 6, 3, 0}) || c.Revision != 1 || c.ShiftID != f.a.day.ID || c.Date.String() != "2026-03-02" {
		t.Errorf("stored census %+v counts %v", c, got)
	}
	if c.EnteredBy != f.users[pNurseA].ID || p.CreatedBy != f.users[pNurseA].ID {
		t.Errorf("entered by %d, projected by %d, want the nurse %d", c.EnteredBy, p.CreatedBy, f.users[pNurseA].ID)
	}
	if es := f.audit(t, "census.create"); len(es) != 1 || es[0].Actor != "n.nurse" {
		t.Errorf("census.create audit %+v", es)
	}

	// The form now starts from revision 1 and offers revision 2.
	_, body = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if got := byTestID(t, body, "census-next-revision"); !slices.Equal(got, []string{"revision 2"}) {
		t.Errorf("next revision %q", got)
	}
	if v, _ := attrByID(t, body, "tier-t2", "value"); v != "6" {
		t.Errorf("tier-t2 prefilled with %q, want 6", v)
	}
	// Any member may correct it: the manager posts revision 2.
	res, _ = f.do(t, f.as(t, pManagerA, post("/wards/w-a/census", f.censusForm(f.a.day, "4", "7", "3", "0"))))
	if res.StatusCode != 303 {
		t.Fatalf("correction status %d", res.StatusCode)
	}
	if nc, np := f.counts(t); nc != 2 || np != 2 {
		t.Errorf("after correction: %d census, %d projections, want 2 and 2", nc, np)
	}
	// The first projection's page links to the newer revision.
	_, page := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", id), nil)))
	if len(byTestID(t, page, "newer-revision")) != 1 || len(byTestID(t, page, "revision-item")) != 2 {
		t.Errorf("revision 1's page: newer %q, revisions %q", byTestID(t, page, "newer-revision"), byTestID(t, page, "revision-item"))
	}
}

// TestCensusBadInput: every kind of bad input re-renders the form with
// status 400, the typed values, the error summary and aria-invalid on the
// field, and stores nothing.
func TestCensusBadInput(t *testing.T) {
	f := newCensusFixture(t)
	day := strconv.FormatInt(f.a.day.ID, 10)
	for _, tc := range []struct {
		name    string
		change  map[string]string
		inputID string // the field marked invalid
		message string // part of the message
	}{
		{"negative", map[string]string{"tier_t2": "-3"}, "tier-t2", "cannot be negative"},
		{"letters", map[string]string{"tier_t1": "four"}, "tier-t1", "whole number"},
		{"decimal", map[string]string{"tier_t3": "2.5"}, "tier-t3", "whole number"},
		{"empty", map[string]string{"tier_t1": ""}, "tier-t1", "0 if none"},
		{"implausible", map[string]string{"tier_t2": "99999"}, "tier-t2", "not plausible"},
		{"above the beds", map[string]string{"tier_t2": "31"}, "tier-t2", "30 beds"},
		{"total above the beds", map[string]string{"tier_t1": "10", "tier_t2": "12", "tier_t3": "9"}, "", "more than the ward's 30 beds"},
		{"date too far back", map[string]string{"date": "2026-02-01"}, "census-date", "too far from today"},
		{"date ahead", map[string]string{"date": "2026-03-09"}, "census-date", "too far from today"},
		{"not a date", map[string]string{"date": "2026-02-30"}, "census-date", "Enter a date"},
		{"unknown shift", map[string]string{"shift": "99999"}, "census-shift", "this ward's shifts"},
		{"ward B's shift", map[string]string{"shift": strconv.FormatInt(f.b.day.ID, 10)}, "census-shift", "this ward's shifts"},
		// Staff on duty (issue 11 "Bad input"): at most twice the 30 beds.
		{"nurses on duty negative", map[string]string{"nurses_on_duty": "-2"}, "staff-nurses", "cannot be negative"},
		{"nurses on duty not a number", map[string]string{"nurses_on_duty": "six"}, "staff-nurses", "whole number"},
		{"nurses on duty above twice the beds", map[string]string{"nurses_on_duty": "61"}, "staff-nurses", "twice the ward's 30 beds"},
		{"nurses on duty implausible", map[string]string{"nurses_on_duty": "5000"}, "staff-nurses", "not plausible"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			form := url.Values{"date": {"2026-03-02"}, "shift": {day}, "tier_t1": {"4"}, "tier_t2": {"6"}, "tier_t3": {"3"}, "tier_t4": {"0"}}
			for k, v := range tc.change {
				form.Set(k, v)
			}
			nc, np := f.counts(t)
			res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
			if res.StatusCode != 400 {
				t.Fatalf("status %d, want 400", res.StatusCode)
			}
			summary := strings.Join(byTestID(t, body, "error-link"), " | ")
			if !strings.Contains(summary, tc.message) {
				t.Errorf("error summary %q lacks %q", summary, tc.message)
			}
			if tc.inputID != "" {
				if v, _ := attrByID(t, body, tc.inputID, "aria-invalid"); v != "true" {
					t.Errorf("%s not aria-invalid", tc.inputID)
				}
				if !strings.Contains(body, `href="#`+tc.inputID+`"`) {
					t.Errorf("summary does not link to #%s", tc.inputID)
				}
			}
			// The tier fields keep what was typed (when the shift is one
			// of the ward's, the counts form is shown again).
			if !strings.HasPrefix(tc.name, "unknown") && !strings.HasPrefix(tc.name, "ward B") {
				for _, tier := range f.a.tiers {
					if v, _ := attrByID(t, body, "tier-"+tier.Code, "value"); v != form.Get("tier_"+tier.Code) {
						t.Errorf("tier-%s = %q, want the typed %q", tier.Code, v, form.Get("tier_"+tier.Code))
					}
				}
			}
			if typed, ok := tc.change["nurses_on_duty"]; ok {
				if v, _ := attrByID(t, body, "staff-nurses", "value"); v != typed {
					t.Errorf("staff-nurses = %q, want the typed %q", v, typed)
				}
			}
			if nc2, np2 := f.counts(t); nc2 != nc || np2 != np {
				t.Errorf("stored: census %d→%d, projections %d→%d", nc, nc2, np, np2)
			}
		})
	}
}

func TestCensusPageWithoutShifts(t *testing.T) {
	f := newFixture(t) // ward A has no shifts or tiers
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if res.StatusCode != 200 || len(byTestID(t, body, "census-unavailable")) != 1 {
		t.Errorf("status %d, unavailable %q", res.StatusCode, byTestID(t, body, "census-unavailable"))
	}
}

func TestCensusChooseOtherShift(t *testing.T) {
	f := newCensusFixture(t)
	path := fmt.Sprintf("/wards/w-a/census?date=2026-03-01&shift=%d", f.a.night.ID)
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", path, nil)))
	if got := byTestID(t, body, "census-shift"); !slices.Equal(got, []string{"Night, from 20:00, 12 hours"}) {
		t.Errorf("chosen %q", got)
	}
	if v, _ := attrByID(t, body, "census-date", "value"); v != "2026-03-01" {
		t.Errorf("date %q", v)
	}
	// Out of the window: explained at once, no counts form, 400.
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census?date=2025-12-01&shift="+strconv.FormatInt(f.a.day.ID, 10), nil)))
	if res.StatusCode != 400 || len(byTestID(t, body, "census-form")) != 0 || len(byTestID(t, body, "error-link")) != 1 {
		t.Errorf("out of window: %d, form %d, errors %q", res.StatusCode, len(byTestID(t, body, "census-form")), byTestID(t, body, "error-link"))
	}
}

func TestHomeLinksToCensusAndShiftList(t *testing.T) {
	f := newFixture(t)
	for _, tc := range []struct {
		p        string
		settings int
	}{{pNurseA, 0}, {pManagerA, 1}} {
		_, body := f.do(t, f.as(t, tc.p, httptest.NewRequest("GET", "/", nil)))
		if !strings.Contains(body, `href="/wards/w-a/census"`) || !strings.Contains(body, `href="/wards/w-a/projections"`) {
			t.Errorf("%s: home lacks the census or shift list link", tc.p)
		}
		if n := len(byTestID(t, body, "ward-settings")); n != tc.settings {
			t.Errorf("%s: %d settings links, want %d", tc.p, n, tc.settings)
		}
	}
}
