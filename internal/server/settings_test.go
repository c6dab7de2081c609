package server

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"reflect"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"wardload/internal/wardload"
)

// settingsFixture is the access fixture with a shift pattern and two tiers
// on ward A, and a tier on ward B.
type settingsFixture struct {
	*fixture
	night  *wardload.ShiftPattern
	t1, t2 *wardload.Tier
	tierB  *wardload.Tier
}

func newSettingsFixture(t *testing.T) *settingsFixture {
	t.Helper()
	f := &settingsFixture{fixture: newFixture(t)}
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	f.night = &wardload.ShiftPattern{WardID: f.wardA.ID, Name: "Night", StartMinute: 19*60 + 30, NominalHours: 12}
	if err := f.st.CreateShiftPattern(ctx, f.night); err != nil {
		t.Fatal(err)
	}
	f.t1 = &wardload.Tier{WardID: f.wardA.ID, Code: "t1", Label: "Low", DisplayOrder: 1}
	f.t2 = &wardload.Tier{WardID: f.wardA.ID, Code: "t2", Label: "High", DisplayOrder: 2}
	f.tierB = &wardload.Tier{WardID: f.wardB.ID, Code: "b1", Label: "Other ward", DisplayOrder: 1}
	for _, tr := range []*wardload.Tier{f.t1, f.t2, f.tierB} {
		if err := f.st.CreateTier(ctx, tr); err != nil {
			t.Fatal(err)
		}
	}
	return f
}

// snapshot is everything the settings forms can change on ward A, and the
// number of audit entries, to show that a refused post changed nothing.
type snapshot struct {
	settings *wardload.Settings
	shifts   []wardload.ShiftPattern
	tiers    []wardload.Tier
	audit    int
}

func (f *settingsFixture) snapshot(t *testing.T) snapshot {
	t.Helper()
	ctx := context.Background()
	var s snapshot
	var err error
	if s.settings, err = f.st.FindSettings(ctx, f.wardA.ID); err != nil {
		t.Fatal(err)
	}
	ps, err := f.st.FindShiftPatterns(ctx, f.wardA.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range ps {
		s.shifts = append(s.shifts, *p)
	}
	ts, err := f.st.FindTiers(ctx, f.wardA.ID)
	if err != nil {
		t.Fatal(err)
	}
	for _, tr := range ts {
		s.tiers = append(s.tiers, *tr)
	}
	if _, s.audit, err = f.st.FindAudit(ctx, wardload.AuditFilter{}); err != nil {
		t.Fatal(err)
	}
	return s
}

// inputValue returns the value attribute of the element with id (the
// textarea's text), and whether it exists.
func inputValue(t *testing.T, page, id string) (string, bool) {
	t.Helper()
	doc, err := html.Parse(strings.NewReader(page))
	if err != nil {
		t.Fatal(err)
	}
	var val string
	var found bool
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			attrs := map[string]string{}
			for _, a := range n.Attr {
				attrs[a.Key] = a.Val
			}
			if attrs["id"] == id {
				found = true
				val = attrs["value"]
				if n.Data == "textarea" {
					val = text(n)
				}
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	return val, found
}

// postSettings posts form as the manager of ward A and, for a 303, follows
// it with the same session to read the flash.
func (f *settingsFixture) postSettings(t *testing.T, path string, form url.Values) (*http.Response, string, string) {
	t.Helper()
	res, body := f.do(t, f.as(t, pManagerA, post(path, form)))
	if res.StatusCode != http.StatusSeeOther {
		return res, body, ""
	}
	// Browsers keep the fragment to themselves.
	loc, _, _ := strings.Cut(res.Header.Get("Location"), "#")
	next := httptest.NewRequest("GET", loc, nil)
	for _, c := range res.Cookies() {
		next.AddCookie(c)
	}
	if f.sessionCookie(res) == nil {
		t.Fatal("a successful post set no session cookie for its flash")
	}
	_, page := f.do(t, next)
	return res, body, page
}

func TestSettingsPageShowsStoredValues(t *testing.T) {
	f := newSettingsFixture(t)
	res, page := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/settings", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d", res.StatusCode)
	}
	def := wardload.DefaultSettings(f.wardA.ID)
	for id, want := range map[string]string{
		"s-dcf":                                "0.75",
		"s-cover":                              "0.9",
		"s-lookback":                           fmt.Sprint(def.LookbackWeeks),
		"s-beds":                               "0",
		fmt.Sprintf("sh-%d-name", f.night.ID):  "Night",
		fmt.Sprintf("sh-%d-start", f.night.ID): "19:30",
		fmt.Sprintf("sh-%d-hours", f.night.ID): "12",
		fmt.Sprintf("t-%d-label", f.t2.ID):     "High",
		fmt.Sprintf("t-%d-order", f.t2.ID):     "2",
		fmt.Sprintf("f-floor_%d", f.night.ID):  "",
	} {
		if got, ok := inputValue(t, page, id); !ok || got != want {
			t.Errorf("input %s = %q (found %v), want %q", id, got, ok, want)
		}
	}
	if got := byTestID(t, page, "floors-note"); len(got) != 1 || !strings.Contains(got[0], "does not know the law") ||
		!strings.Contains(got[0], "local staffing law and agreements") {
		t.Errorf("floors note = %q", got)
	}
	if got := byTestID(t, page, "tier-code"); !reflect.DeepEqual(got, []string{"t1", "t2"}) {
		t.Errorf("tier codes = %q (ward B's tier must not show)", got)
	}
	// The default convention is marked and checked; each has its line.
	if !strings.Contains(page, `value="hinges" checked`) || strings.Count(page, `name="quartiles"`) != 4 {
		t.Error("quartile radios: want 4 with hinges checked")
	}
	if !strings.Contains(page, "(default)") {
		t.Error("default quartile convention not marked")
	}
}

