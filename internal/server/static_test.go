package server

import (
	"context"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"wardload/internal/wardload"
	"wardload/web"
)

func TestStatic(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	versioned := s.assets.URL("wardload.css")
	if !strings.HasPrefix(versioned, "/static/wardload.css?v=") {
		t.Fatalf("URL = %q", versioned)
	}
	css, err := web.Static.Open("wardload.css")
	if err != nil {
		t.Fatal(err)
	}
	css.Close()

	for _, tc := range []struct {
		name        string
		path        string
		ifNoneMatch bool
		wantStatus  int
		wantType    string
		wantCache   string
	}{
		{"versioned", versioned, false, 200, "text/css; charset=utf-8", "public, max-age=31536000, immutable"},
		{"unversioned", "/static/wardload.css", false, 200, "text/css; charset=utf-8", "no-cache"},
		{"stale version", "/static/wardload.css?v=000000000000", false, 200, "text/css; charset=utf-8", "no-cache"},
		{"icon", s.assets.URL("favicon.svg"), false, 200, "image/svg+xml", "public, max-age=31536000, immutable"},
		{"revalidate", "/static/wardload.css", true, 304, "", "no-cache"},
		{"missing", "/static/nothing.css", false, 404, "text/html; charset=utf-8", "no-store"},
		{"directory", "/static/", false, 404, "text/html; charset=utf-8", "no-store"},
		{"traversal", "/static/../static.go", false, 404, "text/html; charset=utf-8", "no-store"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			req := httptest.NewRequest("GET", tc.path, nil)
			if tc.ifNoneMatch {
				req.Header.Set("If-None-Match", `"`+s.assets.files["wardload.css"].hash+`"`)
			}
			res, body := do(t, s.Handler(), req)
			if res.StatusCode != tc.wantStatus {
				t.Errorf("status = %d, want %d", res.StatusCode, tc.wantStatus)
			}
			if tc.wantType != "" && res.Header.Get("Content-Type") != tc.wantType {
				t.Errorf("Content-Type = %q, want %q", res.Header.Get("Content-Type"), tc.wantType)
			}
			if got := res.Header.Get("Cache-Control"); got != tc.wantCache {
				t.Errorf("Cache-Control = %q, want %q", got, tc.wantCache)
			}
			if tc.wantStatus == http.StatusOK && len(body) == 0 {
				t.Error("empty body")
			}
		})
	}
}

func TestPagesLinkVersionedAssets(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	_, body := do(t, s.Handler(), httptest.NewRequest("GET", "/signin", nil))
	for _, name := range []string{"wardload.css", "favicon.svg"} {
		if !strings.Contains(body, `href="`+s.assets.URL(name)+`"`) {
			t.Errorf("page does not link %s", s.assets.URL(name))
		}
	}
}

// TestSessionlessRoutesSkipTheSession checks that assets, probes and the
// OpenAPI document neither read the session nor look up its user, even
// with a valid session cookie, and so carry no Vary: Cookie that would
// split caches; the home page, by contrast, still reads it.
func TestSessionlessRoutesSkipTheSession(t *testing.T) {
	st := newFakeStore()
	lookups := 0
	find := st.FindUserByIDFn
	st.FindUserByIDFn = func(ctx context.Context, id int64) (*wardload.User, error) {
		lookups++
		return find(ctx, id)
	}
	s, _ := MustNew(t, st)
	for _, path := range []string{s.assets.URL("wardload.css"), "/static/wardload.css", "/healthz", "/readyz", "/api/v1/openapi.json"} {
		lookups = 0
		res, _ := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("GET", path, nil)))
		if res.StatusCode != http.StatusOK {
			t.Errorf("%s: status %d", path, res.StatusCode)
		}
		if lookups != 0 {
			t.Errorf("%s: %d user lookups with a session cookie, want 0", path, lookups)
		}
		if v := res.Header.Values("Vary"); slices.Contains(v, "Cookie") {
			t.Errorf("%s: Vary = %q, want no Cookie", path, v)
		}
	}
	lookups = 0
	res, _ := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("GET", "/", nil)))
	if res.StatusCode != http.StatusOK || lookups != 1 || !slices.Contains(res.Header.Values("Vary"), "Cookie") {
		t.Errorf("home: status %d, %d lookups, Vary %q; want 200, 1, Cookie", res.StatusCode, lookups, res.Header.Values("Vary"))
	}
}
