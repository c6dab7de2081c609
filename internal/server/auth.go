package server

import (
	"context"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"time"

	"github.com/alexedwards/scs/v2"
	"github.com/go-chi/chi/v5"

	"wardload/internal/session"
	"wardload/internal/wardload"
)

// Session keys. The session holds only the user's ID and two times; the
// user row itself is read again on every request, so disabling a user or
// changing their role takes effect at once.
const (
	sessUserID = "user_id"
	sessAuthAt = "auth_at" // unix seconds of the sign-in
	sessSeenAt = "seen_at" // unix seconds of the last request
	sessFlash  = "flash"   // one-time notice shown on the next page
	sessSecret = "token_secret"
)

// allRoles is the Access.Roles of routes any signed-in user may use.
var allRoles = wardload.Roles

// wardStaff are the roles that work on a ward and may change what
// happens on it (census, end-of-shift records, planned staff): everyone
// but the read-only staffing office.
var wardStaff = []string{wardload.RoleChargeNurse, wardload.RoleManager, wardload.RoleAdmin}

// readOnly reports whether the signed-in user only reads (the staffing
// office), so pages leave out the links to entry forms.
func readOnly(r *http.Request) bool {
	u := principalFrom(r.Context()).User
	return u != nil && u.Role == wardload.RoleStaffingOffice
}

// readers are the roles that may read and download a ward's projections
// and the board: managers, the staffing office and admins.
var readers = []string{wardload.RoleManager, wardload.RoleStaffingOffice, wardload.RoleAdmin}

// principal is who is making the request: a signed-in user (pages) or an
// API token (API routes), never both.
type principal struct {
	User  *wardload.User
	Token *wardload.APIToken
	Ward  *wardload.Ward // the {ward} of a WardScoped route, once checked
}

type principalKey struct{}

func withPrincipal(ctx context.Context, p *principal) context.Context {
	return context.WithValue(ctx, principalKey{}, p)
}

// principalFrom returns the request's principal; the zero principal when
// nobody is signed in.
func principalFrom(ctx context.Context) *principal {
	if p, ok := ctx.Value(principalKey{}).(*principal); ok {
		return p
	}
	return &principal{}
}

// newSessions builds the session manager. Cookies are HttpOnly and
// SameSite=Lax; with SecureCookies they are also Secure and take the
// __Host- prefix, which browsers only accept over HTTPS for the whole host.
func newSessions(cfg Config) *scs.SessionManager {
	sm := scs.New()
	if cfg.SessionStore != nil {
		sm.Store = cfg.SessionStore
	}
	// Every store, the in-memory default too, keeps sessions under the
	// hash of their token: a copy of the sessions table signs nobody in.
	sm.Store = session.Hashed(sm.Store)
	sm.Codec = session.Codec{}
	sm.Lifetime = cfg.SessionLifetime
	// No scs IdleTimeout: scs would then mark every loaded session
	// modified and write it back (a database write, and on SQLite a WAL
	// sync, on every page view). sessionUser enforces cfg.SessionIdle
	// itself from seen_at, by the injected clock, and refreshes seen_at at
	// most once a minute; the store row still expires at Lifetime.
	sm.IdleTimeout = 0
	sm.Cookie.Name = "wardload_session"
	sm.Cookie.HttpOnly = true
	sm.Cookie.SameSite = http.SameSiteLaxMode
	sm.Cookie.Path = "/"
	sm.Cookie.Persist = false // a shared ward computer forgets it when the browser closes
	if cfg.SecureCookies {
		sm.Cookie.Secure = true
		sm.Cookie.Name = "__Host-wardload_session"
	}
	return sm
}

// guard enforces a route's Access. Public routes pass, without touching
// the session when they are NoSession. Pages need a
// signed-in, enabled user and otherwise redirect to sign-in; API routes
// need a bearer token and otherwise answer 401. A wrong role is 403; on
// WardScoped routes a ward that does not exist is 404 and one the user or
// token may not see is 403. A route without a declaration is refused
// (New also refuses to build such a table).
func (s *Server) guard(rt Route, next http.Handler) http.Handler {
	a := rt.Access
	switch {
	case a.Public && a.NoSession:
		return next
	case a.Public:
		return s.withSession(s.optionalUser(next))
	case a.API:
		return s.requireToken(rt, next)
	case len(a.Roles) > 0:
		return s.withSession(s.requireUser(rt, next))
	}
	return s.handle(func(http.ResponseWriter, *http.Request) error {
		return wardload.Errorf(wardload.EFORBIDDEN, "This page is not available.")
	})
}

// checkAccess reports whether the Access of a route is declared: public,
// API, or a list of known roles (API routes take tokens, which have no role).
func checkAccess(rt Route) bool {
	a := rt.Access
	n := 0
	for _, b := range []bool{a.Public, a.API, len(a.Roles) > 0} {
		if b {
			n++
		}
	}
	if n != 1 || (a.NoSession && !a.Public) {
		return false
	}
	for _, r := range a.Roles {
		if !wardload.ValidRole(r) {
			return false
		}
	}
	if a.WriteStaffing && !a.API {
		return false
	}
	if a.WardScoped && !strings.Contains(rt.Pattern, "{ward}") {
		return false
	}
	return true
}

