package server

import (
	"context"
	"crypto/rand"
	"fmt"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/alexedwards/scs/v2"
	"github.com/jackc/pgx/v5"

	"wardload/internal/password"
	"wardload/internal/postgres"
	"wardload/internal/signin"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// instance is one wardload server of a shared-throttle test: the real
// wiring (New, its handler behind an httptest server) on its own store
// handle of the shared database.
type instance struct {
	s   *Server
	url string
}

// sharedDB is one database with one store handle per instance and a way
// to read every key of its throttle table.
type sharedDB struct {
	stores []wardload.Store
	keys   func(tb testing.TB) []string
	// sessions returns the instance's session store on its handle.
	sessions func(i int) scs.Store
}

// mustSharedPostgres opens n stores (n connection pools, as n processes
// would have) on one fresh schema of WARDLOAD_TEST_DATABASE_URL.
func mustSharedPostgres(tb testing.TB, n int, now wardload.Clock) *sharedDB {
	tb.Helper()
	base := os.Getenv("WARDLOAD_TEST_DATABASE_URL")
	if base == "" {
		if os.Getenv("CI") == "true" {
			tb.Fatal("WARDLOAD_TEST_DATABASE_URL must be set when CI=true")
		}
		tb.Skip("WARDLOAD_TEST_DATABASE_URL not set; PostgreSQL test skipped")
	}
	ctx := context.Background()
	schema := "server_" + strings.ToLower(rand.Text()[:12])
	exec := func(sql string) {
		c, err := pgx.Connect(ctx, base)
		if err != nil {
			tb.Fatal(err)
		}
		defer c.Close(ctx)
		if _, err := c.Exec(ctx, sql); err != nil {
			tb.Fatal(err)
		}
	}
	ident := pgx.Identifier{schema}.Sanitize()
	exec("CREATE SCHEMA " + ident)
	tb.Cleanup(func() { exec("DROP SCHEMA " + ident + " CASCADE") })
	db := &sharedDB{}
	var pgs []*postgres.Store
	for i := range n {
		st, err := postgres.Open(ctx, postgres.Config{URL: base, Now: now, Schema: schema})
		if err != nil {
			tb.Fatal(err)
		}
		tb.Cleanup(func() { st.Close() })
		if i == 0 {
			if err := st.Migrate(ctx); err != nil {
				tb.Fatal(err)
			}
		}
		db.stores, pgs = append(db.stores, st), append(pgs, st)
	}
	db.sessions = func(i int) scs.Store { return postgres.NewSessionStore(pgs[i], 0) }
	db.keys = func(tb testing.TB) []string {
		rows, err := pgs[0].Pool().Query(ctx, `SELECT key FROM signin_attempts`)
		if err != nil {
			tb.Fatal(err)
		}
		keys, err := pgx.CollectRows(rows, pgx.RowTo[string])
		if err != nil {
			tb.Fatal(err)
		}
		return keys
	}
	return db
}

// mustSharedSQLite is the SQLite case: one instance on one file.
func mustSharedSQLite(tb testing.TB) *sharedDB {
	st := MustOpenSQLite(tb)
	return &sharedDB{
		stores:   []wardload.Store{st},
		sessions: func(int) scs.Store { return sqlite.NewSessionStore(st, 0) },
		keys: func(tb testing.TB) []string {
			rows, err := st.DB().Query(`SELECT key FROM signin_attempts`)
			if err != nil {
				tb.Fatal(err)
			}
			defer rows.Close()
			var keys []string
			for rows.Next() {
				var k string
				if err := rows.Scan(&k); err != nil {
					tb.Fatal(err)
				}
				keys = append(keys, k)
			}
			return keys
		},
	}
}

// startInstances starts one server per store of db, all on clock, each
// counting its password checks into checked after calling hold.
func startInstances(tb testing.TB, db *sharedDB, clock *testClock, checked *atomic.Int64, hold func()) []*instance {
	tb.Helper()
	var out []*instance
	for i, st := range db.stores {
		cfg := DefaultConfig()
		cfg.Password = testPassword
		cfg.Store = st
		cfg.Logger = slog.New(slog.NewTextHandler(&logBuffer{}, nil))
		cfg.Now = clock.Now
		cfg.SessionStore = db.sessions(i)
		cfg.HashConcurrency = 64 // the throttle alone must cut a burst
		s, err := New(cfg)
		if err != nil {
			tb.Fatal(err)
		}
		s.signin.verify = func(pw, encoded string) (bool, error) {
			checked.Add(1)
			if hold != nil {
				hold()
			}
			return password.Verify(pw, encoded)
		}
		ts := httptest.NewServer(s.Handler())
		tb.Cleanup(ts.Close)
		out = append(out, &instance{s: s, url: ts.URL})
	}
	return out
}

// postSignIn posts the sign-in form to in over HTTP, with cookie if not
// nil, and returns the response (body closed, redirects not followed).
func postSignIn(in *instance, name, pw string, cookie *http.Cookie) (*http.Response, error) {
	req, err := http.NewRequest("POST", in.url+"/signin", strings.NewReader(url.Values{"name": {name}, "password": {pw}}.Encode()))
	if err != nil {
		return nil, err
	}
	req.Header.Set("Content-Type", "application/x-www-form-urlencoded")
	if cookie != nil {
		req.AddCookie(cookie)
	}
	c := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	res, err := c.Do(req)
	if err != nil {
		return nil, err
	}
	res.Body.Close()
	return res, nil
}

func TestSharedThrottlePostgresTwoInstances(t *testing.T) {
	clock := &testClock{t: time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)}
	testSharedThrottle(t, mustSharedPostgres(t, 2, clock.Now), clock)
}

