package server

import (
	"net/http"
	"slices"

	"github.com/go-chi/chi/v5"
	"github.com/go-chi/chi/v5/middleware"

	"wardload/internal/wardload"
)

// handlerFunc is the shape of every wardload handler: it writes a response
// on success and returns an error otherwise, which handle renders.
type handlerFunc func(w http.ResponseWriter, r *http.Request) error

// Access declares who may use a route. The route table is the only place
// it is declared, so one test can walk every route × role.
type Access struct {
	// Public routes are open to anybody, signed in or not.
	Public bool
	// Roles that may use the route (wardload.Role*); empty with Public
	// false means any signed-in user.
	Roles []string
	// API routes authenticate with a token or session and answer JSON;
	// a missing sign-in is 401 rather than a redirect to the sign-in page.
	API bool
	// WardScoped routes carry {ward} (a ward code) in the pattern; the
	// user must be a member of that ward (admins are members of all).
	WardScoped bool
}

// Route is one entry of the route table.
type Route struct {
	Method  string
	Pattern string // chi pattern, e.g. "/wards/{ward}/census"
	Name    string // short stable name for logs and tests, e.g. "home"
	Access  Access
	Handler handlerFunc
	// MaxBodyBytes overrides Config.MaxBodyBytes for this route, e.g. for
	// a CSV upload; 0 keeps the server's limit.
	MaxBodyBytes int64
}

// routeTable is the one list of wardload's routes. To add a route, add an
// entry here with its Access; nothing else registers routes.
func (s *Server) routeTable() []Route {
	public := Access{Public: true}
	return []Route{
		{Method: http.MethodGet, Pattern: "/", Name: "home", Access: public, Handler: s.handleHome},
		{Method: http.MethodGet, Pattern: "/healthz", Name: "healthz", Access: public, Handler: s.handleHealthz},
		{Method: http.MethodGet, Pattern: "/readyz", Name: "readyz", Access: public, Handler: s.handleReadyz},
		{Method: http.MethodGet, Pattern: "/static/*", Name: "static", Access: public, Handler: s.handleStatic},
	}
}

// Routes returns a copy of the route table, for tests that check every
// route (access, headers) without listing them again.
func (s *Server) Routes() []Route {
	rs := s.routeTable()
	for i := range rs {
		rs[i].Access.Roles = slices.Clone(rs[i].Access.Roles)
	}
	return rs
}

// router builds the handler for routes. Middleware order matters: the
// request ID comes first so every log line has it; logging wraps the
// recoverer so a panic is logged as a 500; security headers are set before
// anything can write, so every response, 404s and refusals included,
// carries them. The body limit is per route (see Route.MaxBodyBytes);
// requests that match no route never have their body read.
func (s *Server) router(routes []Route) http.Handler {
	r := chi.NewRouter()
	r.Use(s.requestID, s.logRequests, s.recoverPanics, securityHeaders)
	r.Use(s.crossOrigin)
	// HEAD is answered by the GET route (monitoring tools and link
	// checkers send HEAD).
	r.Use(middleware.GetHead)
	r.NotFound(s.handle(func(http.ResponseWriter, *http.Request) error {
		return wardload.Errorf(wardload.ENOTFOUND, "There is no page at this address.")
	}))
	r.MethodNotAllowed(s.handle(func(w http.ResponseWriter, r *http.Request) error {
		allowMethods(w, r, routes)
		return &wardload.Error{Code: eMethod, Message: "This address does not accept that kind of request."}
	}))
	for _, rt := range routes {
		limit := s.cfg.MaxBodyBytes
		if rt.MaxBodyBytes > 0 {
			limit = rt.MaxBodyBytes
		}
		r.Method(rt.Method, rt.Pattern, s.limitBody(limit, s.guard(rt, s.handle(rt.Handler))))
	}
	return r
}

// guard is where a route's Access is enforced. Nothing is enforced yet:
// sign-in, roles and ward membership arrive with the accounts work, which
// replaces this body (redirect to sign-in for pages, 401 for API, 403 for
// a wrong role or ward).
func (s *Server) guard(rt Route, next http.Handler) http.Handler {
	return next
}

// allowMethods sets the Allow header of a 405 from the route table, since
// chi only sets it in its own default handler.
func allowMethods(w http.ResponseWriter, r *http.Request, routes []Route) {
	rctx := chi.RouteContext(r.Context())
	if rctx == nil || rctx.Routes == nil {
		return
	}
	var allowed []string
	for _, rt := range routes {
		if !slices.Contains(allowed, rt.Method) && rctx.Routes.Match(chi.NewRouteContext(), rt.Method, r.URL.Path) {
			allowed = append(allowed, rt.Method)
		}
	}
	if slices.Contains(allowed, http.MethodGet) {
		allowed = append(allowed, http.MethodHead)
	}
	for _, m := range allowed {
		w.Header().Add("Allow", m)
	}
}
