package server

import (
	"context"
	"errors"
	"io"
	"math"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"github.com/a-h/templ"
)

func TestRenderFailureSendsNoHalfPage(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	h := withRoutes(s, Route{Method: "GET", Pattern: "/test/broken", Name: "t", Access: Access{Public: true},
		Handler: func(w http.ResponseWriter, r *http.Request) error {
			return s.render(w, r, http.StatusOK, halfPage{})
		}})
	res, body := do(t, h, httptest.NewRequest("GET", "/test/broken", nil))
	if res.StatusCode != 500 {
		t.Errorf("status = %d, want 500", res.StatusCode)
	}
	if strings.Contains(body, "HALF-WRITTEN") {
		t.Error("the part rendered before the failure was sent")
	}
	if got := byTestID(t, body, "error-message"); !slices.Equal(got, []string{"Internal error."}) {
		t.Errorf("error-message = %q", got)
	}
}

// halfPage writes some output and then fails, like a component whose data
// turns out to be bad halfway through.
type halfPage struct{}

var _ templ.Component = halfPage{}

func (halfPage) Render(ctx context.Context, w io.Writer) error {
	w.Write([]byte("<p>HALF-WRITTEN</p>"))
	return errors.New("component failed")
}

func TestWriteJSONAndSeeOther(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	h := withRoutes(s,
		Route{Method: "GET", Pattern: "/api/test/ok", Name: "j", Access: Access{Public: true},
			Handler: func(w http.ResponseWriter, r *http.Request) error {
				return writeJSON(w, http.StatusOK, map[string]int{"wards": 2})
			}},
		Route{Method: "GET", Pattern: "/api/test/nan", Name: "n", Access: Access{Public: true},
			Handler: func(w http.ResponseWriter, r *http.Request) error {
				return writeJSON(w, http.StatusOK, map[string]float64{"x": math.NaN()})
			}},
		Route{Method: "POST", Pattern: "/test/save", Name: "p", Access: Access{Public: true},
			Handler: func(w http.ResponseWriter, r *http.Request) error { return seeOther(w, r, "/") }},
	)
	res, body := do(t, h, httptest.NewRequest("GET", "/api/test/ok", nil))
	if res.StatusCode != 200 || body != "{\"wards\":2}\n" || res.Header.Get("Content-Type") != "application/json; charset=utf-8" {
		t.Errorf("writeJSON: %d %q %q", res.StatusCode, res.Header.Get("Content-Type"), body)
	}
	// NaN cannot be encoded: the adapter answers 500 JSON, not a broken body.
	res, body = do(t, h, httptest.NewRequest("GET", "/api/test/nan", nil))
	if res.StatusCode != 500 || !strings.Contains(body, `"code":"internal"`) {
		t.Errorf("writeJSON NaN: %d %q", res.StatusCode, body)
	}
	res, _ = do(t, h, httptest.NewRequest("POST", "/test/save", nil))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/" {
		t.Errorf("seeOther: %d %q", res.StatusCode, res.Header.Get("Location"))
	}
}
