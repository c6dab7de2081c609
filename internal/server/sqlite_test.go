package server

import (
	"context"
	"net/http/httptest"
	"path/filepath"
	"slices"
	"testing"
	"time"

	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// MustOpenSQLite returns a migrated SQLite store in a temporary directory.
func MustOpenSQLite(tb testing.TB) *sqlite.Store {
	tb.Helper()
	return mustOpenSQLiteAt(tb, filepath.Join(tb.TempDir(), "wardload.db"))
}

// mustOpenSQLiteAt opens and migrates the SQLite file at path, with the
// fixtures' fixed clock.
func mustOpenSQLiteAt(tb testing.TB, path string) *sqlite.Store {
	tb.Helper()
	ctx := context.Background()
	now := func() time.Time { return time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC) }
	st, err := sqlite.Open(ctx, sqlite.Config{Path: path, Now: now})
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { st.Close() })
	if err := st.Migrate(ctx); err != nil {
		tb.Fatal(err)
	}
	return st
}

func TestHomeWithSQLite(t *testing.T) {
	st := MustOpenSQLite(t)
	ctx := context.Background()
	// Created out of code order: the page lists by code, as FindWards does.
	for _, w := range []*wardload.Ward{
		{Code: "w9-south", Name: "Ward 9 South", TimeZone: "Australia/Perth"},
		{Code: "w2-north", Name: "Ward 2 North", TimeZone: "Europe/Dublin"},
	} {
		if err := st.CreateWard(ctx, w); err != nil {
			t.Fatal(err)
		}
	}
	admin := &wardload.User{Name: "a.admin", Role: wardload.RoleAdmin, PasswordHash: "x"}
	if err := st.CreateUser(ctx, admin); err != nil {
		t.Fatal(err)
	}
	s, _ := MustNew(t, st)
	res, body := do(t, s.Handler(), asUser(t, s, admin.ID, httptest.NewRequest("GET", "/", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status = %d", res.StatusCode)
	}
	for _, c := range []struct {
		id   string
		want []string
	}{
		{"ward-code", []string{"w2-north", "w9-south"}},
		{"ward-name", []string{"Ward 2 North", "Ward 9 South"}},
		{"ward-tz", []string{"Europe/Dublin", "Australia/Perth"}},
	} {
		if got := byTestID(t, body, c.id); !slices.Equal(got, c.want) {
			t.Errorf("%s = %q, want %q", c.id, got, c.want)
		}
	}
}

func TestReadyzWithSQLite(t *testing.T) {
	st := MustOpenSQLite(t)
	s, _ := MustNew(t, st)
	if res, _ := do(t, s.Handler(), httptest.NewRequest("GET", "/readyz", nil)); res.StatusCode != 200 {
		t.Errorf("open store: /readyz = %d, want 200", res.StatusCode)
	}
	st.Close()
	if res, _ := do(t, s.Handler(), httptest.NewRequest("GET", "/readyz", nil)); res.StatusCode != 503 {
		t.Errorf("closed store: /readyz = %d, want 503", res.StatusCode)
	}
}
