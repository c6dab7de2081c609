package server

import (
	"bytes"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"wardload/internal/demo"
)

func TestSecurityHeadersOnEveryResponse(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	var reqs []*http.Request
	for _, rt := range s.Routes() {
		path := strings.ReplaceAll(rt.Pattern, "*", "wardload.css")
		reqs = append(reqs, httptest.NewRequest(rt.Method, path, nil))
	}
	crossSite := httptest.NewRequest("POST", "/", nil)
	crossSite.Header.Set("Sec-Fetch-Site", "cross-site")
	reqs = append(reqs,
		httptest.NewRequest("GET", "/no/such/page", nil),
		httptest.NewRequest("GET", "/api/nothing", nil),
		httptest.NewRequest("GET", "/static/missing.js", nil),
		httptest.NewRequest("DELETE", "/", nil),
		crossSite,
	)
	for _, req := range reqs {
		t.Run(req.Method+" "+req.URL.Path, func(t *testing.T) {
			res, _ := do(t, s.Handler(), req)
			for h, want := range map[string]string{
				"Content-Security-Policy": "default-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'",
				"X-Content-Type-Options":  "nosniff",
				"Referrer-Policy":         "same-origin",
			} {
				if got := res.Header.Get(h); got != want {
					t.Errorf("%s = %q, want %q (status %d)", h, got, want, res.StatusCode)
				}
			}
			if res.Header.Get("X-Request-Id") == "" {
				t.Error("no X-Request-Id")
			}
		})
	}
}

func TestNoInlineScriptOrStyle(t *testing.T) {
	// The CSP forbids inline script and style; a template that used them
	// would silently break in browsers.
	check := func(path, body string) {
		t.Helper()
		for _, bad := range []string{"<script", "<style", "style=", "onclick=", "onload=", "javascript:"} {
			if strings.Contains(strings.ToLower(body), bad) {
				t.Errorf("%s contains %q", path, bad)
			}
		}
	}
	s, _ := MustNew(t, newFakeStore())
	for _, path := range []string{"/", "/signin", "/no/such/page"} {
		_, body := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("GET", path, nil)))
		check(path, body)
	}
	// The SVG-heavy pages: a projection's chart and the review's box
	// plots, where an inline style attribute would be easiest to slip in.
	cf := newCensusFixture(t)
	p := cf.mustProject(t, pNurseA, cf.a, "2026-03-02", cf.a.day, 4, 6, 3, 0)
	path := fmt.Sprintf("/wards/w-a/projections/%d", p.ID)
	res, body := cf.do(t, cf.as(t, pNurseA, httptest.NewRequest("GET", path, nil)))
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "<svg") {
		t.Fatalf("%s: status %d, svg %v", path, res.StatusCode, strings.Contains(body, "<svg"))
	}
	check(path, body)
	rf := newReviewFixture(t)
	path = "/wards/" + demo.WardCode + "/review?weeks=10"
	res, body = rf.do(t, rf.as(t, pAdmin, httptest.NewRequest("GET", path, nil)))
	if res.StatusCode != http.StatusOK || !strings.Contains(body, "<svg") {
		t.Fatalf("%s: status %d, svg %v", path, res.StatusCode, strings.Contains(body, "<svg"))
	}
	check(path, body)
}

func TestRequestIDIsOurs(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	req := httptest.NewRequest("GET", "/healthz", nil)
	req.Header.Set("X-Request-Id", "forged")
	res1, _ := do(t, s.Handler(), req)
	res2, _ := do(t, s.Handler(), httptest.NewRequest("GET", "/healthz", nil))
	id1, id2 := res1.Header.Get("X-Request-Id"), res2.Header.Get("X-Request-Id")
	if id1 == "forged" || id1 == "" || id1 == id2 {
		t.Errorf("request ids %q, %q: want fresh, distinct, not the client's", id1, id2)
	}
}

// readBody is a test route that reads the whole body, as a form handler will.
func readBody(w http.ResponseWriter, r *http.Request) error {
	if _, err := io.Copy(io.Discard, r.Body); err != nil {
		return err
	}
	_, err := io.WriteString(w, "read")
	return err
}

func TestBodyLimit(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	limit := s.cfg.MaxBodyBytes
	if limit != 1<<20 {
		t.Fatalf("default MaxBodyBytes = %d, want 1 MiB", limit)
	}
	h := withRoutes(s,
		Route{Method: "POST", Pattern: "/test/body", Name: "t", Access: Access{Public: true}, Handler: readBody},
		Route{Method: "POST", Pattern: "/test/upload", Name: "u", Access: Access{Public: true}, Handler: readBody, MaxBodyBytes: 2 * limit},
	)
	for _, tc := range []struct {
		name       string
		path       string
		size       int64
		declared   bool // send Content-Length
		wantStatus int
	}{
		{"at limit", "/test/body", limit, true, 200},
		{"over limit, declared", "/test/body", limit + 1, true, 413},
		{"at limit, chunked", "/test/body", limit, false, 200},
		{"over limit, chunked", "/test/body", limit + 1, false, 413},
		{"route with a larger limit", "/test/upload", 2 * limit, false, 200},
		{"over a route's larger limit", "/test/upload", 2*limit + 1, false, 413},
	} {
		t.Run(tc.name, func(t *testing.T) {
			// io.MultiReader hides the length from httptest, so the body is
			// sent without a Content-Length.
			var body io.Reader = bytes.NewReader(bytes.Repeat([]byte("a"), int(tc.size)))
			if !tc.declared {
				body = io.MultiReader(body)
			}
			req := httptest.NewRequest("POST", tc.path, body)
			if tc.declared != (req.ContentLength == tc.size) {
				t.Fatalf("ContentLength = %d, declared %v", req.ContentLength, tc.declared)
			}
			res, _ := do(t, h, req)
			if res.StatusCode != tc.wantStatus {
				t.Errorf("status = %d, want %d", res.StatusCode, tc.wantStatus)
			}
		})
	}
}

func TestCrossSitePostRefused(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	h := withRoutes(s, Route{Method: "POST", Pattern: "/test/body", Name: "t", Access: Access{Public: true}, Handler: readBody})
	for _, tc := range []struct {
		name       string
		method     string
		site       string
		wantStatus int
	}{
		{"cross-site POST", "POST", "cross-site", 403},
		{"same-site POST", "POST", "same-site", 403},
		{"same-origin POST", "POST", "same-origin", 200},
		{"no header (not a browser)", "POST", "", 200},
		{"cross-site GET", "GET", "cross-site", 405}, // safe method passes the check, then the route says POST only
	} {
		t.Run(tc.name, func(t *testing.T) {
			req := httptest.NewRequest(tc.method, "/test/body", strings.NewReader("a=1"))
			if tc.site != "" {
				req.Header.Set("Sec-Fetch-Site", tc.site)
			}
			res, body := do(t, h, req)
			if res.StatusCode != tc.wantStatus {
				t.Errorf("status = %d, want %d", res.StatusCode, tc.wantStatus)
			}
			if tc.wantStatus == 403 && len(byTestID(t, body, "error-message")) != 1 {
				t.Errorf("refusal is not the error page: %q", body)
			}
		})
	}
}
