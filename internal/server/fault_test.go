package server

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/alexedwards/scs/v2/memstore"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// errAway is what a store returns while its database cannot be reached.
var errAway = wardload.Unavailable(wardload.EUNAVAILABLE, errors.New("dial tcp 127.0.0.1:5432: connect: connection refused"))

// tokenStore is the fake store with a token lookup.
type tokenStore struct {
	*fakeStore
	FindTokenByHashFn func(ctx context.Context, hash string) (*wardload.APIToken, error)
}

func (f *tokenStore) FindTokenByHash(ctx context.Context, hash string) (*wardload.APIToken, error) {
	return f.FindTokenByHashFn(ctx, hash)
}

// TestDatabaseAwayPage: while the database is away a signed-in person gets
// a 503 page that says nothing was saved and to try again, with
// Retry-After, and is not shown as signed out; the API answers the same
// with code "unavailable"; no driver text reaches either.
func TestDatabaseAwayPage(t *testing.T) {
	st := &tokenStore{fakeStore: newFakeStore(), FindTokenByHashFn: func(context.Context, string) (*wardload.APIToken, error) { return nil, errAway }}
	s, _ := MustNew(t, st)
	cookie := MustSession(t, s, fakeAdmin.ID)
	st.FindUserByIDFn = func(context.Context, int64) (*wardload.User, error) { return nil, errAway }

	req := httptest.NewRequest("GET", "/audit", nil)
	req.AddCookie(cookie)
	res, body := do(t, s.Handler(), req)
	if res.StatusCode != http.StatusServiceUnavailable || res.Header.Get("Retry-After") != "10" {
		t.Fatalf("status %d, Retry-After %q, want 503 and 10", res.StatusCode, res.Header.Get("Retry-After"))
	}
	if got := byTestID(t, body, "error-message"); len(got) != 1 || got[0] != wardload.MessageUnavailable {
		t.Errorf("error-message = %q", got)
	}
	if got := byTestID(t, body, "still-signed-in"); len(got) != 1 {
		t.Errorf("page does not say the person is still signed in")
	}
	if strings.Contains(body, `href="/signin"`) || strings.Contains(body, "dial tcp") {
		t.Errorf("page offers to sign in or shows driver text:\n%s", body)
	}
	// Without a session cookie there is nobody to reassure.
	st.FindWardsFn = func(context.Context, wardload.WardFilter) ([]*wardload.Ward, int, error) { return nil, 0, errAway }
	res, body = do(t, s.Handler(), httptest.NewRequest("GET", "/", nil))
	if res.StatusCode != http.StatusServiceUnavailable || len(byTestID(t, body, "still-signed-in")) != 0 {
		t.Errorf("anonymous home: status %d, still-signed-in shown: %v", res.StatusCode, len(byTestID(t, body, "still-signed-in")) != 0)
	}

	req = httptest.NewRequest("GET", "/api/v1/wards", nil)
	secret, _ := NewTokenSecret()
	req.Header.Set("Authorization", "Bearer "+secret)
	res, body = do(t, s.Handler(), req)
	if res.StatusCode != http.StatusServiceUnavailable || res.Header.Get("Retry-After") != "10" ||
		!strings.Contains(body, `"code":"unavailable"`) || !strings.Contains(body, "nothing was saved") {
		t.Errorf("API: status %d Retry-After %q body %s", res.StatusCode, res.Header.Get("Retry-After"), body)
	}
}

// TestOutageLogIsBounded: a thousand requests failing because the
// database is away add one ERROR line at once and one more with the count
// when the interval ends, plus one INFO line per request; before, each
// request logged its own ERROR line.
func TestOutageLogIsBounded(t *testing.T) {
	st := newFakeStore()
	st.FindWardsFn = func(context.Context, wardload.WardFilter) ([]*wardload.Ward, int, error) { return nil, 0, errAway }
	s, logs := MustNew(t, st)
	const n = 1000
	for range n {
		if res, _ := do(t, s.Handler(), httptest.NewRequest("GET", "/", nil)); res.StatusCode != 503 {
			t.Fatalf("status %d", res.StatusCode)
		}
	}
	s.faults.flushAll() // as at the interval's end (10 s) or shutdown
	errs := regexp.MustCompile(`(?m)^.*level=ERROR.*$`).FindAllString(logs.String(), -1)
	if len(errs) != 2 {
		t.Fatalf("%d ERROR lines, want 2:\n%s", len(errs), strings.Join(errs, "\n"))
	}
	if !strings.Contains(errs[0], "failures=1 ") || !strings.Contains(errs[1], fmt.Sprintf("failures=%d ", n-1)) ||
		!strings.Contains(errs[1], "connection refused") {
		t.Errorf("ERROR lines do not count the failures:\n%s", strings.Join(errs, "\n"))
	}
	if got := strings.Count(logs.String(), "level=INFO msg=request"); got != n {
		t.Errorf("%d request lines, want %d", got, n)
	}
	if got := strings.Count(logs.String(), "outcome=unavailable status=503"); got != n {
		t.Errorf("%d request lines marked unavailable, want %d", got, n)
	}
}

