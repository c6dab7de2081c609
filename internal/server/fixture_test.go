package server

import (
	"context"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/alexedwards/scs/sqlite3store"

	"wardload/internal/password"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// testPassword are the argon2id parameters of the tests' servers and
// users: production parameters cost 64 MiB per hash; the hash itself is
// tested in internal/password.
var testPassword = password.Params{MemoryKiB: 64, Time: 1, Threads: 1, SaltLen: 16, KeyLen: 32}

func TestMain(m *testing.M) {
	code := m.Run()
	if demoTemplate.dir != "" {
		os.RemoveAll(demoTemplate.dir)
	}
	os.Exit(code)
}

// testClock is a settable clock for sessions and throttling.
type testClock struct {
	mu sync.Mutex
	t  time.Time
}

func (c *testClock) Now() time.Time {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.t
}

func (c *testClock) Add(d time.Duration) {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.t = c.t.Add(d)
}

// fixture is a real server on SQLite with the database-backed session
// store, two wards and one user per principal of the access test.
type fixture struct {
	st    *sqlite.Store
	s     *Server
	h     http.Handler
	clock *testClock
	logs  *logBuffer

	wardA, wardB *wardload.Ward
	users        map[string]*wardload.User // by principal name
	passwords    map[string]string         // by user name
}

// Principals of the access test, other than the signed-out visitor.
const (
	pNurseA   = "nurse of A"
	pManagerA = "manager of A"
	pAdmin    = "admin"
	pManagerB = "manager of B" // member of another ward
	pStaffA   = "staffing office of A"
)

func newFixture(tb testing.TB) *fixture {
	tb.Helper()
	return newFixtureOn(tb, MustOpenSQLite(tb))
}

// newFixtureOn is newFixture on the migrated store st.
func newFixtureOn(tb testing.TB, st *sqlite.Store) *fixture {
	tb.Helper()
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	f := &fixture{st: st, clock: &testClock{t: time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)},
		users: map[string]*wardload.User{}, passwords: map[string]string{}, logs: &logBuffer{}}
	f.wardA = &wardload.Ward{Code: "w-a", Name: "Ward A", TimeZone: "Europe/Dublin"}
	f.wardB = &wardload.Ward{Code: "w-b", Name: "Ward B", TimeZone: "Europe/Dublin"}
	for _, w := range []*wardload.Ward{f.wardA, f.wardB} {
		if err := f.st.CreateWard(ctx, w); err != nil {
			tb.Fatal(err)
		}
	}
	for _, u := range []struct {
		p, name, role string
		wards         []int64
	}{
		{pNurseA, "n.nurse", wardload.RoleChargeNurse, []int64{f.wardA.ID}},
		{pManagerA, "m.manager", wardload.RoleManager, []int64{f.wardA.ID}},
		{pAdmin, "a.admin", wardload.RoleAdmin, nil},
		{pManagerB, "o.other", wardload.RoleManager, []int64{f.wardB.ID}},
		{pStaffA, "s.office", wardload.RoleStaffingOffice, []int64{f.wardA.ID}},
	} {
		pw := "pw of " + u.name + " 7c1e"
		f.MustUser(tb, u.p, u.name, u.role, pw, u.wards...)
	}

	cfg := DefaultConfig()
	cfg.Password = testPassword
	cfg.Store = f.st
	cfg.Logger = slog.New(slog.NewTextHandler(f.logs, &slog.HandlerOptions{Level: slog.LevelDebug}))
	cfg.Now = f.clock.Now
	store := sqlite3store.NewWithCleanupInterval(f.st.DB(), 0)
	cfg.SessionStore = store
	s, err := New(cfg)
	if err != nil {
		tb.Fatal(err)
	}
	f.s, f.h = s, s.Handler()
	return f
}

// MustUser creates a user; p names the principal ("" for none).
func (f *fixture) MustUser(tb testing.TB, p, name, role, pw string, wards ...int64) *wardload.User {
	tb.Helper()
	h, err := testPassword.Hash(pw)
	if err != nil {
		tb.Fatal(err)
	}
	u := &wardload.User{Name: name, Role: role, PasswordHash: h, WardIDs: wards}
	if err := f.st.CreateUser(wardload.WithActor(context.Background(), wardload.Actor{Name: "test"}), u); err != nil {
		tb.Fatal(err)
	}
	if p != "" {
		f.users[p] = u
	}
	f.passwords[name] = pw
	return u
}

// MustToken creates a token for wards and returns its secret.
func (f *fixture) MustToken(tb testing.TB, name string, wards ...int64) (string, *wardload.APIToken) {
	tb.Helper()
	secret, hash := NewTokenSecret()
	t := &wardload.APIToken{Name: name, Hash: hash, WardIDs: wards}
	if err := f.st.CreateToken(wardload.WithActor(context.Background(), wardload.Actor{Name: "test"}), t); err != nil {
		tb.Fatal(err)
	}
	return secret, t
}

// MustWriteToken creates a token for wards that may also send planned
// staff, and returns its secret.
func (f *fixture) MustWriteToken(tb testing.TB, name string, wards ...int64) (string, *wardload.APIToken) {
	tb.Helper()
	secret, hash := NewTokenSecret()
	t := &wardload.APIToken{Name: name, Hash: hash, WardIDs: wards, WriteStaffing: true}
	if err := f.st.CreateToken(wardload.WithActor(context.Background(), wardload.Actor{Name: "test"}), t); err != nil {
		tb.Fatal(err)
	}
	return secret, t
}

// do sends req through the real handler.
func (f *fixture) do(tb testing.TB, req *http.Request) (*http.Response, string) {
	tb.Helper()
	return do(tb, f.h, req)
}

// as returns req with a fresh session of principal p ("" for none).
func (f *fixture) as(tb testing.TB, p string, req *http.Request) *http.Request {
	tb.Helper()
	if p != "" {
		req.AddCookie(MustSession(tb, f.s, f.users[p].ID))
	}
	return req
}

// post returns a form POST request.
func post(path string, form url.Values) *http.Request {
	req := httptest.NewRequest("POST", path, strings.NewReader(form.Encode()))
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	return req
}

// sessionCookie returns the session cookie a response sets, or nil.
func (f *fixture) sessionCookie(res *http.Response) *http.Cookie {
	for _, c := range res.Cookies() {
		if c.Name == f.s.sessions.Cookie.Name {
			return c
		}
	}
	return nil
}

// audit returns the audit entries with action.
func (f *fixture) audit(tb testing.TB, action string) []*wardload.AuditEntry {
	tb.Helper()
	es, _, err := f.st.FindAudit(context.Background(), wardload.AuditFilter{Action: &action})
	if err != nil {
		tb.Fatal(err)
	}
	return es
}
