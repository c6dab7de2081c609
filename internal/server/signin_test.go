package server

import (
	"context"
	"net/http"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func signInForm(name, pw, next string) *http.Request {
	return post("/signin", url.Values{"name": {name}, "password": {pw}, "next": {next}})
}

func TestSignInSuccess(t *testing.T) {
	f := newFixture(t)
	// A session that exists before sign-in (as an attacker could plant)
	// must not be the one that is signed in.
	ctx, _ := f.s.sessions.Load(context.Background(), "")
	f.s.sessions.Put(ctx, "planted", "x")
	before, _, err := f.s.sessions.Commit(ctx)
	if err != nil {
		t.Fatal(err)
	}
	req := signInForm("M.Manager ", f.passwords["m.manager"], "/audit?ward=w-a")
	req.AddCookie(&http.Cookie{Name: f.s.sessions.Cookie.Name, Value: before})
	res, body := f.do(t, req)
	if res.StatusCode != 303 || res.Header.Get("Location") != "/audit?ward=w-a" {
		t.Fatalf("sign-in = %d Location %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}
	c := f.sessionCookie(res)
	if c == nil {
		t.Fatal("no session cookie")
	}
	if c.Value == before {
		t.Error("session ID not renewed at sign-in")
	}
	if !c.HttpOnly || c.SameSite != http.SameSiteLaxMode || c.Secure || c.Path != "/" {
		t.Errorf("cookie flags: HttpOnly %v SameSite %v Secure %v Path %q", c.HttpOnly, c.SameSite, c.Secure, c.Path)
	}
	// The old ID is dead; the new one works and the page names the user.
	// (Ward A's census page is the probe: "/" is public and answers 200
	// either way.)
	res, _ = f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/census", nil), f, before))
	if res.StatusCode != 303 {
		t.Errorf("old session ID still signed in: %d", res.StatusCode)
	}
	res, body = f.do(t, withCookie(httptest.NewRequest("GET", "/", nil), f, c.Value))
	if res.StatusCode != 200 || !slices.Equal(byTestID(t, body, "user-name"), []string{"Signed in as m.manager"}) {
		t.Errorf("home with new session = %d, user-name %q", res.StatusCode, byTestID(t, body, "user-name"))
	}
	if es := f.audit(t, "signin.ok"); len(es) != 1 || es[0].Actor != "m.manager" || es[0].UserID != f.users[pManagerA].ID {
		t.Errorf("signin.ok audit = %+v", es)
	}

	// Sign out: POST destroys the session.
	res, _ = f.do(t, withCookie(post("/signout", nil), f, c.Value))
	if res.StatusCode != 303 || res.Header.Get("Location") != "/signin" {
		t.Errorf("sign-out = %d %q", res.StatusCode, res.Header.Get("Location"))
	}
	if res, _ = f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/census", nil), f, c.Value)); res.StatusCode != 303 {
		t.Errorf("session still valid after sign-out: %d", res.StatusCode)
	}
}

func withCookie(req *http.Request, f *fixture, token string) *http.Request {
	req.AddCookie(&http.Cookie{Name: f.s.sessions.Cookie.Name, Value: token})
	return req
}

func TestSecureCookies(t *testing.T) {
	st := MustOpenSQLite(t)
	cfg := DefaultConfig()
	cfg.Store, cfg.Logger, cfg.SecureCookies = st, newFixture(t).s.log, true
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	ctx, _ := s.sessions.Load(context.Background(), "")
	s.sessions.Put(ctx, "k", "v")
	rec := httptest.NewRecorder()
	s.sessions.WriteSessionCookie(ctx, rec, "tok", time.Time{})
	c := rec.Result().Cookies()[0]
	if !c.Secure || c.Name != "__Host-wardload_session" || !c.HttpOnly {
		t.Errorf("cookie %s Secure %v HttpOnly %v, want __Host- Secure HttpOnly", c.Name, c.Secure, c.HttpOnly)
	}
}

func TestSignInFailuresAreOneMessage(t *testing.T) {
	f := newFixture(t)
	off := f.MustUser(t, "", "d.disabled", wardload.RoleChargeNurse, "disabled pw 123", f.wardA.ID)
	yes := true
	if _, err := f.st.UpdateUser(context.Background(), off.ID, wardload.UserUpdate{Disabled: &yes}); err != nil {
		t.Fatal(err)
	}
	var msgs []string
	for _, tc := range []struct{ name, pw, reason string }{
		{"m.manager", "wrong password 1", "password"},
		{"nobody.here", "whatever pw 12", "unknown_name"},
		{"d.disabled", "disabled pw 123", "disabled"},
	} {
		res, body := f.do(t, signInForm(tc.name, tc.pw, "/"))
		if res.StatusCode != http.StatusUnauthorized || f.sessionCookie(res) != nil {
			t.Errorf("%s: status %d, cookie %v; want 401 and no session", tc.name, res.StatusCode, f.sessionCookie(res))
		}
		msgs = append(msgs, strings.Join(byTestID(t, body, "signin-error"), ""))
		es := f.audit(t, "signin.fail")
		if len(es) == 0 || es[0].Actor != tc.name || !strings.Contains(es[0].After, `"reason":"`+tc.reason+`"`) {
			t.Errorf("%s: newest signin.fail = %+v", tc.name, es[0])
		}
		if strings.Contains(es[0].After, tc.pw) || strings.Contains(es[0].Before, tc.pw) {
			t.Errorf("%s: password in the audit row", tc.name)
		}
	}
	if msgs[0] != signInFailed || msgs[1] != msgs[0] || msgs[2] != msgs[0] {
		t.Errorf("messages differ or are not the one message: %q", msgs)
	}
	// Blank fields: a plain 400, nothing looked up, nothing counted.
	if res, _ := f.do(t, signInForm("", "", "/")); res.StatusCode != 400 {
		t.Errorf("blank form = %d, want 400", res.StatusCode)
	}
	// A hostile name is stored sanitised and clipped.
	f.do(t, signInForm("<script>"+strings.Repeat("x", 200), "pw", "/"))
	if es := f.audit(t, "signin.fail"); es[0].Actor != "?script?"+strings.Repeat("x", 32) {
		t.Errorf("stored name %q", es[0].Actor)
	}
}

func TestSignInNextIsLocal(t *testing.T) {
	f := newFixture(t)
	for _, next := range []string{"//evil.example/", "https://evil.example/", "/\\evil.example"} {
		res, _ := f.do(t, signInForm("a.admin", f.passwords["a.admin"], next))
		if res.StatusCode != 303 || res.Header.Get("Location") != "/" {
			t.Errorf("next %q: %d Location %q, want 303 to /", next, res.StatusCode, res.Header.Get("Location"))
		}
	}
}

func TestSignInThrottle(t *testing.T) {
	f := newFixture(t)
	right := f.passwords["n.nurse"]
	for i := 0; i < 3; i++ {
		if res, _ := f.do(t, signInForm("n.nurse", "wrong password x", "/")); res.StatusCode != 401 {
			t.Fatalf("failure %d: status %d", i+1, res.StatusCode)
		}
	}
	// Third failure: wait 2^0 = 1 s. Even the right password is refused
	// without being checked.
	res, body := f.do(t, signInForm("n.nurse", right, "/"))
	if res.StatusCode != http.StatusTooManyRequests || res.Header.Get("Retry-After") != "1" {
		t.Fatalf("throttled = %d Retry-After %q", res.StatusCode, res.Header.Get("Retry-After"))
	}
	if got := byTestID(t, body, "signin-error"); len(got) != 1 || !strings.Contains(got[0], "Too many failed sign-ins") {
		t.Errorf("message %q", got)
	}
	if len(f.audit(t, "signin.throttled")) != 1 || len(f.audit(t, "signin.ok")) != 0 {
		t.Error("throttled attempt not audited, or signed in")
	}
	// Another account from the same address is not held up (the address
	// limit starts at 20 failures).
	if res, _ := f.do(t, signInForm("m.manager", f.passwords["m.manager"], "/")); res.StatusCode != 303 {
		t.Errorf("other account = %d, want 303", res.StatusCode)
	}
	// Fourth failure after waiting: 2 s.
	f.clock.Add(1 * time.Second)
	f.do(t, signInForm("n.nurse", "wrong password x", "/"))
	f.clock.Add(1 * time.Second)
	if res, _ := f.do(t, signInForm("n.nurse", right, "/")); res.StatusCode != 429 {
		t.Errorf("1 s into a 2 s wait = %d, want 429", res.StatusCode)
	}
	f.clock.Add(1 * time.Second)
	if res, _ := f.do(t, signInForm("n.nurse", right, "/")); res.StatusCode != 303 {
		t.Errorf("after the wait, right password = %d, want 303", res.StatusCode)
	}
	// Success clears the account's count.
	if res, _ := f.do(t, signInForm("n.nurse", "wrong password x", "/")); res.StatusCode != 401 {
		t.Errorf("after success, first failure = %d, want 401 (not throttled)", res.StatusCode)
	}
}

func TestThrottleGrowth(t *testing.T) {
	th := newThrottle(3, 15*time.Minute)
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	for i, want := range []time.Duration{0, 0, 1, 2, 4, 8, 16, 32, 64, 128, 256, 512, 900, 900} {
		th.fail("k", now)
		if got := th.wait("k", now); got != want*time.Second {
			t.Errorf("after failure %d: wait %v, want %v", i+1, got, want*time.Second)
		}
	}
	th.fail("big", now)
	for range 100 {
		th.fail("big", now) // no overflow past the cap
	}
	if got := th.wait("big", now); got != 15*time.Minute {
		t.Errorf("after 101 failures: %v", got)
	}
	// Forgotten after a day without failures.
	if got := th.wait("k", now.Add(25*time.Hour)); got != 0 {
		t.Errorf("after a day: %v", got)
	}
}

func TestClientAddr(t *testing.T) {
	f := newFixture(t)
	req := httptest.NewRequest("POST", "/signin", nil)
	req.RemoteAddr = "192.0.2.7:5123"
	req.Header.Set("X-Forwarded-For", "198.51.100.1, 203.0.113.9")
	if got := f.s.clientAddr(req); got != "192.0.2.7" {
		t.Errorf("untrusted: %q, want the TCP peer", got)
	}
	f.s.cfg.TrustForwardedFor = true
	if got := f.s.clientAddr(req); got != "203.0.113.9" {
		t.Errorf("trusted: %q, want the last X-Forwarded-For entry", got)
	}
}

func TestSessionLimitsAndDisabling(t *testing.T) {
	f := newFixture(t)
	home := func(c *http.Cookie) int { // a signed-in page every principal here may use
		req := httptest.NewRequest("GET", "/wards/w-a/census", nil)
		req.AddCookie(c)
		res, _ := f.do(t, req)
		return res.StatusCode
	}
	c := MustSession(t, f.s, f.users[pNurseA].ID)
	f.clock.Add(7 * time.Hour)
	if got := home(c); got != 200 {
		t.Fatalf("7 h idle: %d, want 200", got)
	}
	f.clock.Add(8*time.Hour + time.Minute)
	if got := home(c); got != 303 {
		t.Errorf("8 h idle: %d, want 303 to sign-in", got)
	}

	c = MustSession(t, f.s, f.users[pNurseA].ID)
	for range 6 { // busy all shift: idle never reached, lifetime is
		f.clock.Add(2 * time.Hour)
		home(c)
	}
	if got := home(c); got != 303 {
		t.Errorf("after 12 h in use: %d, want 303", got)
	}

	c = MustSession(t, f.s, f.users[pManagerA].ID)
	yes := true
	if _, err := f.st.UpdateUser(context.Background(), f.users[pManagerA].ID, wardload.UserUpdate{Disabled: &yes}); err != nil {
		t.Fatal(err)
	}
	if got := home(c); got != 303 {
		t.Errorf("disabled user's session: %d, want 303", got)
	}
}

// TestOversizedSignInBody: the sign-in form has its own small limit; a
// bigger body is a plain 413 and is never looked at.
func TestOversizedSignInBody(t *testing.T) {
	f := newFixture(t)
	big := url.Values{"name": {"a.admin"}, "password": {strings.Repeat("p", 9<<10)}}
	res, body := f.do(t, post("/signin", big))
	if res.StatusCode != 413 || len(byTestID(t, body, "error-message")) != 1 {
		t.Errorf("status %d, want the 413 page", res.StatusCode)
	}
	if n := len(f.audit(t, "signin.fail")) + len(f.audit(t, "signin.ok")); n != 0 || f.sessionCookie(res) != nil {
		t.Errorf("oversized sign-in was processed: %d audit rows", n)
	}
}
