package main

import (
	"context"
	"io"
	"net/http"
	"net/http/cookiejar"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/password"
	"wardload/internal/wardload"
)

// The passwords of these tests satisfy the policy of internal/password
// (15 characters or more, not guessable per zxcvbn).
const (
	firstPW  = "kettle marsh lantern"
	secondPW = "sunflower garden tuesday"
	thirdPW  = "violet harbour quietly"
)

// TestUserPassword sets a password from the command line, with and
// without --temporary.
func TestUserPassword(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, dir, firstPW+"\n", "user", "add", "n.nurse"); code != exitOK {
		t.Fatalf("user add: %d %s", code, errs)
	}
	code, out, errs := runCLI(t, dir, secondPW+"\n", "user", "password", "n.nurse")
	if code != exitOK || !strings.Contains(out, "set the password of n.nurse") {
		t.Fatalf("user password = %d %q %q", code, out, errs)
	}
	u := mustFindUser(t, dir, "n.nurse")
	if ok, _ := password.Verify(secondPW, u.PasswordHash); !ok || u.PasswordChanges != 1 || u.MustChangePassword {
		t.Fatalf("after user password: verifies %v, %+v; want the new password, 1 change, no must-change", ok, u)
	}
	code, out, errs = runCLI(t, dir, thirdPW+"\n", "user", "password", "--temporary", "n.nurse")
	if code != exitOK || !strings.Contains(out, "temporary password") {
		t.Fatalf("user password --temporary = %d %q %q", code, out, errs)
	}
	if u = mustFindUser(t, dir, "n.nurse"); !u.MustChangePassword || u.PasswordChanges != 2 {
		t.Fatalf("after --temporary: %+v; want must-change and 2 changes", u)
	}
}

// TestUserPasswordRejects: each bad input is told plainly (exit 2), and
// changes nothing and writes no audit row. The policy's own cases are
// tested in internal/password.
func TestUserPasswordRejects(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, dir, firstPW+"\n", "user", "add", "n.nurse"); code != exitOK {
		t.Fatalf("user add: %d %s", code, errs)
	}
	if code, _, errs := runCLI(t, dir, firstPW+"\n", "user", "add", "d.gone"); code != exitOK {
		t.Fatalf("user add: %d %s", code, errs)
	}
	st := openTestStore(t, dir)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	gone, err := st.FindUserByName(ctx, "d.gone")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.UpdateUser(ctx, gone.ID, wardload.UserUpdate{Disabled: new(true)}); err != nil {
		t.Fatal(err)
	}
	st.Close()
	before := mustFindUser(t, dir, "n.nurse")
	rows := auditRows(t, dir)

	for _, tc := range []struct {
		name, stdin, user, stderr string
	}{
		{"1,000 characters", strings.Repeat("Zq8!", 250) + "\n", "n.nurse", "at most 256 characters"},
		{"invalid UTF-8", "kettle marsh lantern\xff\n", "n.nurse", "valid UTF-8"},
		{"14 characters", "x7#Kq9!mZ2@vL4\n", "n.nurse", "at least 15 characters"},
		{"the user name", "n.nurse n.nurse n.nurse\n", "n.nurse", "must not be the user name"},
		{"common password", "password1234567\n", "n.nurse", "too easy to guess"},
		{"same as the current one", firstPW + "\n", "n.nurse", "must differ from the current one"},
		{"disabled user", secondPW + "\n", "d.gone", "is disabled"},
		{"unknown user", secondPW + "\n", "no.body", `no user called "no.body"`},
		{"1,000-character name", secondPW + "\n", strings.Repeat("n", 1000), "no user called"},
		{"name not UTF-8", secondPW + "\n", "n.nurse\xff", "no user called"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, dir, tc.stdin, "user", "password", tc.user)
			if code != exitUsage || out != "" || !strings.Contains(errs, tc.stderr) || strings.Contains(errs, strings.TrimSpace(tc.stdin)) {
				t.Fatalf("= %d %q %q; want exit 2, stderr saying %q without the password", code, out, errs, tc.stderr)
			}
		})
	}
	if after := mustFindUser(t, dir, "n.nurse"); after.PasswordHash != before.PasswordHash || after.PasswordChanges != 0 {
		t.Errorf("refused resets changed the user: %+v", after)
	}
	if n := auditRows(t, dir); n != rows {
		t.Errorf("refused resets wrote audit rows: %d -> %d", rows, n)
	}
}

func mustFindUser(t *testing.T, dir, name string) *wardload.User {
	t.Helper()
	st := openTestStore(t, dir)
	defer st.Close()
	u, err := st.FindUserByName(context.Background(), name)
	if err != nil {
		t.Fatal(err)
	}
	return u
}

