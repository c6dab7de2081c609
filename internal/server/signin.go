package server

import (
	"context"
	"encoding/json"
	"fmt"
	"net"
	"net/http"
	"strconv"
	"strings"
	"time"

	"wardload/internal/password"
	"wardload/internal/signin"
	"wardload/internal/wardload"
	"wardload/web"
)

// signInFailed is the one message for every failed sign-in, so that the
// page never tells which of name and password was wrong.
const signInFailed = "Sign-in failed. Check your name and password. If they are right, ask an administrator whether your account is active."

// handleSignInForm shows the sign-in form.
func (s *Server) handleSignInForm(w http.ResponseWriter, r *http.Request) error {
	vm := web.SignInVM{Next: localPath(r.URL.Query().Get("next"))}
	return s.render(w, r, http.StatusOK, web.SignInPage(s.layout(r, "Sign in"), vm))
}

// signInGuard holds what protects sign-in from anonymous clients: the
// throttles of accounts, addresses and known devices (counted in the
// database, so every instance counts together), the bound on concurrent
// password hashes, device cookies, and the summarised audit of failures.
type signInGuard struct {
	acct, addr, device signin.Throttle
	// anon bounds the hashes of sign-ins from unknown devices; known those
	// with a valid device cookie, so a flood of anonymous sign-ins cannot
	// keep staff on their own browsers waiting.
	anon, known *signin.HashGate
	retryAfter  time.Duration // told to a sign-in refused as busy
	devices     *deviceCookies
	// keys are the installation's device cookie key and the key of the
	// digests that stand in for typed names, which are never stored.
	keys     *signin.Keys
	failures *signin.FailTally
	// verify checks a password against a stored hash; tests count calls.
	verify func(pw, encoded string) (bool, error)
}

func newSignInGuard(cfg Config) *signInGuard {
	return &signInGuard{
		acct:       signin.Throttle{Rule: signin.AccountRule, Store: cfg.Store},
		addr:       signin.Throttle{Rule: signin.AddressRule, Store: cfg.Store},
		device:     signin.Throttle{Rule: signin.DeviceRule, Store: cfg.Store},
		anon:       signin.NewHashGate(cfg.HashConcurrency, cfg.HashQueue, cfg.HashWait),
		known:      signin.NewHashGate(1, 2, cfg.HashWait),
		retryAfter: max(time.Second, cfg.HashWait),
		devices:    newDeviceCookies(cfg.SecureCookies),
		keys:       &signin.Keys{Store: cfg.Store},
		failures:   signin.NewFailTally(),
		verify:     password.Verify,
	}
}

// throttleKey is one key of one throttle.
type throttleKey struct {
	t   signin.Throttle
	key string
}

