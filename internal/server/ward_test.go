package server

import (
	"context"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/alexedwards/scs/sqlite3store"
	"golang.org/x/net/html"

	"wardload/internal/wardload"
)

// wardCount is how many wards the store holds.
func wardCount(tb testing.TB, st wardload.Store) int {
	tb.Helper()
	_, n, err := st.FindWards(context.Background(), wardload.WardFilter{})
	if err != nil {
		tb.Fatal(err)
	}
	return n
}

func TestWardNewForm(t *testing.T) {
	f := newFixture(t)
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/admin/wards/new", nil)))
	if res.StatusCode != 200 || len(byTestID(t, body, "ward-form")) != 1 {
		t.Fatalf("form = %d, want 200 with the ward form\n%s", res.StatusCode, body)
	}
	// A <select> of every zone in the list (no JavaScript needed), none
	// chosen until the admin picks one.
	zones := optionValues(t, body, "ward-time-zone")
	if len(zones) != len(wardZones)+1 || zones[0].value != "" || !zones[0].selected {
		t.Errorf("zone options = %d, first %+v; want a blank chosen first, then %d zones", len(zones), zones[0], len(wardZones))
	}
	for _, z := range []string{"Europe/Dublin", "America/New_York", "Asia/Kolkata", "Pacific/Chatham", "UTC"} {
		if !strings.Contains(body, `<option value="`+z+`">`) {
			t.Errorf("zone %s not offered", z)
		}
	}
	if n := len(byTestID(t, body, "error-summary")); n != 0 {
		t.Errorf("empty form shows %d error summaries", n)
	}
}

// Every suggested zone must be one a ward can be created with, and the
// list stays sorted and free of repeats so that it reads as a list.
func TestWardZonesLoad(t *testing.T) {
	if !slices.IsSorted(wardZones) || len(slices.Compact(slices.Clone(wardZones))) != len(wardZones) {
		t.Error("wardZones is not sorted or has repeats")
	}
	for _, z := range wardZones {
		w := wardload.Ward{Code: "z", Name: "Zone check", TimeZone: z}
		if err := w.Validate(); err != nil {
			t.Errorf("%s: %v", z, err)
		}
	}
}

