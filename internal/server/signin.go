package server

import (
	"encoding/json"
	"errors"
	"fmt"
	"net"
	"net/http"
	"strconv"
	"strings"
	"time"

	"wardload/internal/password"
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

// handleSignIn checks a name and password. Throttled attempts are refused
// before the password is looked at; every failure is audited with the
// attempted name (sanitised), never the password.
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
	now, addr := s.now(), s.clientAddr(r)
	acctKey, addrKey := "name:"+auditName(name), "addr:"+addr
	if d := max(s.acctThrottle.wait(acctKey, now), s.addrThrottle.wait(addrKey, now)); d > 0 {
		s.auditEvent(r, wardload.Actor{Name: auditName(name)}, "signin.throttled", "user", 0, 0,
			map[string]string{"address": addr})
		secs := int(d.Round(time.Second) / time.Second)
		w.Header().Set("Retry-After", strconv.Itoa(max(secs, 1)))
		return fail(http.StatusTooManyRequests, fmt.Sprintf(
			"Too many failed sign-ins. Please wait %s and try again.", waitText(d)))
	}

	u, reason, err := s.checkPassword(r, name, pw)
	if err != nil {
		return err
	}
	if reason != "" {
		s.acctThrottle.fail(acctKey, now)
		s.addrThrottle.fail(addrKey, now)
		var id int64
		if u != nil {
			id = u.ID
		}
		s.auditEvent(r, wardload.Actor{Name: auditName(name)}, "signin.fail", "user", id, 0,
			map[string]string{"reason": reason, "address": addr})
		return fail(http.StatusUnauthorized, signInFailed)
	}

	s.acctThrottle.succeed(acctKey)
	// A new session ID at sign-in, so an ID planted before sign-in
	// (session fixation) is worthless afterwards.
	ctx := r.Context()
	if err := s.sessions.RenewToken(ctx); err != nil {
		return fmt.Errorf("sign-in: renew session: %w", err)
	}
	s.sessions.Put(ctx, sessUserID, u.ID)
	s.sessions.Put(ctx, sessAuthAt, now.Unix())
	s.sessions.Put(ctx, sessSeenAt, now.Unix())
	if err := s.appendAudit(r, wardload.Actor{UserID: u.ID, Name: u.Name}, "signin.ok", "user", u.ID, 0,
		map[string]string{"address": addr}); err != nil {
		return err
	}
	return seeOther(w, r, vm.Next)
}

// checkPassword returns the user and "" when name and pw are right and the
// account is enabled; otherwise a reason for the audit log. An unknown name
// still costs one hash, so timing does not tell which names exist.
func (s *Server) checkPassword(r *http.Request, name, pw string) (*wardload.User, string, error) {
	if !wardload.StorableText(name) {
		// No user has such a name, and PostgreSQL refuses to look it up
		// (NUL, invalid UTF-8): answer as for any unknown name.
		password.Verify(pw, s.dummyHash())
		return nil, "unknown_name", nil
	}
	u, err := s.store.FindUserByName(r.Context(), name)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		password.Verify(pw, s.dummyHash())
		return nil, "unknown_name", nil
	} else if err != nil {
		return nil, "", fmt.Errorf("sign-in: find user: %w", err)
	}
	ok, err := password.Verify(pw, u.PasswordHash)
	switch {
	case err != nil:
		s.log.Error("stored password hash unreadable", "request_id", RequestID(r.Context()), "user_id", u.ID, "err", err)
		return u, "bad_hash", nil
	case !ok:
		return u, "password", nil
	case u.Disabled:
		return u, "disabled", nil
	}
	return u, "", nil
}

// dummyHash is a hash to verify against when the name is unknown. It is
// made on first use so that servers in tests do not pay for it.
func (s *Server) dummyHash() string {
	s.dummyOnce.Do(func() {
		secret, _ := NewTokenSecret()
		h, err := password.Hash(secret)
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

// formError turns a form that cannot be read into a plain refusal; an
// oversized body keeps its *http.MaxBytesError so the adapter says 413.
func formError(err error) error {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return err
	}
	return wardload.Errorf(wardload.EINVALID, "The form could not be read.")
}