func auditRows(t *testing.T, dir string) int {
	t.Helper()
	st := openTestStore(t, dir)
	defer st.Close()
	_, n, err := st.FindAudit(context.Background(), wardload.AuditFilter{Limit: 1})
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// TestPasswordChangeEndsSessions walks the password rules through a
// running server on each store: a change ends the user's other sessions
// and keeps the changing one; an admin's reset ends them all and lets the
// user only choose a new password; the command line's reset ends them
// too; the audit rows never hold a password or hash.
func TestPasswordChangeEndsSessions(t *testing.T) {
	t.Run("sqlite", func(t *testing.T) {
		dir := t.TempDir()
		walkPasswordChange(t, []string{"--data-dir", dir}, &storeOptions{DataDir: dir})
	})
	t.Run("postgres", func(t *testing.T) {
		dbURL := mustCreateDatabase(t)
		walkPasswordChange(t, []string{"--db", dbURL, "--data-dir", t.TempDir()}, &storeOptions{DB: dbURL})
	})
}

func walkPasswordChange(t *testing.T, where []string, so *storeOptions) {
	cli := func(stdin string, args ...string) {
		t.Helper()
		if code, _, errs := runCLI(t, t.TempDir(), stdin, append(args, where...)...); code != exitOK {
			t.Fatalf("%v: %d %s", args, code, errs)
		}
	}
	cli("first admin passphrase\n", "user", "add", "--role", "admin", "ada.admin")
	cli(firstPW+"\n", "user", "add", "--role", "manager", "mo.manager")
	s := MustServe(t, append([]string{"--addr", "127.0.0.1:0"}, where...)...)
	defer s.Stop(t)
	st, err := openStore(context.Background(), so, false)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	mo, err := st.FindUserByName(context.Background(), "mo.manager")
	if err != nil {
		t.Fatal(err)
	}

	// at is where c lands for GET path after redirects, with the body.
	at := func(c *http.Client, path string) (string, string) {
		t.Helper()
		res, err := c.Get(s.URL + path)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		b, _ := io.ReadAll(res.Body)
		return res.Request.URL.Path, string(b)
	}
	postAt := func(c *http.Client, path string, form url.Values) (string, int, string) {
		t.Helper()
		res, err := c.PostForm(s.URL+path, form)
		if err != nil {
			t.Fatal(err)
		}
		defer res.Body.Close()
		b, _ := io.ReadAll(res.Body)
		return res.Request.URL.Path, res.StatusCode, string(b)
	}
	change := func(current, pw string) url.Values {
		return url.Values{"current": {current}, "password": {pw}, "repeat": {pw}}
	}

	// Two browsers of the same manager; the first changes the password.
	m1, m2 := signIn(t, s.URL, "mo.manager", firstPW), signIn(t, s.URL, "mo.manager", firstPW)
	if path, code, body := postAt(m1, "/account/password", change("not my password at all", secondPW)); code != http.StatusBadRequest || !strings.Contains(body, "not your current password") {
		t.Fatalf("change with a wrong current password: %s %d", path, code)
	}
	if path, code, body := postAt(m1, "/account/password", change(firstPW, secondPW)); path != "/account/password" || code != http.StatusOK || !strings.Contains(body, "Your password was changed") {
		t.Fatalf("change: landed at %s %d", path, code)
	}
	if path, _ := at(m2, "/audit"); path != "/signin" {
		t.Errorf("the other browser after a change is at %s, want signed out (/signin)", path)
	}
	if path, _ := at(m1, "/audit"); path != "/audit" {
		t.Errorf("the changing browser after its change is at %s, want still signed in (/audit)", path)
	}

	// An admin's reset: the manager's session ends, and after signing in
	// with the temporary password only the change page is open.
	admin := signIn(t, s.URL, "ada.admin", "first admin passphrase")
	reset := url.Values{"role": {wardload.RoleManager}, "password": {thirdPW}}
	if path, code, _ := postAt(admin, "/admin/users/"+strconv.FormatInt(mo.ID, 10), reset); path != "/admin/users" || code != http.StatusOK {
		t.Fatalf("admin reset landed at %s %d", path, code)
	}
	if path, _ := at(m1, "/audit"); path != "/signin" {
		t.Errorf("after an admin reset the manager is at %s, want signed out", path)
	}
	m3 := signInAt(t, s.URL, "mo.manager", thirdPW, "/account/password")
	for _, p := range []string{"/audit", "/wards/none/settings"} {
		if path, body := at(m3, p); path != "/account/password" || !strings.Contains(body, "Choose your own before using wardload") {
			t.Errorf("must-change user asking for %s is at %s, want the change page", p, path)
		}
	}
	if path, _, _ := postAt(m3, "/account/password", change(thirdPW, firstPW)); path != "/account/password" {
		t.Fatalf("change after reset landed at %s", path)
	}
	if path, _ := at(m3, "/audit"); path != "/audit" {
		t.Errorf("after choosing a password the manager is at %s, want /audit", path)
	}

	// The command line's reset ends the session as well.
	cli(secondPW+"\n", "user", "password", "mo.manager")
	if path, _ := at(m3, "/audit"); path != "/signin" {
		t.Errorf("after user password the manager is at %s, want signed out", path)
	}

	es, _, err := st.FindAudit(context.Background(), wardload.AuditFilter{Action: new(wardload.ActionUserUpdate)})
	if err != nil {
		t.Fatal(err)
	}
	if len(es) != 4 {
		t.Errorf("%d user.update rows, want 4 (change, reset, change, command line)", len(es))
	}
	for _, e := range es {
		for _, secret := range []string{firstPW, secondPW, thirdPW, "argon2"} {
			if strings.Contains(e.Before+e.After, secret) {
				t.Fatalf("audit row %d holds %q", e.ID, secret)
			}
		}
	}
}

// signInAt signs in and checks where the browser lands.
func signInAt(t *testing.T, base, name, pw, want string) *http.Client {
	t.Helper()
	jar, err := cookiejar.New(nil)
	if err != nil {
		t.Fatal(err)
	}
	c := &http.Client{Jar: jar}
	res, err := c.PostForm(base+"/signin", url.Values{"name": {name}, "password": {pw}, "next": {"/"}})
	if err != nil {
		t.Fatal(err)
	}
	res.Body.Close()
	if res.Request.URL.Path != want {
		t.Fatalf("sign in as %s landed at %s, want %s", name, res.Request.URL.Path, want)
	}
	return c
}
