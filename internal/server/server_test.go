package server

import (
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"golang.org/x/net/html"

	"wardload/internal/wardload"
)

// fakeStore is a function-field fake of wardload.Store. Methods the server
// does not call are left to the embedded nil interface, so an unexpected
// call panics and fails the test.
type fakeStore struct {
	wardload.Store
	FindWardsFn    func(ctx context.Context, f wardload.WardFilter) ([]*wardload.Ward, int, error)
	PingFn         func(ctx context.Context) error
	FindUserByIDFn func(ctx context.Context, id int64) (*wardload.User, error)
}

func (f *fakeStore) FindUserByID(ctx context.Context, id int64) (*wardload.User, error) {
	return f.FindUserByIDFn(ctx, id)
}

func (f *fakeStore) FindWards(ctx context.Context, fl wardload.WardFilter) ([]*wardload.Ward, int, error) {
	return f.FindWardsFn(ctx, fl)
}

func (f *fakeStore) Ping(ctx context.Context) error { return f.PingFn(ctx) }

// PurgeSignInAttempts has nothing to purge: Serve's maintenance calls it.
func (f *fakeStore) PurgeSignInAttempts(context.Context, time.Time, int) (int, error) { return 0, nil }

// fakeAdmin is the one user of newFakeStore, with ID 1.
var fakeAdmin = wardload.User{ID: 1, Name: "a.admin", Role: wardload.RoleAdmin, PasswordHash: "x"}

// newFakeStore returns a store with no wards and one admin that answers
// pings.
func newFakeStore() *fakeStore {
	return &fakeStore{
		FindWardsFn: func(context.Context, wardload.WardFilter) ([]*wardload.Ward, int, error) { return nil, 0, nil },
		PingFn:      func(context.Context) error { return nil },
		FindUserByIDFn: func(_ context.Context, id int64) (*wardload.User, error) {
			if id != fakeAdmin.ID {
				return nil, wardload.Errorf(wardload.ENOTFOUND, "User not found.")
			}
			u := fakeAdmin
			return &u, nil
		},
	}
}

// MustSession returns a session cookie of s for user id, as if they had
// signed in at s's clock time, written straight to the session store.
func MustSession(tb testing.TB, s *Server, userID int64) *http.Cookie {
	tb.Helper()
	ctx, err := s.sessions.Load(context.Background(), "")
	if err != nil {
		tb.Fatal(err)
	}
	s.sessions.Put(ctx, sessUserID, userID)
	s.sessions.Put(ctx, sessAuthAt, s.now().Unix())
	s.sessions.Put(ctx, sessSeenAt, s.now().Unix())
	token, _, err := s.sessions.Commit(ctx)
	if err != nil {
		tb.Fatal(err)
	}
	return &http.Cookie{Name: s.sessions.Cookie.Name, Value: token}
}

// asUser returns req with a session cookie for user id.
func asUser(tb testing.TB, s *Server, userID int64, req *http.Request) *http.Request {
	tb.Helper()
	req.AddCookie(MustSession(tb, s, userID))
	return req
}

// logBuffer collects log output for assertions; handlers log from the
// request goroutine, so writes are locked.
type logBuffer struct {
	mu sync.Mutex
	b  strings.Builder
}

func (l *logBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *logBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// MustNew returns a server over st with a fixed clock, and its log.
func MustNew(tb testing.TB, st wardload.Store) (*Server, *logBuffer) {
	tb.Helper()
	logs := &logBuffer{}
	cfg := DefaultConfig()
	cfg.Password = testPassword
	cfg.Store = st
	cfg.Logger = slog.New(slog.NewTextHandler(logs, &slog.HandlerOptions{Level: slog.LevelDebug}))
	cfg.Now = func() time.Time { return time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC) }
	s, err := New(cfg)
	if err != nil {
		tb.Fatal(err)
	}
	return s, logs
}

// do sends req through h and returns the recorded response and its body.
func do(tb testing.TB, h http.Handler, req *http.Request) (*http.Response, string) {
	tb.Helper()
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	res := rec.Result()
	body, err := io.ReadAll(res.Body)
	if err != nil {
		tb.Fatal(err)
	}
	return res, string(body)
}