// TestClientGoneIsNotAnError: a request whose client went away (its
// context cancelled) is logged as such, at INFO with status 499, not as a
// 500 at ERROR.
func TestClientGoneIsNotAnError(t *testing.T) {
	st := newFakeStore()
	st.FindWardsFn = func(ctx context.Context, _ wardload.WardFilter) ([]*wardload.Ward, int, error) {
		return nil, 0, fmt.Errorf("find wards: %w", ctx.Err())
	}
	s, logs := MustNew(t, st)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	do(t, s.Handler(), httptest.NewRequest("GET", "/", nil).WithContext(ctx))
	if strings.Contains(logs.String(), "level=ERROR") {
		t.Errorf("client disconnect logged as an error:\n%s", logs)
	}
	if !strings.Contains(logs.String(), "outcome=client_gone status=499") {
		t.Errorf("request line does not say the client went away:\n%s", logs)
	}
}

// TestSQLiteFullDisk: with the SQLite database unable to grow (its page
// limit reached, as on a full disk), an import answers a page that says
// nothing was saved and why, with the manager still signed in; /readyz is
// not ready while writes fail and is ready again by itself once there is
// room, and the same import then succeeds.
func TestSQLiteFullDisk(t *testing.T) {
	f := newReviewFixture(t)
	before := wardObservations(t, f.st, f.ward.ID)
	var file strings.Builder
	file.WriteString("date,shift,tier,window_hours,care_minutes,dependency_score\n")
	for i := range 3000 {
		fmt.Fprintf(&file, "2026-02-%02d,Day,t%d,12.5,%d,4\n", 1+i%28, 1+i%4, 30+i%97)
	}
	path := "/wards/" + demo.WardCode + "/observations/import"
	cookie := MustSession(t, f.s, f.users[pAdmin].ID)
	db := f.st.DB() // the writer: one connection, which the pragma belongs to
	var pages int
	if err := db.QueryRow(`PRAGMA page_count`).Scan(&pages); err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec(fmt.Sprintf(`PRAGMA max_page_count = %d`, pages)); err != nil {
		t.Fatal(err)
	}
	ready := func() int {
		res, _ := f.do(t, httptest.NewRequest("GET", "/readyz", nil))
		return res.StatusCode
	}
	req := upload(t, path, file.String())
	req.AddCookie(cookie)
	res, body := f.do(t, req)
	if res.StatusCode != http.StatusServiceUnavailable || res.Header.Get("Retry-After") == "" {
		t.Fatalf("import on a full database: status %d Retry-After %q\n%s", res.StatusCode, res.Header.Get("Retry-After"), body)
	}
	if got := byTestID(t, body, "error-message"); len(got) != 1 || got[0] != wardload.MessageFull {
		t.Errorf("error-message = %q, want %q", got, wardload.MessageFull)
	}
	if !strings.Contains(body, "a.admin") || strings.Contains(body, `href="/signin"`) {
		t.Errorf("page does not show the admin signed in")
	}
	if n := wardObservations(t, f.st, f.ward.ID); n != before {
		t.Errorf("observations %d → %d on a full database", before, n)
	}
	if got := ready(); got != http.StatusServiceUnavailable {
		t.Errorf("/readyz while full = %d, want 503", got)
	}
	if _, err := db.Exec(`PRAGMA max_page_count = 1073741823`); err != nil {
		t.Fatal(err)
	}
	if got := ready(); got != http.StatusOK {
		t.Errorf("/readyz once there is room = %d, want 200", got)
	}
	req = upload(t, path, file.String())
	req.AddCookie(cookie)
	if res, body := f.do(t, req); res.StatusCode != http.StatusSeeOther {
		t.Fatalf("import once there is room: %d\n%s", res.StatusCode, body)
	}
	if n := wardObservations(t, f.st, f.ward.ID); n != before+3000 {
		t.Errorf("observations %d → %d, want +3000", before, n)
	}
}

// failingCommits is a session store whose saves fail once fail is set.
type failingCommits struct {
	*memstore.MemStore
	fail bool
}

func (f *failingCommits) Commit(token string, b []byte, expiry time.Time) error {
	if f.fail {
		return errAway
	}
	return f.MemStore.Commit(token, b, expiry)
}

// TestSessionSaveFailsOnePage: when saving the session fails just before
// the answer (here the idle-clock refresh of a page view with the
// database away), the person gets the 503 page alone, not that page with
// the handler's own page appended after it.
func TestSessionSaveFailsOnePage(t *testing.T) {
	clock := &testClock{t: time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)}
	sessions := &failingCommits{MemStore: memstore.New()}
	cfg := DefaultConfig()
	cfg.Store = newFakeStore()
	cfg.Logger = slog.New(slog.NewTextHandler(io.Discard, nil))
	cfg.Now = clock.Now
	cfg.SessionStore = sessions
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	cookie := MustSession(t, s, fakeAdmin.ID)
	clock.Add(5 * time.Minute) // the page view will refresh seen_at
	sessions.fail = true
	req := httptest.NewRequest("GET", "/", nil)
	req.AddCookie(cookie)
	res, body := do(t, s.Handler(), req)
	if res.StatusCode != http.StatusServiceUnavailable || strings.Count(body, "<html") != 1 {
		t.Errorf("status %d with %d pages:\n%s", res.StatusCode, strings.Count(body, "<html"), body)
	}
}
