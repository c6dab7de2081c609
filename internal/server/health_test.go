package server

import (
	"context"
	"errors"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"
)

func TestHealthz(t *testing.T) {
	st := newFakeStore()
	st.PingFn = func(context.Context) error { return errors.New("database down") }
	s, _ := MustNew(t, st)
	// healthz must not depend on the database.
	res, body := do(t, s.Handler(), httptest.NewRequest("GET", "/healthz", nil))
	if res.StatusCode != http.StatusOK || body != "ok\n" {
		t.Errorf("GET /healthz = %d %q, want 200 \"ok\\n\"", res.StatusCode, body)
	}
}

func TestReadyz(t *testing.T) {
	for _, tc := range []struct {
		name       string
		ping       func(context.Context) error
		wantStatus int
		wantBody   string
		wantLog    string
	}{
		{"ok", func(context.Context) error { return nil }, http.StatusOK, "ok\n", ""},
		{"ping fails", func(context.Context) error { return errors.New("dial tcp: refused") },
			http.StatusServiceUnavailable, "not ready: database unreachable\n", "dial tcp: refused"},
		{"ping has a deadline", func(ctx context.Context) error {
			dl, ok := ctx.Deadline()
			if !ok || time.Until(dl) > 2*time.Second {
				return errors.New("no 2s deadline")
			}
			return nil
		}, http.StatusOK, "ok\n", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			st := newFakeStore()
			st.PingFn = tc.ping
			s, logs := MustNew(t, st)
			res, body := do(t, s.Handler(), httptest.NewRequest("GET", "/readyz", nil))
			if res.StatusCode != tc.wantStatus {
				t.Errorf("status = %d, want %d", res.StatusCode, tc.wantStatus)
			}
			if body != tc.wantBody {
				t.Errorf("body = %q, want %q", body, tc.wantBody)
			}
			if strings.Contains(body, "dial tcp") {
				t.Error("internal error text reached the response")
			}
			if tc.wantLog != "" && !strings.Contains(logs.String(), tc.wantLog) {
				t.Errorf("log lacks %q:\n%s", tc.wantLog, logs)
			}
		})
	}
}