func TestWardCreateByAdmin(t *testing.T) {
	f := newFixture(t)
	form := url.Values{"code": {"w4-north"}, "name": {" Ward 4 North (Medicine) "}, "time_zone": {"Australia/Perth"}, "beds": {"24"}}
	res, body := f.do(t, f.as(t, pAdmin, post("/admin/wards", form)))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/wards/w4-north/setup" {
		t.Fatalf("create = %d Location %q, want 303 to the set-up checklist\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}

	ctx := context.Background()
	w, err := f.st.FindWardByCode(ctx, "w4-north")
	if err != nil {
		t.Fatal(err)
	}
	if w.Name != "Ward 4 North (Medicine)" || w.TimeZone != "Australia/Perth" {
		t.Errorf("stored ward = %+v", w)
	}
	admin := f.users[pAdmin]
	s, err := f.st.FindSettings(ctx, w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if s.Beds != 24 || s.UpdatedBy != admin.ID {
		t.Errorf("settings beds %d by %d, want 24 by the admin (%d)", s.Beds, s.UpdatedBy, admin.ID)
	}
	var created []*wardload.AuditEntry
	for _, e := range f.audit(t, "ward.create") {
		if e.EntityID == w.ID {
			created = append(created, e)
		}
	}
	if len(created) != 1 || created[0].UserID != admin.ID || created[0].Actor != admin.Name || created[0].WardID != w.ID {
		t.Errorf("audit of the new ward = %+v; want one ward.create by %s", created, admin.Name)
	}

	// The admin's ward list shows it, with the link to add another.
	_, home := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/", nil)))
	if codes := byTestID(t, home, "ward-code"); !slices.Contains(codes, "w4-north") {
		t.Errorf("ward codes on home = %v, want w4-north among them", codes)
	}
	if href := byTestIDAttr(t, home, "ward-new"); href != "/admin/wards/new" {
		t.Errorf("new ward link = %q", href)
	}

	// Its creator can open the settings page, which starts the set-up.
	res, page := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/w4-north/settings", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("settings of the new ward = %d", res.StatusCode)
	}
	if steps := byTestID(t, page, "ward-setup-step"); len(steps) != 4 || steps[0] != "Add shift patterns" || steps[3] != "Enter the first census" {
		t.Errorf("set-up steps = %q", steps)
	}
	if got, _ := attrByID(t, page, "s-beds", "value"); got != "24" {
		t.Errorf("beds on the settings page = %q, want 24", got)
	}
}

// Managers and charge nurses may not create wards, and do not see the link.
func TestWardCreateRefusedToOtherRoles(t *testing.T) {
	f := newFixture(t)
	before := wardCount(t, f.st)
	for _, p := range []string{pNurseA, pManagerA, pManagerB} {
		form := url.Values{"code": {"sneaky"}, "name": {"Sneaky"}, "time_zone": {"UTC"}}
		if res, _ := f.do(t, f.as(t, p, post("/admin/wards", form))); res.StatusCode != http.StatusForbidden {
			t.Errorf("%s: create = %d, want 403", p, res.StatusCode)
		}
		if res, _ := f.do(t, f.as(t, p, httptest.NewRequest("GET", "/admin/wards/new", nil))); res.StatusCode != http.StatusForbidden {
			t.Errorf("%s: form = %d, want 403", p, res.StatusCode)
		}
		_, home := f.do(t, f.as(t, p, httptest.NewRequest("GET", "/", nil)))
		if n := len(byTestID(t, home, "ward-new")); n != 0 {
			t.Errorf("%s sees %d new-ward links", p, n)
		}
	}
	if n := wardCount(t, f.st); n != before {
		t.Errorf("wards = %d after refused creates, want %d", n, before)
	}
}

func TestWardCreateBadInput(t *testing.T) {
	for _, tc := range []struct {
		name    string
		form    url.Values
		summary []string          // error summary links, in form order
		kept    map[string]string // input id → value shown back
	}{
		{
			name: "every field wrong at once",
			form: url.Values{"code": {"Ward 9"}, "name": {""}, "time_zone": {"Europe/Atlantis"}, "beds": {"-3"}},
			summary: []string{
				"Ward code must be 1–32 lowercase letters, digits, '-' or '_'.",
				"Ward name is required (at most 120 characters).",
				`Unknown time zone "Europe/Atlantis".`,
				"Beds must be a whole number from 1 to 1000.",
			},
			kept: map[string]string{"ward-code": "Ward 9", "ward-time-zone": "Europe/Atlantis", "ward-beds": "-3"},
		},
		{
			name:    "duplicate code",
			form:    url.Values{"code": {"w-a"}, "name": {"Another A"}, "time_zone": {"Europe/London"}},
			summary: []string{"A ward with this code already exists."},
			kept:    map[string]string{"ward-code": "w-a", "ward-name": "Another A", "ward-time-zone": "Europe/London"},
		},
		{
			name:    "name too long",
			form:    url.Values{"code": {"w9"}, "name": {strings.Repeat("n", 121)}, "time_zone": {"UTC"}},
			summary: []string{"Ward name is required (at most 120 characters)."},
			kept:    map[string]string{"ward-code": "w9", "ward-time-zone": "UTC"},
		},
		{
			name:    "server's local zone",
			form:    url.Values{"code": {"w9"}, "name": {"Ward 9"}, "time_zone": {"Local"}},
			summary: []string{"Time zone is required (an IANA name such as Europe/Dublin)."},
			kept:    map[string]string{"ward-name": "Ward 9", "ward-time-zone": "Local"},
		},
		{
			name:    "too many beds",
			form:    url.Values{"code": {"w9"}, "name": {"Ward 9"}, "time_zone": {"UTC"}, "beds": {"1001"}},
			summary: []string{"Beds must be a whole number from 1 to 1000."},
			kept:    map[string]string{"ward-beds": "1001"},
		},
		{
			name:    "no beds",
			form:    url.Values{"code": {"w9"}, "name": {"Ward 9"}, "time_zone": {"UTC"}, "beds": {"0"}},
			summary: []string{"Beds must be a whole number from 1 to 1000."},
			kept:    map[string]string{"ward-beds": "0", "ward-time-zone": "UTC"},
		},
		{
			name:    "upper case code",
			form:    url.Values{"code": {"W4-North"}, "name": {"Ward 4"}, "time_zone": {"UTC"}},
			summary: []string{"Ward code must be 1–32 lowercase letters, digits, '-' or '_'."},
			kept:    map[string]string{"ward-code": "W4-North"},
		},
		{
			name:    "code with a space",
			form:    url.Values{"code": {"w4 north"}, "name": {"Ward 4"}, "time_zone": {"UTC"}},
			summary: []string{"Ward code must be 1–32 lowercase letters, digits, '-' or '_'."},
			kept:    map[string]string{"ward-code": "w4 north"},
		},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := newFixture(t)
			before, audits := wardCount(t, f.st), len(f.audit(t, "ward.create"))
			res, body := f.do(t, f.as(t, pAdmin, post("/admin/wards", tc.form)))
			if res.StatusCode != http.StatusBadRequest {
				t.Fatalf("status %d, want 400\n%s", res.StatusCode, body)
			}
			if len(byTestID(t, body, "error-summary")) != 1 {
				t.Error("no error summary")
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
			if n := wardCount(t, f.st); n != before {
				t.Errorf("wards = %d, want %d", n, before)
			}
			if n := len(f.audit(t, "ward.create")); n != audits {
				t.Errorf("ward.create audit rows = %d, want %d", n, audits)
			}
		})
	}
}

