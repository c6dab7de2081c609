package server

import (
	"context"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"wardload/internal/password"
	"wardload/internal/signin"
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
	cfg.Password = testPassword
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
	for i, tc := range []struct{ name, pw, reason, actor string }{
		{"m.manager", "wrong password 1", "password", "m.manager"},
		{"nobody.here", "whatever pw 12", "unknown_name", signin.UnknownName},
		{"d.disabled", "disabled pw 123", "disabled", "d.disabled"},
	} {
		// Each from its own address: the first failure of a source is
		// written at once, later ones are summarised.
		req := signInForm(tc.name, tc.pw, "/")
		req.RemoteAddr = fmt.Sprintf("198.51.100.%d:4000", i+1)
		res, body := f.do(t, req)
		if res.StatusCode != http.StatusUnauthorized || f.sessionCookie(res) != nil {
			t.Errorf("%s: status %d, cookie %v; want 401 and no session", tc.name, res.StatusCode, f.sessionCookie(res))
		}
		msgs = append(msgs, strings.Join(byTestID(t, body, "signin-error"), ""))
		es := f.audit(t, "signin.fail")
		if len(es) != i+1 || es[0].Actor != tc.actor || !strings.Contains(es[0].After, `"reasons":{"`+tc.reason+`":1}`) ||
			!strings.Contains(es[0].After, `"count":1`) {
			t.Errorf("%s: %d rows, newest signin.fail = %+v", tc.name, len(es), es[0])
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
	// A hostile name matches no account, so it is not stored at all.
	req := signInForm("<script>"+strings.Repeat("x", 200), "pw", "/")
	req.RemoteAddr = "198.51.100.9:4000"
	f.do(t, req)
	if es := f.audit(t, "signin.fail"); es[0].Actor != signin.UnknownName || strings.Contains(es[0].After, "script") {
		t.Errorf("stored %q %s", es[0].Actor, es[0].After)
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
	for i := range 3 {
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
	// The refusal writes no row of its own: the one row is the first
	// failure's, which opened this address's audit window.
	if n := len(f.audit(t, "signin.fail")); n != 1 || len(f.audit(t, "signin.ok")) != 0 {
		t.Errorf("%d signin.fail rows, want 1; or signed in", n)
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

// countChecks makes f count the password checks its server runs. Each
// check first calls hold (nil: none), which a test may block.
func countChecks(f *fixture, hold func()) *atomic.Int64 {
	var n atomic.Int64
	f.s.signin.verify = func(pw, encoded string) (bool, error) {
		n.Add(1)
		if hold != nil {
			hold()
		}
		return password.Verify(pw, encoded)
	}
	return &n
}

// serve runs req through f's handler and returns the status, for use in
// goroutines (no testing.TB calls).
func (f *fixture) serve(req *http.Request) int {
	rec := httptest.NewRecorder()
	f.h.ServeHTTP(rec, req)
	return rec.Code
}

// deviceCookie returns the device cookie res sets, or nil.
func (f *fixture) deviceCookie(res *http.Response) *http.Cookie {
	for _, c := range res.Cookies() {
		if c.Name == f.s.signin.devices.name {
			return c
		}
	}
	return nil
}

// TestSignInBurstChecksAtMostTheLimit: 30 concurrent wrong guesses for one
// account from one address. Every check is held until all 30 requests are
// either answered or checking, so they truly overlap; only the account's
// limit (3) may reach the hash. Before attempts were reserved, the check
// came before hashing and the count after, and all 30 were checked.
func TestSignInBurstChecksAtMostTheLimit(t *testing.T) {
	f := newFixture(t)
	const burst = 30
	f.s.signin.anon = signin.NewHashGate(burst, 0, time.Hour) // the throttle alone must cut it
	hashing, release := make(chan struct{}, burst), make(chan struct{})
	checked := countChecks(f, func() { hashing <- struct{}{}; <-release })
	codes := make(chan int, burst)
	for i := range burst {
		go func() { codes <- f.serve(signInForm("n.nurse", fmt.Sprintf("wrong guess %02d", i), "/")) }()
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
	if checked.Load() != 3 || got[http.StatusUnauthorized] != 3 || got[http.StatusTooManyRequests] != burst-3 {
		t.Errorf("checked %d, statuses %v; want 3 checked, 3×401 and %d×429", checked.Load(), got, burst-3)
	}
}

func sum(m map[int]int) int {
	n := 0
	for _, v := range m {
		n += v
	}
	return n
}

// TestSignInBusyRefusesWithoutHashing: when every hash slot is taken and
// the queue is full, sign-in answers 503 with Retry-After at once, hashes
// nothing, counts nothing against the user and writes no row per refusal.
func TestSignInBusyRefusesWithoutHashing(t *testing.T) {
	f := newFixture(t)
	checked := countChecks(f, nil)
	f.s.signin.anon = signin.NewHashGate(1, 0, time.Hour)
	if !f.s.signin.anon.Enter(context.Background()) { // another sign-in is hashing
		t.Fatal("could not take the only slot")
	}
	right := f.passwords["n.nurse"]
	res, body := f.do(t, signInForm("n.nurse", right, "/"))
	if res.StatusCode != http.StatusServiceUnavailable || res.Header.Get("Retry-After") != "2" || f.sessionCookie(res) != nil {
		t.Fatalf("busy = %d Retry-After %q, want 503 and 2", res.StatusCode, res.Header.Get("Retry-After"))
	}
	if got := byTestID(t, body, "signin-error"); len(got) != 1 || !strings.Contains(got[0], "not checked") {
		t.Errorf("message %q", got)
	}
	for i := range 200 {
		if res, _ := f.do(t, signInForm("n.nurse", fmt.Sprintf("guess %d", i), "/")); res.StatusCode != 503 {
			t.Fatalf("refusal %d = %d, want 503", i, res.StatusCode)
		}
	}
	if n := checked.Load(); n != 0 {
		t.Errorf("%d passwords checked while busy, want 0", n)
	}
	if es := f.audit(t, "signin.fail"); len(es) != 1 || !strings.Contains(es[0].After, `"busy":1`) {
		t.Errorf("audit rows for 201 refusals: %d, want the window's one row", len(es))
	}
	// Refusals were not failures: once a slot is free, the right
	// password signs in (neither account nor address throttled).
	f.s.signin.anon.Leave()
	if res, _ := f.do(t, signInForm("n.nurse", right, "/")); res.StatusCode != 303 || checked.Load() != 1 {
		t.Errorf("after the load = %d with %d checks, want 303 and 1", res.StatusCode, checked.Load())
	}
}

// TestKnownDeviceSignsInDuringAttack: someone guesses the charge nurse's
// password from the hospital's own address until both the account and the
// address are throttled. The nurse's browser, which signed in before,
// still gets its attempt at once; browsers that never did, and other
// accounts, do not.
func TestKnownDeviceSignsInDuringAttack(t *testing.T) {
	f := newFixture(t)
	right := f.passwords["n.nurse"]
	res, _ := f.do(t, signInForm("n.nurse", right, "/"))
	dev := f.deviceCookie(res)
	if res.StatusCode != 303 || dev == nil {
		t.Fatalf("first sign-in = %d, device cookie %v", res.StatusCode, dev)
	}
	if !dev.HttpOnly || dev.Path != "/signin" || dev.SameSite != http.SameSiteStrictMode || dev.MaxAge <= 0 ||
		strings.Contains(dev.Value, "n.nurse") {
		t.Errorf("device cookie %+v", dev)
	}
	f.clock.Add(time.Hour)

	checked := countChecks(f, nil)
	for i := range 50 {
		f.do(t, signInForm("n.nurse", fmt.Sprintf("guess %d", i), "/"))
	}
	for i := range 30 { // and other names, until the address waits too
		f.do(t, signInForm(fmt.Sprintf("x%02d", i), "guess", "/"))
	}
	attackChecks := checked.Load()
	if res, _ := f.do(t, signInForm("n.nurse", right, "/")); res.StatusCode != http.StatusTooManyRequests {
		t.Fatalf("unknown browser during the attack = %d, want 429", res.StatusCode)
	}
	if w, err := f.s.signin.addr.Wait(context.Background(), "addr:192.0.2.1", f.clock.Now()); w == 0 || err != nil {
		t.Fatal("the address is not throttled; the test does not show what it should")
	}

	withDevice := func(name, pw string, c *http.Cookie) *http.Request {
		req := signInForm(name, pw, "/")
		req.AddCookie(c)
		return req
	}
	res, _ = f.do(t, withDevice("n.nurse", right, dev))
	if res.StatusCode != 303 || f.sessionCookie(res) == nil {
		t.Fatalf("known device during the attack = %d, want 303 and a session", res.StatusCode)
	}
	dev2 := f.deviceCookie(res)
	if dev2 == nil || dev2.Value == dev.Value {
		t.Error("no fresh device cookie at sign-in")
	}
	// The attack is still held up: its counts were not cleared.
	if res, _ := f.do(t, signInForm("n.nurse", "guess again", "/")); res.StatusCode != 429 {
		t.Errorf("attacker after the nurse signed in = %d, want 429", res.StatusCode)
	}
	// The cookie vouches for n.nurse only, and only as issued: from a
	// fresh address, m.manager's account (attacked too) still waits, and
	// so does n.nurse's with a tampered cookie.
	for i := range 3 {
		req := signInForm("m.manager", fmt.Sprintf("guess %d", i), "/")
		req.RemoteAddr = "203.0.113.5:4000"
		f.do(t, req)
	}
	fresh := func(res *http.Request) *http.Request { res.RemoteAddr = "198.51.100.77:4000"; return res }
	if res, _ := f.do(t, fresh(withDevice("m.manager", f.passwords["m.manager"], dev2))); res.StatusCode != 429 {
		t.Errorf("n.nurse's device for m.manager = %d, want 429", res.StatusCode)
	}
	// Change the MAC's last two characters, to something else than they
	// are: a fixed "AA" was already there about once in 256 runs (the
	// last base64 character of 16 bytes is one of only four), and then
	// the "forged" cookie was the real one.
	forged := *dev2
	suffix := "AA"
	if strings.HasSuffix(dev2.Value, suffix) {
		suffix = "BQ"
	}
	forged.Value = dev2.Value[:len(dev2.Value)-2] + suffix
	if res, _ := f.do(t, fresh(withDevice("n.nurse", right, &forged))); res.StatusCode != 429 {
		t.Errorf("tampered device cookie = %d, want 429", res.StatusCode)
	}
	// The device has a limit of its own: five failures, then it waits.
	before := checked.Load()
	codes := map[int]int{}
	for i := range 20 {
		codes[f.serve(withDevice("n.nurse", fmt.Sprintf("typo %d", i), dev2))]++
	}
	if codes[401] != 5 || codes[429] != 15 || checked.Load()-before != 5 {
		t.Errorf("20 wrong passwords on the known device: %v, %d checked; want 5×401, 15×429", codes, checked.Load()-before)
	}
	// The attack's checks: n.nurse's limit (3), then other names until
	// the address reached its limit (20 attempts in all).
	if attackChecks != 20 {
		t.Errorf("the attack had %d passwords checked, want 20", attackChecks)
	}
}

// TestThrottledFloodAddsBoundedAuditRows: 10,000 guesses from one address
// within one window add one audit row, and the count reaches the log
// once the window is over.
func TestThrottledFloodAddsBoundedAuditRows(t *testing.T) {
	f := newFixture(t)
	all := func() int {
		_, n, err := f.st.FindAudit(context.Background(), wardload.AuditFilter{Limit: 1})
		if err != nil {
			t.Fatal(err)
		}
		return n
	}
	before := all()
	const flood = 10_000
	codes := map[int]int{}
	for i := range flood {
		codes[f.serve(signInForm("n.nurse", fmt.Sprintf("guess %d", i), "/"))]++
	}
	if codes[401] != 3 || codes[429] != flood-3 {
		t.Errorf("statuses %v, want 3×401 and the rest 429", codes)
	}
	if added := all() - before; added != 1 {
		t.Errorf("%d throttled attempts added %d audit rows, want 1", flood, added)
	}
	// After the window, a sweep (run by the next sign-in attempt, from
	// anywhere) writes the rest as one row.
	f.clock.Add(signin.FailWindow)
	req := signInForm("m.manager", "guess", "/")
	req.RemoteAddr = "198.51.100.20:4000"
	f.do(t, req)
	es := f.audit(t, "signin.fail")
	total := 0
	for _, e := range es {
		var row signin.FailRow
		if err := json.Unmarshal([]byte(e.After), &row); err != nil {
			t.Fatal(err)
		}
		if row.Address == "192.0.2.1" {
			total += row.Count
		}
	}
	if len(es) != 3 || total != flood {
		t.Errorf("%d rows counting %d attempts from the flood, want 3 rows (2 for it) and %d", len(es), total, flood)
	}
}

// TestUnknownNameNeverStored: a password typed into the name box is not
// kept, in any form, in the audit log.
func TestUnknownNameNeverStored(t *testing.T) {
	f := newFixture(t)
	const typed = "Tr0ub4dor&3 horse"
	f.do(t, signInForm(typed, "pw", "/"))
	f.do(t, signInForm(typed, "pw", "/"))
	f.clock.Add(signin.FailWindow)
	f.do(t, signInForm(typed, "pw", "/"))
	es, _, err := f.st.FindAudit(context.Background(), wardload.AuditFilter{})
	if err != nil {
		t.Fatal(err)
	}
	fails := 0
	for _, e := range es {
		for _, v := range []string{e.Actor, e.Before, e.After} {
			if strings.Contains(strings.ToLower(v), "tr0ub4dor") {
				t.Errorf("typed name kept in %s row: %q", e.Action, v)
			}
		}
		if e.Action == "signin.fail" {
			fails++
			var row signin.FailRow
			if err := json.Unmarshal([]byte(e.After), &row); err != nil {
				t.Fatal(err)
			}
			if e.Actor != signin.UnknownName || len(row.NameFP) != 8 || row.UnknownNames != row.Count {
				t.Errorf("row %q %+v, want %q and an 8-character fingerprint", e.Actor, row, signin.UnknownName)
			}
		}
	}
	if fails != 2 {
		t.Errorf("%d signin.fail rows, want 2 (one per window)", fails)
	}
}
