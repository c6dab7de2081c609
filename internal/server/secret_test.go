package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"net/http/httptest"
	"net/url"
	"strings"
	"testing"

	"wardload/internal/session"
)

// TestNoPlainSecretInDatabase creates users, signs in and fails to, makes
// an API token through the page and uses it, then reads every column of
// every table of the SQLite file (sessions included) and finds neither a
// password, the token secret nor a session cookie anywhere.
func TestNoPlainSecretInDatabase(t *testing.T) {
	f := newFixture(t)
	admin := f.as(t, pAdmin, post("/admin/users", url.Values{
		"name": {"c.created"}, "role": {"charge_nurse"}, "ward": {fmt.Sprint(f.wardA.ID)},
		"password": {"created via page 5e9d"},
	}))
	if res, body := f.do(t, admin); res.StatusCode != 303 {
		t.Fatalf("create user = %d\n%s", res.StatusCode, body)
	}
	secrets := []string{"created via page 5e9d", "wrong guess 0b7f", "reset via page 8a2c"}
	for _, pw := range f.passwords {
		secrets = append(secrets, pw)
	}
	// A password change through the page.
	upd := f.as(t, pAdmin, post(fmt.Sprintf("/admin/users/%d", f.users[pNurseA].ID), url.Values{
		"role": {"charge_nurse"}, "ward": {fmt.Sprint(f.wardA.ID)}, "password": {"reset via page 8a2c"},
	}))
	if res, body := f.do(t, upd); res.StatusCode != 303 {
		t.Fatalf("update user = %d\n%s", res.StatusCode, body)
	}
	// Sign-ins: good, bad, and good with the new password.
	for _, tc := range []struct {
		name, pw string
		want     int
	}{{"c.created", "created via page 5e9d", 303}, {"m.manager", "wrong guess 0b7f", 401}, {"n.nurse", "reset via page 8a2c", 303}} {
		if res, _ := f.do(t, signInForm(tc.name, tc.pw, "/")); res.StatusCode != tc.want {
			t.Fatalf("sign in %s = %d, want %d", tc.name, res.StatusCode, tc.want)
		}
	}

	// A token through the page: the POST leaves the secret in the session
	// for the next page view; check the database at that moment too.
	c := MustSession(t, f.s, f.users[pManagerA].ID)
	res, _ := f.do(t, withCookie(post("/wards/w-a/tokens", url.Values{"name": {"planner"}}), f, c.Value))
	if res.StatusCode != 303 {
		t.Fatalf("create token = %d", res.StatusCode)
	}
	res, body := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/tokens", nil), f, c.Value))
	got := byTestID(t, body, "token-secret")
	if res.StatusCode != 200 || len(got) != 1 || !strings.HasPrefix(got[0], tokenPrefix) {
		t.Fatalf("token page = %d, secret %q", res.StatusCode, got)
	}
	secret := got[0]
	// Shown once: a reload no longer has it.
	if _, body := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/tokens", nil), f, c.Value)); strings.Contains(body, secret) {
		t.Error("secret shown a second time")
	}
	req := httptest.NewRequest("GET", "/api/v1/wards", nil)
	req.Header.Set("Authorization", "Bearer "+secret)
	if res, body := f.do(t, req); res.StatusCode != 200 || !strings.Contains(body, `"code":"w-a"`) || strings.Contains(body, "w-b") {
		t.Fatalf("API with the new token = %d %s", res.StatusCode, body)
	}
	tok, err := f.st.FindTokenByName(context.Background(), "planner")
	if err != nil || tok.LastUsedAt.IsZero() {
		t.Errorf("token last used not recorded: %+v %v", tok, err)
	}
	secrets = append(secrets, secret, strings.TrimPrefix(secret, tokenPrefix))
	// The session cookie is a secret too: the table holds only its hash.
	secrets = append(secrets, c.Value)

	var sessions int
	if err := f.st.DB().QueryRow(`SELECT COUNT(*) FROM sessions`).Scan(&sessions); err != nil || sessions < 3 {
		t.Fatalf("sessions table has %d rows (%v); the scan would not cover sessions", sessions, err)
	}
	found := scanDatabase(t, f, secrets)
	for _, hit := range found {
		t.Error(hit)
	}
	// The scan itself must be able to see: a known value is found.
	if len(scanDatabase(t, f, []string{"c.created"})) == 0 {
		t.Fatal("scan found not even a user name: it reads nothing")
	}
}