// TestNewWardJourney is a fresh installation's first minutes: an admin
// and no wards; the admin creates a ward with the form, adds a shift
// pattern and a tier on its settings page, and the census page is ready.
func TestNewWardJourney(t *testing.T) {
	st := MustOpenSQLite(t)
	h, err := testPassword.Hash("first admin password")
	if err != nil {
		t.Fatal(err)
	}
	admin := &wardload.User{Name: "first.admin", Role: wardload.RoleAdmin, PasswordHash: h}
	if err := st.CreateUser(wardload.WithActor(context.Background(), wardload.Actor{Name: "cli"}), admin); err != nil {
		t.Fatal(err)
	}
	cfg := DefaultConfig()
	cfg.Password = testPassword
	cfg.Store = st
	cfg.Logger = slog.New(slog.NewTextHandler(&logBuffer{}, nil))
	// 09:00 in Dublin on a Monday in March (GMT): inside the day shift.
	cfg.Now = func() time.Time { return time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC) }
	cfg.SessionStore = sqlite3store.NewWithCleanupInterval(st.DB(), 0)
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	handler := s.Handler()
	cookie := MustSession(t, s, admin.ID)
	send := func(req *http.Request) (*http.Response, string) {
		t.Helper()
		req.AddCookie(cookie)
		return do(t, handler, req)
	}
	get := func(path string) string {
		t.Helper()
		res, body := send(httptest.NewRequest("GET", path, nil))
		if res.StatusCode != 200 {
			t.Fatalf("GET %s = %d\n%s", path, res.StatusCode, body)
		}
		return body
	}
	postOK := func(path string, form url.Values, wantLocation string) {
		t.Helper()
		res, body := send(post(path, form))
		if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != wantLocation {
			t.Fatalf("POST %s = %d Location %q, want 303 to %s\n%s", path, res.StatusCode, res.Header.Get("Location"), wantLocation, body)
		}
	}

	home := get("/")
	if href := byTestIDAttr(t, home, "wards-empty-new"); href != "/admin/wards/new" {
		t.Fatalf("empty home links to %q, want the new ward form", href)
	}
	get("/admin/wards/new")
	postOK("/admin/wards", url.Values{"code": {"w2-surg"}, "name": {"Ward 2 Surgery"}, "time_zone": {"Europe/Dublin"}, "beds": {""}},
		"/wards/w2-surg/setup")

	setup := get("/wards/w2-surg/setup")
	if got := byTestID(t, setup, "notice"); len(got) != 1 || !strings.HasPrefix(got[0], "Ward w2-surg was created.") {
		t.Errorf("notice = %q", got)
	}
	page := get("/wards/w2-surg/settings")
	if len(byTestID(t, page, "ward-setup")) != 1 {
		t.Error("a new ward's settings page has no set-up checklist")
	}
	census := get("/wards/w2-surg/census")
	if len(byTestID(t, census, "census-unavailable")) != 1 {
		t.Error("census page of a ward without shifts or tiers does not say so")
	}

	postOK("/wards/w2-surg/settings/shifts", url.Values{"name": {"Day"}, "start": {"07:30"}, "hours": {"12.5"}},
		"/wards/w2-surg/settings#shift-1")
	page = get("/wards/w2-surg/settings")
	if steps := byTestID(t, page, "ward-setup-step"); len(steps) != 4 || steps[0] != "Add shift patterns (done)" || steps[1] != "Add acuity tiers" {
		t.Errorf("set-up steps after a shift pattern = %q", steps)
	}
	postOK("/wards/w2-surg/settings/tiers", url.Values{"code": {"t1"}, "label": {"Light care"}, "description": {"Mostly independent."}, "order": {""}},
		"/wards/w2-surg/settings#tier-1")
	page = get("/wards/w2-surg/settings")
	if n := len(byTestID(t, page, "ward-setup")); n != 0 {
		t.Errorf("set-up checklist still shown once shifts and tiers exist")
	}

	census = get("/wards/w2-surg/census")
	if len(byTestID(t, census, "census-form")) != 1 || len(byTestID(t, census, "tier-field")) != 1 {
		t.Errorf("census page has %d forms and %d tier fields, want 1 and 1", len(byTestID(t, census, "census-form")), len(byTestID(t, census, "tier-field")))
	}
}

type option struct {
	value    string
	selected bool
}

// optionValues returns the options of the <select> with id, in order.
func optionValues(tb testing.TB, page, id string) []option {
	tb.Helper()
	doc, err := html.Parse(strings.NewReader(page))
	if err != nil {
		tb.Fatal(err)
	}
	var out []option
	var walk func(n *html.Node, in bool)
	walk = func(n *html.Node, in bool) {
		if n.Type == html.ElementNode {
			for _, a := range n.Attr {
				in = in || (n.Data == "select" && a.Key == "id" && a.Val == id)
			}
			if in && n.Data == "option" {
				var o option
				for _, a := range n.Attr {
					switch a.Key {
					case "value":
						o.value = a.Val
					case "selected":
						o.selected = true
					}
				}
				out = append(out, o)
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c, in)
		}
	}
	walk(doc, false)
	return out
}

// selectedOption is the value of the chosen option of the <select> id.
func selectedOption(tb testing.TB, page, id string) string {
	tb.Helper()
	for _, o := range optionValues(tb, page, id) {
		if o.selected {
			return o.value
		}
	}
	return ""
}
