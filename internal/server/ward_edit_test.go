package server

import (
	"context"
	"net/http"
	"net/http/httptest"
	"net/url"
	"slices"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func TestWardEditByAdmin(t *testing.T) {
	f := newFixture(t)
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/admin/wards/w-a/edit", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("edit form = %d\n%s", res.StatusCode, body)
	}
	if z := selectedOption(t, body, "ward-time-zone"); z != "Europe/Dublin" {
		t.Errorf("zone chosen = %q, want the stored Europe/Dublin", z)
	}
	if got, ok := attrByID(t, body, "ward-code", "value"); ok {
		t.Errorf("edit form asks for the code (%q); it cannot change", got)
	}
	form := url.Values{"name": {"Ward A (Medicine)"}, "time_zone": {"Asia/Kolkata"}, "beds": {"26"}}
	cookie := MustSession(t, f.s, f.users[pAdmin].ID) // one session, so its notice shows next
	req := post("/admin/wards/w-a", form)
	req.AddCookie(cookie)
	res, body = f.do(t, req)
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/admin/wards/w-a/edit" {
		t.Fatalf("save = %d %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}
	ctx := context.Background()
	w, err := f.st.FindWardByCode(ctx, "w-a")
	if err != nil {
		t.Fatal(err)
	}
	if w.Name != "Ward A (Medicine)" || w.TimeZone != "Asia/Kolkata" || w.ID != f.wardA.ID {
		t.Errorf("stored = %+v", w)
	}
	if s, _ := f.st.FindSettings(ctx, w.ID); s.Beds != 26 || s.UpdatedBy != f.users[pAdmin].ID {
		t.Errorf("beds %d by %d, want 26 by the admin", s.Beds, s.UpdatedBy)
	}
	es := f.audit(t, "ward.update")
	if len(es) != 1 || es[0].UserID != f.users[pAdmin].ID || es[0].EntityID != w.ID ||
		!strings.Contains(es[0].Before, "Europe/Dublin") || !strings.Contains(es[0].After, "Asia/Kolkata") {
		t.Errorf("audit = %+v", es)
	}
	req = httptest.NewRequest("GET", "/admin/wards/w-a/edit", nil)
	req.AddCookie(cookie)
	_, body = f.do(t, req)
	if got := byTestID(t, body, "notice"); len(got) != 1 || got[0] != "Saved: ward w-a." {
		t.Errorf("notice = %q", got)
	}
	if v, _ := attrByID(t, body, "ward-beds", "value"); v != "26" {
		t.Errorf("beds shown = %q", v)
	}
	// Saving the form unchanged writes nothing.
	audits := f.totalAudit(t)
	if res, _ := f.do(t, f.as(t, pAdmin, post("/admin/wards/w-a", form))); res.StatusCode != http.StatusSeeOther {
		t.Errorf("unchanged save = %d", res.StatusCode)
	}
	if n := f.totalAudit(t); n != audits {
		t.Errorf("audit rows %d -> %d after saving nothing new", audits, n)
	}
}

// Each bad field is named in the summary, the input is kept and nothing
// changes (ward, settings, audit).
func TestWardEditBadInput(t *testing.T) {
	for _, tc := range []struct {
		name    string
		form    url.Values
		summary []string
		kept    map[string]string
	}{
		{"unknown zone", url.Values{"name": {"Ward A"}, "time_zone": {"Europe/Atlantis"}}, []string{`Unknown time zone "Europe/Atlantis".`}, map[string]string{"ward-time-zone": "Europe/Atlantis"}},
		{"blank name and zero beds", url.Values{"name": {" "}, "time_zone": {"UTC"}, "beds": {"0"}},
			[]string{"Ward name is required (at most 120 characters).", "Beds must be a whole number from 1 to 1000."}, map[string]string{"ward-beds": "0", "ward-time-zone": "UTC"}},
		{"absurd beds", url.Values{"name": {"Ward A"}, "time_zone": {"UTC"}, "beds": {"25000"}}, []string{"Beds must be a whole number from 1 to 1000."}, map[string]string{"ward-beds": "25000"}},
		{"beds in words", url.Values{"name": {"Ward A"}, "time_zone": {"UTC"}, "beds": {"twenty"}}, []string{"Beds must be a whole number from 1 to 1000."}, map[string]string{"ward-beds": "twenty"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := newFixture(t)
			audits := f.totalAudit(t)
			res, body := f.do(t, f.as(t, pAdmin, post("/admin/wards/w-a", tc.form)))
			if res.StatusCode != http.StatusBadRequest {
				t.Fatalf("status %d, want 400\n%s", res.StatusCode, body)
			}
			if got := byTestID(t, body, "error-link"); !slices.Equal(got, tc.summary) {
				t.Errorf("summary = %q\nwant      %q", got, tc.summary)
			}
			for id, want := range tc.kept {
				got, _ := attrByID(t, body, id, "value")
				if id == "ward-time-zone" {
					got = selectedOption(t, body, id)
				}
				if got != want {
					t.Errorf("%s = %q, want %q kept", id, got, want)
				}
			}
			w, _ := f.st.FindWardByCode(context.Background(), "w-a")
			if w.Name != "Ward A" || w.TimeZone != "Europe/Dublin" {
				t.Errorf("ward changed: %+v", w)
			}
			if n := f.totalAudit(t); n != audits {
				t.Errorf("audit rows %d -> %d", audits, n)
			}
		})
	}
}

// Retiring asks for a tick; once retired the ward takes no census, is
// hidden from the lists of everyone but admins, and its history stays
// readable; reinstating undoes it. Nothing is deleted.
func TestWardRetireAndReinstate(t *testing.T) {
	f := newCensusFixture(t)
	p := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 2, 3, 1, 0)
	census, projections := f.counts(t)

	res, body := f.do(t, f.as(t, pAdmin, post("/admin/wards/w-a/retire", url.Values{})))
	if res.StatusCode != http.StatusBadRequest || len(byTestID(t, body, "error-retired")) != 1 {
		t.Fatalf("retire without the tick = %d, want 400 asking for it\n%s", res.StatusCode, body)
	}
	if w, _ := f.st.FindWardByCode(context.Background(), "w-a"); w.Retired() {
		t.Fatal("retired without the confirmation")
	}
	res, _ = f.do(t, f.as(t, pAdmin, post("/admin/wards/w-a/retire", url.Values{"confirm": {"yes"}})))
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire = %d", res.StatusCode)
	}
	if es := f.audit(t, "ward.retire"); len(es) != 1 || es[0].UserID != f.users[pAdmin].ID || es[0].EntityID != f.wardA.ID {
		t.Errorf("retire audit = %+v", es)
	}

	// Lists: gone for its nurse and manager, marked for the admin.
	for _, who := range []string{pNurseA, pManagerA} {
		_, home := f.do(t, f.as(t, who, httptest.NewRequest("GET", "/", nil)))
		if codes := byTestID(t, home, "ward-code"); slices.Contains(codes, "w-a") {
			t.Errorf("%s still sees w-a on the ward list", who)
		}
	}
	_, home := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/", nil)))
	if codes := byTestID(t, home, "ward-code"); !slices.Contains(codes, "w-a") || len(byTestID(t, home, "ward-retired")) != 1 {
		t.Errorf("admin's list: codes %v, %d retired marks", codes, len(byTestID(t, home, "ward-retired")))
	}
	_, signedOut := f.do(t, httptest.NewRequest("GET", "/", nil))
	if codes := byTestID(t, signedOut, "ward-code"); slices.Contains(codes, "w-a") {
		t.Error("signed-out list names the retired ward")
	}

	// Census: the page says why, a post is refused, nothing stored.
	_, page := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if got := byTestID(t, page, "census-unavailable"); len(got) != 1 || !strings.Contains(got[0], "retired") || len(byTestID(t, page, "census-form")) != 0 {
		t.Errorf("census page of a retired ward = %q", got)
	}
	res, page = f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", f.censusForm(f.a.day, "2", "3", "1", "0"))))
	if res.StatusCode != http.StatusBadRequest || !strings.Contains(page, "ward has been retired") {
		t.Errorf("census post to a retired ward = %d", res.StatusCode)
	}
	if c, pr := f.counts(t); c != census || pr != projections {
		t.Errorf("census/projections %d/%d -> %d/%d", census, projections, c, pr)
	}
	// History: still readable by its manager and the admin.
	for _, who := range []string{pManagerA, pAdmin} {
		for _, path := range []string{"/wards/w-a/projections", "/wards/w-a/projections/" + strconv.FormatInt(p.ID, 10), "/wards/w-a/review"} {
			if res, _ := f.do(t, f.as(t, who, httptest.NewRequest("GET", path, nil))); res.StatusCode != 200 {
				t.Errorf("%s: %s = %d after retiring, want 200", who, path, res.StatusCode)
			}
		}
	}

	res, _ = f.do(t, f.as(t, pAdmin, post("/admin/wards/w-a/reinstate", url.Values{})))
	if res.StatusCode != http.StatusSeeOther || len(f.audit(t, "ward.reinstate")) != 1 {
		t.Fatalf("reinstate = %d", res.StatusCode)
	}
	res, _ = f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", f.censusForm(f.a.day, "2", "3", "1", "0"))))
	if res.StatusCode != http.StatusSeeOther {
		t.Errorf("census after reinstating = %d, want 303", res.StatusCode)
	}
}