func TestSharedThrottleSQLite(t *testing.T) {
	testSharedThrottle(t, mustSharedSQLite(t), &testClock{t: time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)})
}

// testSharedThrottle: the real user has signed in before on a browser
// that keeps its device cookie. Then 30 concurrent wrong guesses for the
// account arrive, spread over every instance. Each password check is held
// until all 30 requests are answered or checking, so they truly overlap;
// at most the account's limit (3) may be checked in all, the rest get 429.
// During the attack the real user signs in from the known browser on
// another instance, while the right password from an unknown browser is
// refused.
func testSharedThrottle(t *testing.T, db *sharedDB, clock *testClock) {
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	const name, right = "n.nurse", "pw of n.nurse 7c1e"
	h, err := testPassword.Hash(right)
	if err != nil {
		t.Fatal(err)
	}
	if err := db.stores[0].CreateUser(ctx, &wardload.User{Name: name, Role: wardload.RoleChargeNurse, PasswordHash: h}); err != nil {
		t.Fatal(err)
	}
	const burst = 30
	var checked atomic.Int64
	var holding atomic.Bool
	hashing, release := make(chan struct{}, burst), make(chan struct{})
	ins := startInstances(t, db, clock, &checked, func() {
		if holding.Load() {
			hashing <- struct{}{}
			<-release
		}
	})

	res, err := postSignIn(ins[0], name, right, nil)
	if err != nil || res.StatusCode != 303 {
		t.Fatalf("first sign-in: %v %v", res, err)
	}
	var device *http.Cookie
	for _, c := range res.Cookies() {
		if c.Name == ins[0].s.signin.devices.name {
			device = c
		}
	}
	if device == nil {
		t.Fatal("no device cookie at sign-in")
	}
	clock.Add(time.Hour)

	checked.Store(0)
	holding.Store(true)
	codes := make(chan int, burst)
	for i := range burst {
		go func() {
			res, err := postSignIn(ins[i%len(ins)], name, fmt.Sprintf("wrong guess %02d", i), nil)
			if err != nil {
				codes <- -1
				return
			}
			codes <- res.StatusCode
		}()
	}
	got := map[int]int{}
	for waiting := 0; waiting+sum(got) < burst; {
		select {
		case <-hashing:
			waiting++
		case c := <-codes:
			got[c]++
		}
	}
	close(release)
	for sum(got) < burst {
		got[<-codes]++
	}
	holding.Store(false)
	t.Logf("%d instance(s): %d of %d concurrent guesses checked; statuses %v", len(ins), checked.Load(), burst, got)
	if limit := signinLimit(); checked.Load() != limit || got[401] != int(limit) || got[429] != burst-int(limit) {
		t.Errorf("checked %d, statuses %v; want %d checked, %d×401 and %d×429", checked.Load(), got, limit, limit, burst-int(limit))
	}

	// The attack goes on; the real user's browser comes to the other
	// instance (the only one on SQLite).
	last := ins[len(ins)-1]
	if res, _ := postSignIn(last, name, right, nil); res == nil || res.StatusCode != 429 {
		t.Errorf("right password from an unknown browser during the attack = %v, want 429", res)
	}
	res, err = postSignIn(last, name, right, device)
	if err != nil || res.StatusCode != 303 {
		t.Fatalf("known device during the attack = %v %v, want 303", res, err)
	}
	if res, _ := postSignIn(ins[0], name, "wrong again", nil); res == nil || res.StatusCode != 429 {
		t.Errorf("attacker after the user signed in = %v, want 429 (the count is not cleared)", res)
	}
}

// signinLimit is the account rule's number of attempts before a wait.
func signinLimit() int64 { return int64(signin.AccountRule.After) }
