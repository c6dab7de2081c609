package main

import (
	"context"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"slices"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5"

	"wardload/internal/session"
)

// TestSessionRowNotReplayable (issue 15 items 4 and 9): what the sessions
// table holds cannot be used as a session cookie. On each store, a user
// signs in through serve; the test reads the sessions table straight from
// the database and finds the hash of the cookie, never the cookie. Sent
// as the session cookie, each stored value is treated as signed out,
// while the real cookie still signs the user in.
func TestSessionRowNotReplayable(t *testing.T) {
	onEachStore(t, func(t *testing.T, so *storeOptions, storeArgs ...string) {
		dir := so.DataDir
		add := []string{"user", "add", "--role", "admin", "ada.admin"}
		if so.DB != "" {
			dir = t.TempDir()
			add = []string{"user", "add", "--role", "admin", "--db", so.DB, "ada.admin"}
		}
		if code, _, errs := runCLI(t, dir, "first admin passphrase\n", add...); code != exitOK {
			t.Fatalf("user add: %d %s", code, errs)
		}
		s := MustServe(t, append([]string{"--addr", "127.0.0.1:0"}, storeArgs...)...)
		c := signIn(t, s.URL, "ada.admin", "first admin passphrase")
		base, err := url.Parse(s.URL)
		if err != nil {
			t.Fatal(err)
		}
		var cookie string
		for _, ck := range c.Jar.Cookies(base) {
			if ck.Name == "wardload_session" {
				cookie = ck.Value
			}
		}
		if cookie == "" {
			t.Fatalf("no session cookie after sign-in: %v", c.Jar.Cookies(base))
		}

		stored := storedSessionKeys(t, so)
		if slices.Contains(stored, cookie) {
			t.Errorf("the sessions table holds the cookie in plain text")
		}
		if !slices.Contains(stored, session.Key(cookie)) {
			t.Errorf("the sessions table %q lacks the hash of the cookie", stored)
		}

		home := func(token string) (int, string) {
			t.Helper()
			jar, err := cookiejar.New(nil)
			if err != nil {
				t.Fatal(err)
			}
			jar.SetCookies(base, []*http.Cookie{{Name: "wardload_session", Value: token}})
			return getWith(t, &http.Client{Jar: jar}, s.URL+"/")
		}
		for _, key := range stored {
			code, body := home(key)
			if code != http.StatusOK || strings.Contains(body, "Signed in as") || !strings.Contains(body, `data-testid="home-signin-link"`) {
				t.Errorf("the stored value %.12s… as a cookie: status %d, want the signed-out home page:\n%s", key, code, body)
			}
		}
		if _, body := home(cookie); !strings.Contains(body, "Signed in as ada.admin") {
			t.Errorf("the real cookie no longer signs in:\n%s", body)
		}
		if code := s.Stop(t); code != exitOK {
			t.Errorf("exit %d\nstderr: %s", code, s.stderr)
		}
	})
}

// storedSessionKeys reads the token column of the sessions table of the
// store so selects, outside the server.
func storedSessionKeys(t *testing.T, so *storeOptions) []string {
	t.Helper()
	ctx := context.Background()
	st, err := openStore(ctx, so, false)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	const q = `SELECT token FROM sessions`
	var keys []string
	switch {
	case st.SQLite != nil:
		rows, err := st.SQLite.DB().QueryContext(ctx, q)
		if err != nil {
			t.Fatal(err)
		}
		defer rows.Close()
		for rows.Next() {
			var k string
			if err := rows.Scan(&k); err != nil {
				t.Fatal(err)
			}
			keys = append(keys, k)
		}
		if err := rows.Err(); err != nil {
			t.Fatal(err)
		}
	default:
		rows, err := st.PGPool.Query(ctx, q)
		if err != nil {
			t.Fatal(err)
		}
		if keys, err = pgx.CollectRows(rows, pgx.RowTo[string]); err != nil {
			t.Fatal(err)
		}
	}
	if len(keys) == 0 {
		t.Fatal("the sessions table is empty: the check would prove nothing")
	}
	return keys
}
