package server

import (
	"context"
	"errors"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"wardload/internal/wardload"
	"wardload/web"
)

func TestHomeListsWards(t *testing.T) {
	st := newFakeStore()
	st.FindWardsFn = func(context.Context, wardload.WardFilter) ([]*wardload.Ward, int, error) {
		return []*wardload.Ward{
			{ID: 1, Code: "w4-north", Name: "Ward 4 North", TimeZone: "Europe/Dublin"},
			{ID: 2, Code: "w7", Name: "Ward 7 <Surgical>", TimeZone: "America/Chicago"},
		}, 2, nil
	}
	s, _ := MustNew(t, st)
	res, body := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("GET", "/", nil)))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("status = %d, want 200", res.StatusCode)
	}
	if ct := res.Header.Get("Content-Type"); ct != "text/html; charset=utf-8" {
		t.Errorf("Content-Type = %q", ct)
	}
	for _, c := range []struct {
		id   string
		want []string
	}{
		{"ward-code", []string{"w4-north", "w7"}},
		{"ward-name", []string{"Ward 4 North", "Ward 7 <Surgical>"}},
		{"ward-tz", []string{"Europe/Dublin", "America/Chicago"}},
		{"wards-empty", nil},
		{"caution", []string{web.Caution}},
	} {
		if got := byTestID(t, body, c.id); !slices.Equal(got, c.want) {
			t.Errorf("%s = %q, want %q", c.id, got, c.want)
		}
	}
	if strings.Contains(body, "<Surgical>") {
		t.Error("ward name not HTML-escaped")
	}
}

func TestHomeEmpty(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	res, body := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("GET", "/", nil)))
	if res.StatusCode != http.StatusOK {
		t.Fatalf("status = %d, want 200", res.StatusCode)
	}
	if got := byTestID(t, body, "wards-empty"); len(got) != 1 || !strings.Contains(got[0], "No wards") {
		t.Errorf("empty state = %q", got)
	}
	if got := byTestID(t, body, "ward-row"); len(got) != 0 {
		t.Errorf("rows on empty list: %q", got)
	}
}

func TestHomeStoreFailureIsInternal(t *testing.T) {
	st := newFakeStore()
	st.FindWardsFn = func(context.Context, wardload.WardFilter) ([]*wardload.Ward, int, error) {
		return nil, 0, errors.New("SQL logic error: no such table: wards")
	}
	s, logs := MustNew(t, st)
	res, body := do(t, s.Handler(), asUser(t, s, fakeAdmin.ID, httptest.NewRequest("GET", "/", nil)))
	if res.StatusCode != http.StatusInternalServerError {
		t.Errorf("status = %d, want 500", res.StatusCode)
	}
	if strings.Contains(body, "no such table") {
		t.Error("internal error text reached the page")
	}
	if got := byTestID(t, body, "error-message"); !slices.Equal(got, []string{"Internal error."}) {
		t.Errorf("error-message = %q", got)
	}
	id := res.Header.Get("X-Request-Id")
	if got := byTestID(t, body, "request-id"); !slices.Equal(got, []string{id}) {
		t.Errorf("request-id on page = %q, header %q", got, id)
	}
	if l := logs.String(); !strings.Contains(l, "no such table") || !strings.Contains(l, "request_id="+id) {
		t.Errorf("log lacks the internal error with its request id:\n%s", l)
	}
}

// Signed out, the home page answers 200 with the wards' codes and names and
// a sign-in link, and no links into ward pages or any figures.
func TestHomeSignedOut(t *testing.T) {
	f := newFixture(t)
	res, body := f.do(t, httptest.NewRequest("GET", "/", nil))
	if res.StatusCode != 200 {
		t.Fatalf("status %d, want 200", res.StatusCode)
	}
	if got := byTestID(t, body, "ward-code"); !slices.Equal(got, []string{"w-a", "w-b"}) {
		t.Errorf("ward codes %q", got)
	}
	if len(byTestID(t, body, "home-signin-link")) != 1 || len(byTestID(t, body, "user-name")) != 0 {
		t.Error("no sign-in link, or a user shown")
	}
	for _, id := range []string{"ward-census", "ward-projections", "ward-review", "ward-settings", "ward-tokens"} {
		if n := len(byTestID(t, body, id)); n != 0 {
			t.Errorf("signed-out page links %s (%d)", id, n)
		}
	}
}
