package server

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// withRoutes returns the server's full handler with extra routes added to
// its table, so adapter and middleware tests go through the real chain.
// Extra routes must pass the same checkAccess as New, so a test cannot
// exercise a declaration the server would refuse.
func withRoutes(s *Server, extra ...Route) http.Handler {
	for _, rt := range extra {
		if !checkAccess(rt) {
			panic(fmt.Sprintf("withRoutes: route %s %s has no valid Access declaration", rt.Method, rt.Pattern))
		}
	}
	return s.router(append(s.Routes(), extra...))
}

func failing(err error) handlerFunc {
	return func(http.ResponseWriter, *http.Request) error { return err }
}

func TestErrorAdapterHTML(t *testing.T) {
	for _, tc := range []struct {
		name        string
		err         error
		wantStatus  int
		wantMessage string
		notInBody   string
	}{
		{"invalid", wardload.FieldErrorf(wardload.EINVALID, "beds", "Beds must be between 0 (not set) and 1000."),
			400, "Beds must be between 0 (not set) and 1000.", ""},
		{"wrapped invalid", fmt.Errorf("save settings: %w", wardload.Errorf(wardload.EINVALID, "Lookback must be 1 to 104 weeks.")),
			400, "Lookback must be 1 to 104 weeks.", "save settings"},
		{"not found", wardload.Errorf(wardload.ENOTFOUND, "No such ward."), 404, "No such ward.", ""},
		{"conflict", wardload.Errorf(wardload.ECONFLICT, "Code taken."), 409, "Code taken.", ""},
		{"unauthorized", wardload.Errorf(wardload.EUNAUTHORIZED, "Please sign in."), 401, "Please sign in.", ""},
		{"forbidden", wardload.Errorf(wardload.EFORBIDDEN, "Not your ward."), 403, "Not your ward.", ""},
		{"too many", wardload.Errorf(wardload.ETOOMANY, "Slow down."), 429, "Slow down.", ""},
		{"internal code", wardload.Errorf(wardload.EINTERNAL, "Internal error."), 500, "Internal error.", ""},
		{"raw error", errors.New("pq: password authentication failed for user secret"),
			500, "Internal error.", "password authentication"},
		{"unknown code", &wardload.Error{Code: "bogus", Message: "Odd."}, 500, "Odd.", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s, logs := MustNew(t, newFakeStore())
			h := withRoutes(s, Route{Method: "GET", Pattern: "/test/fail", Name: "t", Access: Access{Public: true}, Handler: failing(tc.err)})
			res, body := do(t, h, httptest.NewRequest("GET", "/test/fail", nil))
			if res.StatusCode != tc.wantStatus {
				t.Errorf("status = %d, want %d", res.StatusCode, tc.wantStatus)
			}
			if ct := res.Header.Get("Content-Type"); ct != "text/html; charset=utf-8" {
				t.Errorf("Content-Type = %q", ct)
			}
			if got := byTestID(t, body, "error-message"); !slices.Equal(got, []string{tc.wantMessage}) {
				t.Errorf("error-message = %q, want %q", got, tc.wantMessage)
			}
			if tc.notInBody != "" && strings.Contains(body, tc.notInBody) {
				t.Errorf("body contains internal text %q", tc.notInBody)
			}
			// One request line, at ERROR with the error when it was internal.
			logged := strings.Contains(logs.String(), "level=ERROR msg=request") && strings.Contains(logs.String(), " err=")
			if logged != (tc.wantStatus == 500) {
				t.Errorf("internal error logged = %v, want %v:\n%s", logged, tc.wantStatus == 500, logs)
			}
		})
	}
}