// optionalUser attaches the signed-in user, if any, to public pages so
// the layout can show who is signed in. Failures leave the page anonymous.
func (s *Server) optionalUser(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if u, err := s.sessionUser(r); err == nil && u != nil {
			r = r.WithContext(withActor(withPrincipal(r.Context(), &principal{User: u}), u))
		}
		next.ServeHTTP(w, r)
	})
}

// requireUser is the guard of page routes. The request carries one
// principal from the start, so a refusal (wrong role or ward) renders with
// the person attached and the error page still shows who is signed in.
func (s *Server) requireUser(rt Route, next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		u, err := s.sessionUser(r)
		p := &principal{User: u}
		r = r.WithContext(withPrincipal(r.Context(), p))
		if err == nil {
			err = s.admit(rt, next, w, r, p)
		}
		if err != nil {
			s.renderError(w, r, err)
		}
	})
}

// admit is the decision of requireUser once the session has been read;
// it completes p with the route's ward before serving next.
func (s *Server) admit(rt Route, next http.Handler, w http.ResponseWriter, r *http.Request, p *principal) error {
	u := p.User
	if u == nil {
		// Only a GET can be repeated after signing in; a form post
		// is lost and the person starts again from the home page.
		dest := "/"
		if r.Method == http.MethodGet {
			dest = localPath(r.URL.RequestURI())
		}
		return seeOther(w, r, "/signin?next="+url.QueryEscape(dest))
	}
	if sent, err := s.mustChangeFirst(rt, w, r, u); sent || err != nil {
		return err
	}
	if !slices.Contains(rt.Access.Roles, u.Role) {
		return wardload.Errorf(wardload.EFORBIDDEN, "Your role does not allow this page.")
	}
	if rt.Access.WardScoped {
		ward, err := s.scopedWard(r)
		if err != nil {
			return err
		}
		if !u.MemberOf(ward.ID) {
			return wardload.Errorf(wardload.EFORBIDDEN, "You are not a member of this ward.")
		}
		p.Ward = ward
	}
	next.ServeHTTP(w, r.WithContext(withActor(r.Context(), u)))
	return nil
}

// sessionUser returns the signed-in user, or nil when there is none: no
// session, a session past its idle or absolute limit (by the injected
// clock, so tests need no sleeps), a user who is gone or disabled, or a
// session from before the user's password last changed (sessionCurrent).
// A dead session is destroyed so its cookie stops working.
func (s *Server) sessionUser(r *http.Request) (*wardload.User, error) {
	ctx := r.Context()
	id := s.sessions.GetInt64(ctx, sessUserID)
	if id == 0 {
		return nil, nil
	}
	now := s.now()
	authAt := time.Unix(s.sessions.GetInt64(ctx, sessAuthAt), 0)
	seenAt := time.Unix(s.sessions.GetInt64(ctx, sessSeenAt), 0)
	if now.Sub(authAt) >= s.cfg.SessionLifetime || now.Sub(seenAt) >= s.cfg.SessionIdle {
		return nil, s.sessions.Destroy(ctx)
	}
	u, err := s.store.FindUserByID(ctx, id)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && (u.Disabled || !s.sessionCurrent(ctx, u))) {
		return nil, s.sessions.Destroy(ctx)
	} else if err != nil {
		return nil, err
	}
	// Refresh the idle clock at most once a minute, to spare the session
	// table a write on every request.
	if now.Sub(seenAt) > time.Minute {
		s.sessions.Put(ctx, sessSeenAt, now.Unix())
	}
	return u, nil
}

// scopedWard finds the {ward} of the request.
func (s *Server) scopedWard(r *http.Request) (*wardload.Ward, error) {
	code := chi.URLParam(r, "ward")
	if !wardload.ValidCode(code) {
		return nil, wardload.Errorf(wardload.ENOTFOUND, "There is no such ward.")
	}
	w, err := s.store.FindWardByCode(r.Context(), code)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		return nil, wardload.Errorf(wardload.ENOTFOUND, "There is no such ward.")
	}
	return w, err
}

// withActor makes store writes of this request audit u.
func withActor(ctx context.Context, u *wardload.User) context.Context {
	return wardload.WithActor(ctx, wardload.Actor{UserID: u.ID, Name: u.Name})
}

// localPath returns p if it is a path on this site, else "/". It stops
// the sign-in page's next parameter from sending people elsewhere.
func localPath(p string) string {
	if p == "" || p[0] != '/' || strings.HasPrefix(p, "//") || strings.ContainsAny(p, "\\\r\n\t") {
		return "/"
	}
	u, err := url.Parse(p)
	if err != nil || u.Scheme != "" || u.Host != "" || u.User != nil {
		return "/"
	}
	return p
}