// TestTokenSecretSealedInSession checks the moment between the create POST
// and the page that shows the secret: the sessions table holds it sealed.
func TestTokenSecretSealedInSession(t *testing.T) {
	f := newFixture(t)
	c := MustSession(t, f.s, f.users[pManagerA].ID)
	if res, _ := f.do(t, withCookie(post("/wards/w-a/tokens", url.Values{"name": {"planner"}}), f, c.Value)); res.StatusCode != 303 {
		t.Fatalf("create token = %d", res.StatusCode)
	}
	// The secret is not known to the test yet; the hash is. Unseal what
	// the session holds and check it is the secret of that hash, and that
	// the raw session row does not contain it.
	ctx, err := f.s.sessions.Load(context.Background(), c.Value)
	if err != nil {
		t.Fatal(err)
	}
	name, sealed, _ := strings.Cut(f.s.sessions.GetString(ctx, sessSecret), ":")
	secret, err := f.s.sealer.Unseal(sealed)
	if err != nil || name != "planner" {
		t.Fatalf("unseal: %q %v", name, err)
	}
	tok, err := f.st.FindTokenByName(context.Background(), "planner")
	if err != nil || tok.Hash != TokenHash(secret) {
		t.Fatalf("session secret does not match the stored hash: %v", err)
	}
	if hits := scanDatabase(t, f, []string{secret, strings.TrimPrefix(secret, tokenPrefix)}); len(hits) > 0 {
		t.Errorf("secret in the database before it was shown: %q", hits)
	}
	// A server with another seal key (a restart) cannot show it.
	f.s.sealer = session.NewSealer()
	_, body := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/tokens", nil), f, c.Value))
	if len(byTestID(t, body, "token-secret-lost")) != 1 || strings.Contains(body, secret) {
		t.Error("after a restart the page should say the secret is lost")
	}
}

// scanDatabase returns a line for every needle found in any column of any
// row of any table.
func scanDatabase(tb testing.TB, f *fixture, needles []string) []string {
	tb.Helper()
	db := f.st.DB()
	rows, err := db.Query(`SELECT name FROM sqlite_master WHERE type = 'table'`)
	if err != nil {
		tb.Fatal(err)
	}
	var tables []string
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			tb.Fatal(err)
		}
		tables = append(tables, n)
	}
	rows.Close()
	if len(tables) < 5 {
		tb.Fatalf("only tables %q", tables)
	}
	var hits []string
	for _, table := range tables {
		rows, err := db.Query(`SELECT * FROM "` + table + `"`)
		if err != nil {
			tb.Fatal(err)
		}
		cols, _ := rows.Columns()
		for rows.Next() {
			vals := make([]any, len(cols))
			ptrs := make([]any, len(cols))
			for i := range vals {
				ptrs[i] = &vals[i]
			}
			if err := rows.Scan(ptrs...); err != nil {
				tb.Fatal(err)
			}
			for i, v := range vals {
				var b []byte
				switch x := v.(type) {
				case string:
					b = []byte(x)
				case []byte:
					b = x
				default:
					continue
				}
				for _, n := range needles {
					// JSON-escaped forms too, for the audit columns.
					esc, _ := json.Marshal(n)
					if bytes.Contains(b, []byte(n)) || bytes.Contains(b, esc[1:len(esc)-1]) {
						hits = append(hits, fmt.Sprintf("%q found in %s.%s", n, table, cols[i]))
					}
				}
			}
		}
		rows.Close()
	}
	return hits
}