func TestErrorAdapterJSON(t *testing.T) {
	for _, tc := range []struct {
		name       string
		err        error
		wantStatus int
		want       apiErrorBody
	}{
		{"invalid with field", wardload.FieldErrorf(wardload.EINVALID, "cover_level", "Cover level must be between 0 and 1 (for example 0.9)."),
			400, apiErrorBody{Code: "invalid", Message: "Cover level must be between 0 and 1 (for example 0.9).", Field: "cover_level"}},
		{"not found", wardload.Errorf(wardload.ENOTFOUND, "No such ward."),
			404, apiErrorBody{Code: "not_found", Message: "No such ward."}},
		{"raw error", errors.New("connection reset by peer 10.0.0.7"),
			500, apiErrorBody{Code: "internal", Message: "Internal error."}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s, _ := MustNew(t, newFakeStore())
			h := withRoutes(s, Route{Method: "GET", Pattern: "/api/test/fail", Name: "t", Access: Access{Public: true}, Handler: failing(tc.err)})
			res, body := do(t, h, httptest.NewRequest("GET", "/api/test/fail", nil))
			if res.StatusCode != tc.wantStatus {
				t.Errorf("status = %d, want %d", res.StatusCode, tc.wantStatus)
			}
			if ct := res.Header.Get("Content-Type"); ct != "application/json; charset=utf-8" {
				t.Errorf("Content-Type = %q", ct)
			}
			var got apiError
			if err := json.Unmarshal([]byte(body), &got); err != nil {
				t.Fatalf("body %q: %v", body, err)
			}
			if got.Error != tc.want {
				t.Errorf("error = %+v, want %+v", got.Error, tc.want)
			}
			if strings.Contains(body, "10.0.0.7") {
				t.Error("internal error text reached the response")
			}
		})
	}
}

func TestNotFoundAndMethodNotAllowed(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	res, body := do(t, s.Handler(), httptest.NewRequest("GET", "/no/such/page", nil))
	if res.StatusCode != 404 || len(byTestID(t, body, "error-message")) != 1 {
		t.Errorf("GET unknown page = %d, want 404 error page", res.StatusCode)
	}
	res, body = do(t, s.Handler(), httptest.NewRequest("GET", "/api/nothing", nil))
	if res.StatusCode != 404 || !strings.Contains(body, `"code":"not_found"`) {
		t.Errorf("GET unknown API path = %d %s, want 404 JSON", res.StatusCode, body)
	}
	res, _ = do(t, s.Handler(), httptest.NewRequest("POST", "/healthz", nil))
	if res.StatusCode != 405 {
		t.Errorf("POST /healthz = %d, want 405", res.StatusCode)
	}
	if got := res.Header.Values("Allow"); !slices.Equal(got, []string{"GET", "HEAD"}) {
		t.Errorf("Allow = %q, want [GET HEAD]", got)
	}
}

func TestHeadAnsweredByGet(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	// net/http drops a HEAD response's body itself; the router's part is
	// to route HEAD to the GET handler instead of answering 405.
	res, _ := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("HEAD", "/", nil)))
	if res.StatusCode != 200 || res.Header.Get("Content-Type") != "text/html; charset=utf-8" {
		t.Errorf("HEAD / = %d %q, want 200 text/html", res.StatusCode, res.Header.Get("Content-Type"))
	}
}

func TestPanicIsA500WithoutDetail(t *testing.T) {
	s, logs := MustNew(t, newFakeStore())
	h := withRoutes(s, Route{Method: "GET", Pattern: "/test/panic", Name: "t", Access: Access{Public: true},
		Handler: func(http.ResponseWriter, *http.Request) error { panic("secret detail in panic") }})
	res, body := do(t, h, httptest.NewRequest("GET", "/test/panic", nil))
	if res.StatusCode != 500 {
		t.Errorf("status = %d, want 500", res.StatusCode)
	}
	if strings.Contains(body, "secret detail") || strings.Contains(body, "goroutine") {
		t.Error("panic detail reached the page")
	}
	if got := byTestID(t, body, "error-message"); !slices.Equal(got, []string{"Internal error."}) {
		t.Errorf("error-message = %q", got)
	}
	if l := logs.String(); !strings.Contains(l, "secret detail in panic") || !strings.Contains(l, "stack=") {
		t.Errorf("panic not logged with stack:\n%s", l)
	}
}

func TestErrorAfterWriteKeepsResponse(t *testing.T) {
	s, logs := MustNew(t, newFakeStore())
	h := withRoutes(s, Route{Method: "GET", Pattern: "/test/late", Name: "t", Access: Access{Public: true},
		Handler: func(w http.ResponseWriter, r *http.Request) error {
			io.WriteString(w, "partial")
			return errors.New("late failure")
		}})
	res, body := do(t, h, httptest.NewRequest("GET", "/test/late", nil))
	if res.StatusCode != 200 || body != "partial" {
		t.Errorf("got %d %q, want the already-written 200 \"partial\"", res.StatusCode, body)
	}
	if !strings.Contains(logs.String(), "late failure") {
		t.Error("late failure not logged")
	}
}
