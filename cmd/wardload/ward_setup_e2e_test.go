package main

import (
	"io"
	"net/http"
	"net/url"
	"regexp"
	"strings"
	"testing"
)

// TestNewWardFromNothing is a fresh installation without the demo, over
// HTTP against the real wiring: the first admin (from the command line)
// creates a ward in the browser's form, follows its set-up checklist
// (shift patterns, tiers, a ratio floor, beds), a charge nurse of the ward
// signs in, saves the first census and sees its projection with the
// ratio floor and the caution. It runs on SQLite and, when
// WARDLOAD_TEST_DATABASE_URL is set, on a new PostgreSQL database.
func TestNewWardFromNothing(t *testing.T) {
	t.Parallel()
	t.Run("sqlite", func(t *testing.T) {
		t.Parallel()
		newWardFromNothing(t, t.TempDir())
	})
	t.Run("postgres", func(t *testing.T) {
		t.Parallel()
		newWardFromNothing(t, t.TempDir(), "--db", mustCreateDatabase(t))
	})
}

// newWardFromNothing is the journey on the data directory dir, or on the
// database storeArgs name.
func newWardFromNothing(t *testing.T, dir string, storeArgs ...string) {
	if code, _, errs := runCLI(t, dir, "first admin passphrase\n", append([]string{"user", "add", "--role", "admin", "ada.admin"}, storeArgs...)...); code != exitOK {
		t.Fatalf("user add: %d %s", code, errs)
	}
	s := MustServe(t, append([]string{"--addr", "127.0.0.1:0", "--data-dir", dir}, storeArgs...)...)
	admin := signIn(t, s.URL, "ada.admin", "first admin passphrase")

	// post sends a form and follows the 303; it returns where it ended.
	post := func(c *http.Client, path string, form url.Values) (string, string) {
		t.Helper()
		res, err := c.PostForm(s.URL+path, form)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		b, _ := io.ReadAll(res.Body)
		if res.StatusCode != http.StatusOK {
			t.Fatalf("POST %s = %d at %s\n%s", path, res.StatusCode, res.Request.URL, b)
		}
		return res.Request.URL.Path, string(b)
	}
	states := regexp.MustCompile(`data-testid="setup-step-state">([^<]*)<`)
	stepStates := func(page string) []string {
		var out []string
		for _, m := range states.FindAllStringSubmatch(page, -1) {
			out = append(out, m[1])
		}
		return strings.Fields(strings.Join(out, " ")) // "Not done" is two words
	}

	if code, page := getWith(t, admin, s.URL+"/admin/wards/new"); code != http.StatusOK || !strings.Contains(page, `<option value="Europe/Dublin">`) {
		t.Fatalf("new ward form = %d", code)
	}
	where, setup := post(admin, "/admin/wards", url.Values{"code": {"w5-east"}, "name": {"Ward 5 East"}, "time_zone": {"Europe/Dublin"}, "beds": {"20"}})
	if where != "/wards/w5-east/setup" {
		t.Fatalf("after creating the ward: %s, want its set-up checklist", where)
	}
	// Shift patterns, tiers, floors not done; settings saved (beds);
	// observations optional; no census yet.
	if got := strings.Join(stepStates(setup), " "); got != "Not done Not done Not done Done Optional Not done" {
		t.Errorf("set-up states of a new ward = %q", got)
	}
	if !strings.Contains(setup, `data-testid="setup-not-ready"`) {
		t.Error("set-up of a new ward does not say what a census needs")
	}
	// The census page of the ward not yet set up links to the set-up.
	if _, census := getWith(t, admin, s.URL+"/wards/w5-east/census"); !strings.Contains(census, `href="/wards/w5-east/setup"`) {
		t.Error("census page of a ward without shifts does not link to its set-up")
	}

	for _, sh := range []url.Values{
		{"name": {"Day"}, "start": {"08:00"}, "hours": {"12"}},
		{"name": {"Night"}, "start": {"20:00"}, "hours": {"12"}},
	} {
		if where, _ := post(admin, "/wards/w5-east/settings/shifts", sh); where != "/wards/w5-east/settings" {
			t.Fatalf("add shift: ended at %s", where)
		}
	}
	for _, tr := range []url.Values{
		{"code": {"light"}, "label": {"Light care"}, "description": {"Mostly independent."}, "order": {""}},
		{"code": {"heavy"}, "label": {"Heavy care"}, "description": {"Needs two staff to move."}, "order": {""}},
	} {
		if where, _ := post(admin, "/wards/w5-east/settings/tiers", tr); where != "/wards/w5-east/settings" {
			t.Fatalf("add tier: ended at %s", where)
		}
	}
	_, settings := getWith(t, admin, s.URL+"/wards/w5-east/settings")
	floors := url.Values{}
	for _, m := range regexp.MustCompile(`name="(floor_\d+)"`).FindAllStringSubmatch(settings, -1) {
		floors.Set(m[1], "5")
	}
	if len(floors) != 2 {
		t.Fatalf("ward-wide floor fields = %v, want one per shift", floors)
	}
	post(admin, "/wards/w5-east/settings/floors", floors)

	_, setup = getWith(t, admin, s.URL+"/wards/w5-east/setup")
	if got := strings.Join(stepStates(setup), " "); got != "Done Done Done Done Optional Not done" {
		t.Errorf("set-up states once set up = %q", got)
	}
	if !strings.Contains(setup, `data-testid="setup-census"`) {
		t.Error("set-up does not offer the first census")
	}

	// A charge nurse of the ward (made on the command line while serving).
	if code, _, errs := runCLI(t, dir, "charge nurse passphrase\n", append([]string{"user", "add", "--role", "charge_nurse", "--ward", "w5-east", "cara.charge"}, storeArgs...)...); code != exitOK {
		t.Fatalf("user add nurse: %d %s", code, errs)
	}
	nurse := signIn(t, s.URL, "cara.charge", "charge nurse passphrase")
	_, home := getWith(t, nurse, s.URL+"/")
	if !strings.Contains(home, `href="/wards/w5-east/census"`) {
		t.Fatal("the nurse's ward list does not offer the census")
	}
	_, form := getWith(t, nurse, s.URL+"/wards/w5-east/census")
	date := regexp.MustCompile(`name="date" value="([0-9-]+)"`).FindStringSubmatch(form)
	shift := regexp.MustCompile(`type="hidden" name="shift" value="(\d+)"`).FindStringSubmatch(form)
	if date == nil || shift == nil {
		t.Fatalf("census form has no preselected shift:\n%s", form)
	}
	where, projection := post(nurse, "/wards/w5-east/census", url.Values{"date": {date[1]}, "shift": {shift[1]},
		"tier_light": {"8"}, "tier_heavy": {"4"}})
	if !regexp.MustCompile(`^/wards/w5-east/projections/\d+$`).MatchString(where) {
		t.Fatalf("after the first census: %s, want its projection", where)
	}
	// 12 patients at 5 per nurse: 3 nurses giving care, and the nurse in
	// charge on top (the floors were saved with "counts towards the
	// floor" unticked), so a floor of 4, shown with the caution.
	for _, want := range []string{`data-testid="floor-nurses">4<`, `data-testid="projection-caution"`, "estimate"} {
		if !strings.Contains(projection, want) {
			i := strings.Index(projection, "floor-nurses")
			t.Errorf("projection page lacks %q; floor: %.80s", want, projection[max(i, 0):])
		}
	}
	_, setup = getWith(t, admin, s.URL+"/wards/w5-east/setup")
	if got := stepStates(setup); len(got) == 0 || got[len(got)-1] != "Done" {
		t.Errorf("first census step after the census = %q", got)
	}
}
