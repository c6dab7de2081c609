package server

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"time"

	"wardload/internal/password"
	"wardload/internal/wardload"
	"wardload/web"
)

// handlePasswordForm shows the page where the signed-in user changes their
// own password; after an administrator's reset it is the only page they
// may use (mustChangeFirst).
func (s *Server) handlePasswordForm(w http.ResponseWriter, r *http.Request) error {
	u := principalFrom(r.Context()).User
	vm := s.passwordVM(u)
	vm.Notice = s.sessions.PopString(r.Context(), sessFlash)
	return s.render(w, r, http.StatusOK, web.PasswordPage(s.layout(r, "Change password"), vm))
}

func (s *Server) passwordVM(u *wardload.User) web.PasswordVM {
	return web.PasswordVM{UserName: u.Name, MinLength: password.MinLength, MaxLength: password.MaxLength,
		Required: u.MustChangePassword, Errors: map[string]string{}}
}

// handlePasswordChange changes the signed-in user's password. The current
// password is required, so that an unattended signed-in browser is not
// enough to take the account over; wrong ones count against the account's
// sign-in throttle, as failed sign-ins do. The checks that need no hash
// come first (the two new ones agree, the policy of password.Check), then
// the current password and password.HashNew, inside a hash gate slot.
// Success ends every other session of the user, keeps this one with a new
// ID, and answers 303 back to the page, which confirms it. The passwords are never stored,
// logged, shown again or put into the audit row (which the store writes
// without the hash).
func (s *Server) handlePasswordChange(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	ctx := r.Context()
	u := principalFrom(ctx).User
	current, pw, repeat := r.PostForm.Get("current"), r.PostForm.Get("password"), r.PostForm.Get("repeat")
	vm := s.passwordVM(u)
	refuse := func(status int, field, msg string) error {
		vm.Errors[field] = msg
		return s.render(w, r, status, web.PasswordPage(s.layout(r, "Change password"), vm))
	}
	switch {
	case current == "":
		return refuse(http.StatusBadRequest, "current", "Enter your current password.")
	case pw != repeat:
		return refuse(http.StatusBadRequest, "repeat", "The two new passwords differ.")
	}
	if _, err := password.Check(pw, u.Name); err != nil {
		return refuse(http.StatusBadRequest, "password", wardload.ErrorMessage(err))
	}

	now := s.now()
	g := s.signin
	digest, err := g.keys.NameDigest(ctx, u.Name)
	if err != nil {
		return fmt.Errorf("password change: keys: %w", err)
	}
	// Wrong current passwords count against the account as sign-in
	// failures do (the same shared key), so the change page is no way
	// around the sign-in throttle.
	key := "acct:" + digest
	bg := context.WithoutCancel(ctx)
	d, err := g.acct.Reserve(ctx, key, now)
	if err != nil {
		return fmt.Errorf("password change: throttle: %w", err)
	}
	if d > 0 {
		w.Header().Set("Retry-After", strconv.Itoa(max(1, int(d.Round(time.Second)/time.Second))))
		return refuse(http.StatusTooManyRequests, "current", fmt.Sprintf(
			"Too many wrong passwords for this account. Please wait %s and try again.", waitText(d)))
	}
	gate := g.known
	if !gate.Enter(ctx) {
		if err := g.acct.Cancel(bg, key); err != nil {
			s.log.Error("password change throttle", "request_id", RequestID(ctx), "err", err)
		}
		w.Header().Set("Retry-After", strconv.Itoa(int(g.retryAfter.Round(time.Second)/time.Second)))
		return refuse(http.StatusServiceUnavailable, "current",
			"wardload is busy just now. Your password was not changed; please try again in a few seconds.")
	}
	hash, field, err := func() (string, string, error) {
		defer gate.Leave()
		ok, err := g.verify(current, u.PasswordHash)
		if err != nil || !ok {
			return "", "current", err // the reservation stays: a failed guess
		}
		if err := g.acct.Clear(bg, key); err != nil {
			s.log.Error("password change throttle", "request_id", RequestID(ctx), "err", err)
		}
		h, err := s.cfg.Password.HashNew(pw, u.Name, u.PasswordHash)
		return h, "password", err
	}()
	switch {
	case err != nil && wardload.ErrorCode(err) == wardload.EINVALID:
		return refuse(http.StatusBadRequest, field, wardload.ErrorMessage(err))
	case err != nil:
		return fmt.Errorf("password change: %w", err)
	case hash == "":
		return refuse(http.StatusBadRequest, "current", "That is not your current password.")
	}

	changed, err := s.store.UpdateUser(ctx, u.ID, wardload.UserUpdate{PasswordHash: &hash, MustChangePassword: new(false)})
	if wardload.ErrorCode(err) == wardload.EINVALID {
		return refuse(http.StatusBadRequest, "password", wardload.ErrorMessage(err))
	} else if err != nil {
		return fmt.Errorf("password change: %w", err)
	}
	if err := s.keepSessionAfterChange(ctx, changed); err != nil {
		return fmt.Errorf("password change: %w", err)
	}
	s.sessions.Put(ctx, sessFlash, "Your password was changed. You were signed out everywhere else.")
	return seeOther(w, r, passwordPath)
}
