package main

import (
	"io"
	"net/http"
	"net/url"
	"strings"
	"testing"

	"wardload/internal/demo"
)

// TestServePostgresHostileText sends text PostgreSQL cannot store or
// compare (NUL, invalid UTF-8) to every form and filter that passes typed
// text to the store. SQLite takes such bytes, so only a PostgreSQL run
// shows the failure: each was a 500 with the driver's SQLSTATE 22021 in
// the log. Each must be a plain 4xx, with no ERROR logged.
func TestServePostgresHostileText(t *testing.T) {
	t.Parallel()
	dbURL, accounts := mustDemoDatabase(t)
	s := MustServe(t, "--addr", "127.0.0.1:0", "--db", dbURL, "--data-dir", t.TempDir())
	c := signIn(t, s.URL, "demo.admin", accounts["demo.admin"])
	c.CheckRedirect = func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }
	do := func(method, path, body string) int {
		t.Helper()
		req, err := http.NewRequest(method, s.URL+path, strings.NewReader(body))
		if err != nil {
			t.Fatal(err)
		}
		if method == http.MethodPost {
			req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
		}
		res, err := c.Do(req)
		if err != nil {
			t.Fatal(err)
		}
		io.Copy(io.Discard, res.Body)
		res.Body.Close()
		return res.StatusCode
	}
	settings := "/wards/" + demo.WardCode + "/settings"
	for _, bad := range []string{"%00", "a%00b", "%FF%FE"} {
		for _, tc := range []struct{ method, path, body string }{
			{"POST", settings + "/shifts", "name=" + bad + "&start=06:00&hours=8"},
			{"POST", settings + "/shifts/1", "name=" + bad + "&start=07:30&hours=12.5"},
			{"POST", settings + "/tiers", "code=tq&label=" + bad + "&order=9"},
			{"POST", settings + "/tiers/1", "label=" + bad + "&order=1"},
			{"GET", "/audit?action=" + bad, ""},
			{"GET", "/audit?entity=" + bad, ""},
			{"GET", "/audit?user=" + bad, ""},
		} {
			if code := do(tc.method, tc.path, tc.body); code < 400 || code >= 500 {
				t.Errorf("%s %s %q: %d, want 4xx", tc.method, tc.path, tc.body, code)
			}
		}
	}
	// A line break inside a name is refused too (surrounding space is trimmed).
	if code := do("POST", settings+"/shifts", "name=Da%0Ay&start=06:00&hours=8"); code != http.StatusBadRequest {
		t.Errorf("shift name with a line break: %d, want 400", code)
	}
	// Sign-in with such a name is an ordinary failed sign-in.
	for _, name := range []string{"a\x00b", "\xff"} {
		res, err := http.PostForm(s.URL+"/signin", url.Values{"name": {name}, "password": {"whatever-123"}})
		if err != nil {
			t.Fatal(err)
		}
		res.Body.Close()
		if res.StatusCode != http.StatusUnauthorized {
			t.Errorf("sign-in as %q: %d, want 401", name, res.StatusCode)
		}
	}
	if strings.Contains(s.stderr.String(), "level=ERROR") || strings.Contains(s.stdout.String(), "level=ERROR") {
		t.Errorf("errors logged:\n%s", s.stderr)
	}
	s.Stop(t)
}
