package server

import (
	"context"
	"fmt"
	"net/http"

	"wardload/internal/wardload"
)

// sessPasswordChanges is the session key holding the user's
// PasswordChanges at sign-in (or at their own change). Sessions made
// before it existed read as 0, the count of a password never changed, so
// they stay valid until the first change.
const sessPasswordChanges = "password_changes"

// passwordPath is the page where users choose a new password.
const passwordPath = "/account/password"

// mustChangeRoutes are the routes a user whose password an administrator
// reset may still use: the change page itself and signing out.
var mustChangeRoutes = map[string]bool{
	"account.password":      true,
	"account.password.save": true,
	"signout":               true,
}

// sessionCurrent reports whether the session in ctx was signed in under
// u's current password: a change or reset of it since ends the session
// (wardload.User.SessionCurrent), on every store, at the next request.
func (s *Server) sessionCurrent(ctx context.Context, u *wardload.User) bool {
	return u.SessionCurrent(s.sessions.GetInt64(ctx, sessPasswordChanges))
}

// rememberPasswordChanges records u's count in the session in ctx, at
// sign-in and after the user's own change.
func (s *Server) rememberPasswordChanges(ctx context.Context, u *wardload.User) {
	s.sessions.Put(ctx, sessPasswordChanges, u.PasswordChanges)
}

// keepSessionAfterChange keeps the session that changed u's password
// signed in: a new session ID (the old one may have been seen by whoever
// knew the old password) holding the new count, so that it passes
// sessionCurrent while every other session of u fails it.
func (s *Server) keepSessionAfterChange(ctx context.Context, u *wardload.User) error {
	if err := s.sessions.RenewToken(ctx); err != nil {
		return fmt.Errorf("renew session: %w", err)
	}
	s.rememberPasswordChanges(ctx, u)
	return nil
}

// mustChangeFirst sends a user whose password an administrator reset to
// the change page from any other page (303, for GET and POST alike), and
// reports whether it did; the page says why. API tokens never come here.
func (s *Server) mustChangeFirst(rt Route, w http.ResponseWriter, r *http.Request, u *wardload.User) (bool, error) {
	if !u.MustChangePassword || mustChangeRoutes[rt.Name] {
		return false, nil
	}
	return true, seeOther(w, r, passwordPath)
}