// byTestID returns the text of every element with data-testid=id.
func byTestID(tb testing.TB, page, id string) []string {
	tb.Helper()
	doc, err := html.Parse(strings.NewReader(page))
	if err != nil {
		tb.Fatal(err)
	}
	var out []string
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			for _, a := range n.Attr {
				if a.Key == "data-testid" && a.Val == id {
					out = append(out, strings.Join(strings.Fields(text(n)), " "))
				}
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	return out
}

func text(n *html.Node) string {
	if n.Type == html.TextNode {
		return n.Data
	}
	var b strings.Builder
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		b.WriteString(text(c))
	}
	return b.String()
}

func TestNewRequiresStoreAndLogger(t *testing.T) {
	cfg := DefaultConfig()
	cfg.Password = testPassword
	if _, err := New(cfg); err == nil {
		t.Error("New without Store: want error")
	}
	cfg.Store = newFakeStore()
	if _, err := New(cfg); err == nil {
		t.Error("New without Logger: want error")
	}
}

func TestRoutesTableIsWhatIsServed(t *testing.T) {
	s, _ := MustNew(t, newFakeStore())
	got := map[string]bool{}
	for _, rt := range s.Routes() {
		key := rt.Method + " " + rt.Pattern
		if got[key] {
			t.Errorf("route %s listed twice", key)
		}
		got[key] = true
		if rt.Name == "" || rt.Handler == nil {
			t.Errorf("route %s: missing name or handler", key)
		}
		if !checkAccess(rt) {
			t.Errorf("route %s: no valid Access declaration", key)
		}
	}
	// The expectations of every route live in access_test.go; here only
	// that the routes before the accounts work are still served.
	for _, k := range []string{"GET /", "GET /healthz", "GET /readyz", "GET /static/*"} {
		if !got[k] {
			t.Errorf("missing route %s", k)
		}
	}
	// Mutating the copy must not change the server's table.
	rs := s.Routes()
	i := slices.IndexFunc(rs, func(r Route) bool { return len(r.Access.Roles) > 0 })
	rs[i].Access.Roles[0] = "x"
	if s.Routes()[i].Access.Roles[0] == "x" {
		t.Error("Routes returned the table itself, not a copy")
	}
}

func TestNewRefusesUndeclaredRoute(t *testing.T) {
	for _, a := range []Access{{}, {WardScoped: true}, {Public: true, API: true}, {Roles: []string{"nurse"}},
		{API: true, Roles: allRoles}, {Roles: allRoles, WardScoped: true},
		{NoSession: true}, {API: true, NoSession: true}, {Roles: allRoles, NoSession: true}} {
		if checkAccess(Route{Method: "GET", Pattern: "/x", Access: a}) {
			t.Errorf("checkAccess(%+v) = true, want false", a)
		}
	}
	if !checkAccess(Route{Method: "GET", Pattern: "/wards/{ward}/x", Access: Access{Roles: allRoles, WardScoped: true}}) {
		t.Error("ward-scoped route with {ward} refused")
	}
}

func TestServeAndShutdown(t *testing.T) {
	cfg := DefaultConfig()
	cfg.Password = testPassword
	cfg.Addr = "127.0.0.1:0"
	cfg.Store = newFakeStore()
	cfg.Logger = slog.New(slog.NewTextHandler(io.Discard, nil))
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	if s.URL() != "" {
		t.Errorf("URL before Listen = %q, want empty", s.URL())
	}
	if err := s.Listen(); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(s.URL(), "http://127.0.0.1:") || strings.HasSuffix(s.URL(), ":0") {
		t.Fatalf("URL = %q, want the real port", s.URL())
	}
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- s.Serve(ctx) }()
	res, err := http.Get(s.URL() + "/healthz")
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.StatusCode != http.StatusOK {
		t.Errorf("GET /healthz = %d, want 200", res.StatusCode)
	}
	cancel()
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("Serve after cancel: %v", err)
		}
	case <-time.After(10 * time.Second):
		t.Fatal("Serve did not return after cancel")
	}
}

func TestListenPortInUse(t *testing.T) {
	a, _ := MustNew(t, newFakeStore())
	a.cfg.Addr = "127.0.0.1:0"
	if err := a.Listen(); err != nil {
		t.Fatal(err)
	}
	defer a.ln.Close()
	b, _ := MustNew(t, newFakeStore())
	b.cfg.Addr = strings.TrimPrefix(a.URL(), "http://")
	if err := b.Listen(); err == nil {
		b.ln.Close()
		t.Fatal("second Listen on the same port: want error")
	}
}