// handleSignIn checks a name and password. In order:
//
//   - The name is looked up (a cheap read), so that the audit can name a
//     real account and never stores a name that matches none.
//   - A valid device cookie for the account makes the attempt count
//     against that device only; otherwise it counts against the account
//     and the client address. The attempt is reserved before any hashing
//     (throttle.reserve), and a key that must wait is refused with 429.
//   - The hash runs only when a slot of the hash gate is free or frees
//     within a short wait; otherwise 503 with Retry-After, nothing hashed
//     and nothing counted against the user.
//
// Failures and refusals write no audit row each: FailTally summarises them
// per source and window. The password is never stored or logged.
func (s *Server) handleSignIn(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	name := strings.ToLower(strings.TrimSpace(r.PostForm.Get("name")))
	pw := r.PostForm.Get("password")
	vm := web.SignInVM{Name: auditName(name), Next: localPath(r.PostForm.Get("next"))}
	fail := func(status int, msg string) error {
		vm.Error = msg
		return s.render(w, r, status, web.SignInPage(s.layout(r, "Sign in"), vm))
	}
	if name == "" || pw == "" {
		return fail(http.StatusBadRequest, "Enter your name and your password.")
	}
	g, ctx := s.signin, r.Context()
	now, addr := s.now(), s.clientAddr(r)
	u, err := s.findSignInUser(r, name)
	if err != nil {
		return err
	}
	digest, err := g.keys.NameDigest(ctx, name)
	if err != nil {
		return fmt.Errorf("sign-in: keys: %w", err)
	}
	devKey, err := g.keys.Device(ctx)
	if err != nil {
		return fmt.Errorf("sign-in: keys: %w", err)
	}
	devices := g.devices.keyed(devKey)
	att := signin.Attempt{Source: addr}
	if u != nil {
		att.Account, att.AccountID = u.Name, u.ID
	} else {
		att.NameFP = digest[:8]
	}
	device, known := devices.find(r, name, now)
	att.KnownDevice = known

	// The keys this attempt counts against: the device alone when it is
	// known, else the account and the address. The account is keyed by
	// the digest of the name, whether or not an account has it, so the
	// table never holds a typed name and does not tell which names exist.
	keys := []throttleKey{{g.acct, "acct:" + digest}, {g.addr, "addr:" + addr}}
	if known {
		keys = []throttleKey{{g.device, "dev:" + device}}
	}
	// Give-backs and clears must happen even if the client has gone.
	bg := context.WithoutCancel(ctx)
	var held []throttleKey
	giveBack := func() {
		for _, k := range held {
			if err := k.t.Cancel(bg, k.key); err != nil {
				s.log.Error("sign-in throttle", "request_id", RequestID(ctx), "err", err)
			}
		}
	}
	for _, k := range keys {
		d, err := k.t.Reserve(ctx, k.key, now)
		if err != nil {
			giveBack()
			return fmt.Errorf("sign-in: throttle: %w", err)
		}
		if d > 0 {
			giveBack()
			s.recordFailure(r, att, "throttled", now)
			w.Header().Set("Retry-After", strconv.Itoa(max(1, int(d.Round(time.Second)/time.Second))))
			return fail(http.StatusTooManyRequests, fmt.Sprintf(
				"Too many failed sign-ins. Please wait %s and try again.", waitText(d)))
		}
		held = append(held, k)
	}

	gate := g.anon
	if known {
		gate = g.known
	}
	if !gate.Enter(ctx) {
		giveBack()
		s.recordFailure(r, att, "busy", now)
		w.Header().Set("Retry-After", strconv.Itoa(int(g.retryAfter.Round(time.Second)/time.Second)))
		return fail(http.StatusServiceUnavailable,
			"Sign-in is busy just now. Your password was not checked; please try again in a few seconds.")
	}
	reason := func() string {
		defer gate.Leave()
		return s.checkPassword(r, u, pw)
	}()
	if reason != "" {
		s.recordFailure(r, att, reason, now)
		return fail(http.StatusUnauthorized, signInFailed)
	}

	// A success clears the account (or the device) and is not a failure
	// of the address: every key reserved was held, the first is cleared
	// and the rest given back.
	if err := held[0].t.Clear(bg, held[0].key); err != nil {
		s.log.Error("sign-in throttle", "request_id", RequestID(ctx), "err", err)
	}
	held = held[1:]
	giveBack()

	// A new session ID at sign-in, so an ID planted before sign-in
	// (session fixation) is worthless afterwards.
	if err := s.sessions.RenewToken(ctx); err != nil {
		return fmt.Errorf("sign-in: renew session: %w", err)
	}
	s.sessions.Put(ctx, sessUserID, u.ID)
	s.sessions.Put(ctx, sessAuthAt, now.Unix())
	s.sessions.Put(ctx, sessSeenAt, now.Unix())
	s.rememberPasswordChanges(ctx, u)
	if err := s.appendAudit(r, wardload.Actor{UserID: u.ID, Name: u.Name}, wardload.ActionSignInOK, "user", u.ID, 0,
		map[string]string{"address": addr}); err != nil {
		return err
	}
	devices.issue(w, r, name, now)
	if u.MustChangePassword {
		return seeOther(w, r, passwordPath) // an admin's reset: first choose a new one
	}
	return seeOther(w, r, vm.Next)
}

// findSignInUser returns the user called name, or nil when there is none.
func (s *Server) findSignInUser(r *http.Request, name string) (*wardload.User, error) {
	if !wardload.StorableText(name) {
		// No user has such a name, and PostgreSQL refuses to look it up
		// (NUL, invalid UTF-8): answer as for any unknown name.
		return nil, nil
	}
	u, err := s.store.FindUserByName(r.Context(), name)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		return nil, nil
	} else if err != nil {
		return nil, fmt.Errorf("sign-in: find user: %w", err)
	}
	return u, nil
}

// checkPassword hashes pw and returns "" when it is u's password and the
// account is enabled; otherwise a reason for the audit log. An unknown
// name (u nil) still costs one hash, so timing does not tell which names
// exist. The caller holds a slot of the hash gate.
func (s *Server) checkPassword(r *http.Request, u *wardload.User, pw string) string {
	if u == nil {
		s.signin.verify(pw, s.dummyHash())
		return "unknown_name"
	}
	ok, err := s.signin.verify(pw, u.PasswordHash)
	switch {
	case err != nil:
		s.log.Error("stored password hash unreadable", "request_id", RequestID(r.Context()), "user_id", u.ID, "err", err)
		return "bad_hash"
	case !ok:
		return "password"
	case u.Disabled:
		return "disabled"
	}
	return ""
}