// A retired shift pattern leaves the census form; a census naming it is
// refused with the reason and what was typed kept; the last active
// pattern cannot be retired.
func TestShiftAndTierRetire(t *testing.T) {
	f := newCensusFixture(t)
	night := strconv.FormatInt(f.a.night.ID, 10)
	res, body := f.do(t, f.as(t, pManagerA, post("/wards/w-a/settings/shifts/"+night+"/retire", url.Values{})))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/wards/w-a/settings#shifts" {
		t.Fatalf("retire night = %d %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}
	if es := f.audit(t, "shift.retire"); len(es) != 1 || es[0].EntityID != f.a.night.ID || es[0].UserID != f.users[pManagerA].ID {
		t.Errorf("audit = %+v", es)
	}
	_, page := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census?date=2026-03-02&shift="+night, nil)))
	for _, o := range optionValues(t, page, "census-shift") {
		if o.value == night {
			t.Error("census form still offers the retired Night shift")
		}
	}
	census, _ := f.counts(t)
	form := f.censusForm(f.a.night, "4", "5", "1", "0")
	res, page = f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
	if res.StatusCode != http.StatusBadRequest || !strings.Contains(page, "This shift pattern has been retired") {
		t.Errorf("census for the retired shift = %d", res.StatusCode)
	}
	if v, _ := attrByID(t, page, "tier-t2", "value"); v != "5" {
		t.Errorf("typed count t2 = %q, want 5 kept", v)
	}
	if c, _ := f.counts(t); c != census {
		t.Errorf("census rows %d -> %d", census, c)
	}
	if again := optionValues(t, page, "census-shift-again"); len(again) != 1 || again[0].value != strconv.FormatInt(f.a.day.ID, 10) {
		t.Errorf("shifts offered again = %+v, want Day only", again)
	}
	form.Set("shift", strconv.FormatInt(f.a.day.ID, 10))
	if res, _ := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form))); res.StatusCode != http.StatusSeeOther {
		t.Errorf("census re-posted for Day = %d, want 303", res.StatusCode)
	}
	if c, _ := f.counts(t); c != census+1 {
		t.Errorf("census rows %d -> %d after the re-post, want one more", census, c)
	}

	// Day is now the last active pattern.
	audits := f.totalAudit(t)
	day := strconv.FormatInt(f.a.day.ID, 10)
	res, page = f.do(t, f.as(t, pManagerA, post("/wards/w-a/settings/shifts/"+day+"/retire", url.Values{})))
	if res.StatusCode != http.StatusBadRequest {
		t.Fatalf("retire last shift = %d, want 400", res.StatusCode)
	}
	if got := byTestID(t, page, "error-retired"); len(got) != 1 || !strings.Contains(got[0], "last active shift pattern") {
		t.Errorf("refusal = %q", got)
	}
	if n := f.totalAudit(t); n != audits {
		t.Errorf("audit rows %d -> %d after the refusal", audits, n)
	}
	if p, _ := f.st.FindShiftPatternByID(context.Background(), f.a.day.ID); p.Retired() {
		t.Error("last active shift retired")
	}

	// A tier: hidden from the form, its history kept; reinstated.
	t4 := strconv.FormatInt(f.a.tiers[3].ID, 10)
	if res, _ := f.do(t, f.as(t, pManagerA, post("/wards/w-a/settings/tiers/"+t4+"/retire", url.Values{}))); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("retire t4 = %d", res.StatusCode)
	}
	_, page = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if n := len(byTestID(t, page, "tier-field")); n != 3 {
		t.Errorf("census tier fields = %d, want 3 after retiring t4", n)
	}
	_, settings := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/settings", nil)))
	if n := len(byTestID(t, settings, "retired-note")); n != 2 {
		t.Errorf("settings shows %d retired notes, want 2 (Night, t4)", n)
	}
	if res, _ := f.do(t, f.as(t, pManagerA, post("/wards/w-a/settings/tiers/"+t4+"/reinstate", url.Values{}))); res.StatusCode != http.StatusSeeOther || len(f.audit(t, "tier.reinstate")) != 1 {
		t.Errorf("reinstate t4 = %d", res.StatusCode)
	}
}

// totalAudit is the number of audit rows of any action.
func (f *fixture) totalAudit(tb testing.TB) int {
	tb.Helper()
	_, n, err := f.st.FindAudit(context.Background(), wardload.AuditFilter{})
	if err != nil {
		tb.Fatal(err)
	}
	return n
}