func TestSettingsSaveHappyPaths(t *testing.T) {
	ctx := context.Background()
	t.Run("staffing", func(t *testing.T) {
		f := newSettingsFixture(t)
		res, _, page := f.postSettings(t, "/wards/w-a/settings", url.Values{"direct_care_fraction": {"0.8"},
			"cover_level": {"0.95"}, "lookback_weeks": {"6"}, "quartiles": {"hf7"}, "beds": {"30"},
			"changeover_minutes": {"45"}, "support_staff": {"1"}, "escalation": {"Bleep the site manager (4410).\r\nThen tell the ward manager."}})
		if res.StatusCode != 303 || res.Header.Get("Location") != "/wards/w-a/settings#staffing" {
			t.Fatalf("status %d Location %q", res.StatusCode, res.Header.Get("Location"))
		}
		if n := byTestID(t, page, "notice"); len(n) != 1 || !strings.HasPrefix(n[0], "Saved") {
			t.Errorf("notice = %q", n)
		}
		st, err := f.st.FindSettings(ctx, f.wardA.ID)
		if err != nil {
			t.Fatal(err)
		}
		if st.DirectCareFraction != 0.8 || st.CoverLevel != 0.95 || st.LookbackWeeks != 6 || st.Quartiles != "hf7" || st.Beds != 30 {
			t.Errorf("saved %+v", st)
		}
		if st.ChangeoverMinutes != 45 || !st.SupportStaff || st.Escalation != "Bleep the site manager (4410).\nThen tell the ward manager." {
			t.Errorf("saved change-over %d, support staff %v, escalation %q", st.ChangeoverMinutes, st.SupportStaff, st.Escalation)
		}
		if st.UpdatedBy != f.users[pManagerA].ID {
			t.Errorf("UpdatedBy %d", st.UpdatedBy)
		}
		if es := f.audit(t, "settings.save"); len(es) != 1 || es[0].Actor != "m.manager" {
			t.Errorf("audit %+v, want one settings.save by m.manager", es)
		}
	})
	t.Run("floors", func(t *testing.T) {
		f := newSettingsFixture(t)
		form := url.Values{
			fmt.Sprintf("floor_%d", f.night.ID):             {"8"},
			fmt.Sprintf("floor_%d_%d", f.night.ID, f.t2.ID): {"2.5"},
			fmt.Sprintf("floor_%d_%d", f.night.ID, f.t1.ID): {""},
			fmt.Sprintf("charge_%d", f.night.ID):            {"1"},
		}
		res, _, page := f.postSettings(t, "/wards/w-a/settings/floors", form)
		if res.StatusCode != 303 || !strings.HasSuffix(res.Header.Get("Location"), "#floors") {
			t.Fatalf("status %d Location %q", res.StatusCode, res.Header.Get("Location"))
		}
		st, err := f.st.FindSettings(ctx, f.wardA.ID)
		if err != nil {
			t.Fatal(err)
		}
		want := []wardload.RatioFloor{
			{ShiftID: f.night.ID, PatientsPerNurse: 8, ChargeNurseCounts: true},
			{ShiftID: f.night.ID, TierID: f.t2.ID, PatientsPerNurse: 2.5, ChargeNurseCounts: true},
		}
		if !reflect.DeepEqual(st.Floors, want) {
			t.Errorf("floors %+v, want %+v", st.Floors, want)
		}
		if st.CoverLevel != 0.9 {
			t.Errorf("floors form changed the cover level: %v", st.CoverLevel)
		}
		if v, _ := inputValue(t, page, fmt.Sprintf("f-floor_%d_%d", f.night.ID, f.t2.ID)); v != "2.5" {
			t.Errorf("page shows tier floor %q", v)
		}
		// Emptying every field removes the floors.
		res, _, _ = f.postSettings(t, "/wards/w-a/settings/floors", url.Values{})
		if st, _ := f.st.FindSettings(ctx, f.wardA.ID); res.StatusCode != 303 || len(st.Floors) != 0 {
			t.Errorf("status %d floors %+v after clearing", res.StatusCode, st.Floors)
		}
	})
	t.Run("shift create and update", func(t *testing.T) {
		f := newSettingsFixture(t)
		res, _, _ := f.postSettings(t, "/wards/w-a/settings/shifts", url.Values{"name": {"Day"}, "start": {"07:30"}, "hours": {"12"}})
		if res.StatusCode != 303 {
			t.Fatalf("create: status %d", res.StatusCode)
		}
		ps, _ := f.st.FindShiftPatterns(ctx, f.wardA.ID)
		if len(ps) != 2 || ps[0].Name != "Day" || ps[0].StartMinute != 450 || ps[0].NominalHours != 12 {
			t.Fatalf("patterns %+v", ps)
		}
		res, _, page := f.postSettings(t, fmt.Sprintf("/wards/w-a/settings/shifts/%d", f.night.ID),
			url.Values{"name": {"Late"}, "start": {"13:15"}, "hours": {"7.5"}})
		if res.StatusCode != 303 {
			t.Fatalf("update: status %d", res.StatusCode)
		}
		p, _ := f.st.FindShiftPatternByID(ctx, f.night.ID)
		if p.Name != "Late" || p.StartMinute != 13*60+15 || p.NominalHours != 7.5 {
			t.Errorf("updated %+v", p)
		}
		if v, _ := inputValue(t, page, fmt.Sprintf("sh-%d-hours", f.night.ID)); v != "7.5" {
			t.Errorf("page shows hours %q", v)
		}
		if len(f.audit(t, "shift.create")) != 2 || len(f.audit(t, "shift.update")) != 1 {
			t.Error("shift changes not audited")
		}
	})
	t.Run("tier create and update", func(t *testing.T) {
		f := newSettingsFixture(t)
		res, _, _ := f.postSettings(t, "/wards/w-a/settings/tiers", url.Values{"code": {"t3"}, "label": {"Very high"},
			"description": {"Continuous observation."}, "order": {""}})
		if res.StatusCode != 303 {
			t.Fatalf("create: status %d", res.StatusCode)
		}
		ts, _ := f.st.FindTiers(ctx, f.wardA.ID)
		if len(ts) != 3 || ts[2].Code != "t3" || ts[2].DisplayOrder != 3 || ts[2].Description != "Continuous observation." {
			t.Fatalf("tiers %+v (empty order puts the tier last)", ts)
		}
		res, _, _ = f.postSettings(t, fmt.Sprintf("/wards/w-a/settings/tiers/%d", f.t1.ID),
			url.Values{"label": {"Lowest"}, "description": {"Self-caring."}, "order": {"9"}, "code": {"zz"}})
		if res.StatusCode != 303 {
			t.Fatalf("update: status %d", res.StatusCode)
		}
		tr, _ := f.st.FindTierByID(ctx, f.t1.ID)
		if tr.Label != "Lowest" || tr.Description != "Self-caring." || tr.DisplayOrder != 9 || tr.Code != "t1" {
			t.Errorf("updated %+v (code must not change)", tr)
		}
	})
}