// recordFailure counts a failed or refused sign-in and writes whatever
// summary rows are due. A row that cannot be written is logged; the
// refusal stands.
func (s *Server) recordFailure(r *http.Request, a signin.Attempt, reason string, now time.Time) {
	a.Reason = reason
	s.writeFailureRows(context.WithoutCancel(r.Context()), s.signin.failures.Record(a, now))
}

// FlushSignInAudit writes the summarised sign-in failures not yet in the
// audit log. Serve calls it at shutdown.
func (s *Server) FlushSignInAudit(ctx context.Context) {
	s.writeFailureRows(ctx, s.signin.failures.Flush(s.now()))
}

func (s *Server) writeFailureRows(ctx context.Context, rows []*wardload.AuditEntry) {
	for _, e := range rows {
		if err := s.store.AppendAudit(ctx, e); err != nil {
			s.log.Error("audit failed", "request_id", RequestID(ctx), "action", e.Action, "err", err)
		}
	}
}

// dummyHash is a hash to verify against when the name is unknown. It is
// made on first use (inside a hash gate slot) so that servers in tests do
// not pay for it.
func (s *Server) dummyHash() string {
	s.dummyOnce.Do(func() {
		secret, _ := NewTokenSecret()
		h, err := s.cfg.Password.Hash(secret)
		if err != nil {
			h = "$argon2id$v=19$m=65536,t=1,p=2$AAAAAAAAAAAAAAAAAAAAAA$AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA"
		}
		s.dummy = h
	})
	return s.dummy
}

// handleSignOut ends the session. It is a POST so that a link or an image
// on another page cannot sign anybody out.
func (s *Server) handleSignOut(w http.ResponseWriter, r *http.Request) error {
	if err := s.sessions.Destroy(r.Context()); err != nil {
		return fmt.Errorf("sign-out: %w", err)
	}
	if u := principalFrom(r.Context()).User; u != nil {
		s.auditEvent(r, wardload.Actor{UserID: u.ID, Name: u.Name}, wardload.ActionSignOut, "user", u.ID, 0,
			map[string]string{"address": s.clientAddr(r)})
	}
	return seeOther(w, r, "/signin")
}

// clientAddr is the address failed sign-ins are counted against: the TCP
// peer, or with TrustForwardedFor the last X-Forwarded-For entry, which is
// the one the trusted proxy added (earlier entries are the client's word).
func (s *Server) clientAddr(r *http.Request) string {
	if s.cfg.TrustForwardedFor {
		if xff := r.Header.Values("X-Forwarded-For"); len(xff) > 0 {
			parts := strings.Split(xff[len(xff)-1], ",")
			if ip := net.ParseIP(strings.TrimSpace(parts[len(parts)-1])); ip != nil {
				return ip.String()
			}
		}
	}
	host, _, err := net.SplitHostPort(r.RemoteAddr)
	if err != nil {
		return r.RemoteAddr
	}
	return host
}

// auditName makes an attempted sign-in name safe to store and show: at
// most 40 characters, each a letter, digit, '.', '-' or '_', others '?'.
func auditName(name string) string {
	var b strings.Builder
	for i, c := range strings.ToLower(name) {
		if i >= 40 {
			break
		}
		if c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '.' || c == '-' || c == '_' {
			b.WriteRune(c)
		} else {
			b.WriteByte('?')
		}
	}
	return b.String()
}

func waitText(d time.Duration) string {
	if d <= time.Minute {
		return fmt.Sprintf("%d seconds", max(1, int(d.Round(time.Second)/time.Second)))
	}
	return fmt.Sprintf("%d minutes", int((d+time.Minute-1)/time.Minute))
}

// appendAudit records an event that is not itself a store change (sign-in,
// refused token) with details as the after JSON.
func (s *Server) appendAudit(r *http.Request, a wardload.Actor, action, entity string, entityID, wardID int64, details any) error {
	b, err := json.Marshal(details)
	if err != nil {
		return fmt.Errorf("audit %s: %w", action, err)
	}
	e := &wardload.AuditEntry{At: s.now(), UserID: a.UserID, Actor: a.Name, Action: action,
		Entity: entity, EntityID: entityID, WardID: wardID, After: string(b)}
	if err := s.store.AppendAudit(r.Context(), e); err != nil {
		return fmt.Errorf("audit %s: %w", action, err)
	}
	return nil
}

// auditEvent is appendAudit for refusals: the refusal stands even if the
// audit row cannot be written, and the failure is logged.
func (s *Server) auditEvent(r *http.Request, a wardload.Actor, action, entity string, entityID, wardID int64, details any) {
	if err := s.appendAudit(r, a, action, entity, entityID, wardID, details); err != nil {
		s.log.Error("audit failed", "request_id", RequestID(r.Context()), "action", action, "err", err)
	}
}