func TestSettingsBadInputKeepsInputAndChangesNothing(t *testing.T) {
	f := newSettingsFixture(t)
	night := fmt.Sprint(f.night.ID)
	for _, tc := range []struct {
		name   string
		path   string
		form   url.Values
		errors []string          // data-testid error-<field> expected
		kept   map[string]string // input id → value shown back
	}{
		{"staffing out of range", "/wards/w-a/settings",
			url.Values{"direct_care_fraction": {"0.7"}, "cover_level": {"1.5"}, "lookback_weeks": {"8"}, "quartiles": {"hinges"}, "beds": {""}, "changeover_minutes": {"90"}},
			[]string{"cover_level"}, map[string]string{"s-cover": "1.5", "s-dcf": "0.7"}},
		{"staffing not numbers", "/wards/w-a/settings",
			url.Values{"direct_care_fraction": {"NaN"}, "cover_level": {"0,9"}, "lookback_weeks": {"-3"}, "quartiles": {"type9"}, "beds": {"1e3"}, "changeover_minutes": {"-5"}},
			[]string{"direct_care_fraction", "cover_level", "lookback_weeks", "quartiles", "beds", "changeover_minutes"}, map[string]string{"s-dcf": "NaN", "s-beds": "1e3", "s-changeover": "-5"}},
		{"change-over window above 240 minutes", "/wards/w-a/settings",
			url.Values{"direct_care_fraction": {"0.7"}, "cover_level": {"0.9"}, "lookback_weeks": {"8"}, "quartiles": {"hinges"}, "beds": {""}, "changeover_minutes": {"241"}},
			[]string{"changeover_minutes"}, map[string]string{"s-changeover": "241", "s-dcf": "0.7"}},
		{"escalation text too long", "/wards/w-a/settings",
			url.Values{"direct_care_fraction": {"0.7"}, "cover_level": {"0.9"}, "lookback_weeks": {"8"}, "quartiles": {"hinges"}, "beds": {""}, "changeover_minutes": {"90"},
				"escalation": {strings.Repeat("Call the site manager. ", 30)}},
			[]string{"escalation"}, map[string]string{"s-changeover": "90"}},
		{"floor of zero", "/wards/w-a/settings/floors",
			url.Values{"floor_" + night: {"0"}, fmt.Sprintf("floor_%s_%d", night, f.t1.ID): {"4"}},
			[]string{"floor_" + night}, map[string]string{"f-floor_" + night: "0", fmt.Sprintf("f-floor_%s_%d", night, f.t1.ID): "4"}},
		{"floor below two nurses per patient", "/wards/w-a/settings/floors",
			url.Values{"floor_" + night: {"0.001"}},
			[]string{"floor_" + night}, map[string]string{"f-floor_" + night: "0.001"}},
		{"direct-care fraction typed a hundredfold too small", "/wards/w-a/settings",
			url.Values{"direct_care_fraction": {"0.0075"}, "cover_level": {"0.9"}, "lookback_weeks": {"8"}, "quartiles": {"hinges"}, "beds": {""}, "changeover_minutes": {"90"}},
			[]string{"direct_care_fraction"}, map[string]string{"s-dcf": "0.0075"}},
		{"floor above 50", "/wards/w-a/settings/floors",
			url.Values{fmt.Sprintf("floor_%s_%d", night, f.t2.ID): {"51"}},
			[]string{fmt.Sprintf("floor_%s_%d", night, f.t2.ID)}, nil},
		{"shift start", "/wards/w-a/settings/shifts",
			url.Values{"name": {"Day"}, "start": {"25:00"}, "hours": {"12"}},
			[]string{"start"}, map[string]string{"sh-new-name": "Day", "sh-new-start": "25:00"}},
		{"shift hours", "/wards/w-a/settings/shifts",
			url.Values{"name": {"Day"}, "start": {"07:00"}, "hours": {"25"}},
			[]string{"hours"}, map[string]string{"sh-new-hours": "25"}},
		{"shift name taken", "/wards/w-a/settings/shifts",
			url.Values{"name": {"Night"}, "start": {"07:00"}, "hours": {"12"}},
			[]string{"name"}, map[string]string{"sh-new-start": "07:00"}},
		{"shift edit empty name", "/wards/w-a/settings/shifts/" + night,
			url.Values{"name": {""}, "start": {"20:00"}, "hours": {"12"}},
			[]string{"name"}, map[string]string{"sh-" + night + "-start": "20:00"}},
		{"tier code", "/wards/w-a/settings/tiers",
			url.Values{"code": {"Tier 3"}, "label": {"Very high"}},
			[]string{"code"}, map[string]string{"t-new-code": "Tier 3", "t-new-label": "Very high"}},
		{"tier code taken", "/wards/w-a/settings/tiers",
			url.Values{"code": {"t1"}, "label": {"Again"}},
			[]string{"code"}, map[string]string{"t-new-label": "Again"}},
		{"tier edit empty label", fmt.Sprintf("/wards/w-a/settings/tiers/%d", f.t2.ID),
			url.Values{"label": {" "}, "description": {"kept text"}, "order": {"x"}},
			[]string{"label", "order"}, map[string]string{fmt.Sprintf("t-%d-description", f.t2.ID): "kept text"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := f.snapshot(t)
			res, body := f.do(t, f.as(t, pManagerA, post(tc.path, tc.form)))
			if res.StatusCode != 400 {
				t.Fatalf("status %d, want 400", res.StatusCode)
			}
			for _, field := range tc.errors {
				if got := byTestID(t, body, "error-"+field); len(got) != 1 || got[0] == "" {
					t.Errorf("message for %s: %q", field, got)
				}
			}
			for id, want := range tc.kept {
				if got, ok := inputValue(t, body, id); !ok || got != want {
					t.Errorf("input %s = %q (found %v), want %q kept", id, got, ok, want)
				}
			}
			if after := f.snapshot(t); !reflect.DeepEqual(before, after) {
				t.Errorf("a refused post changed something:\nbefore %+v\nafter  %+v", before, after)
			}
		})
	}
}

// TestSettingsOtherWardsObjects: a manager of ward A cannot reach ward B's
// tier (or an unknown pattern) through ward A's address.
func TestSettingsOtherWardsObjects(t *testing.T) {
	f := newSettingsFixture(t)
	for _, path := range []string{
		fmt.Sprintf("/wards/w-a/settings/tiers/%d", f.tierB.ID),
		"/wards/w-a/settings/shifts/999999",
		"/wards/w-a/settings/shifts/abc",
	} {
		before := f.snapshot(t)
		res, _ := f.do(t, f.as(t, pManagerA, post(path, url.Values{"label": {"x"}, "name": {"x"}, "start": {"07:00"}, "hours": {"1"}})))
		if res.StatusCode != 404 {
			t.Errorf("%s: status %d, want 404", path, res.StatusCode)
		}
		if after := f.snapshot(t); !reflect.DeepEqual(before, after) {
			t.Errorf("%s changed something", path)
		}
	}
	tb, _ := f.st.FindTierByID(context.Background(), f.tierB.ID)
	if tb.Label != "Other ward" {
		t.Errorf("ward B's tier label = %q", tb.Label)
	}
}
