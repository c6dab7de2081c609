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
// it is declared, so one test can walk every route × role. Exactly one of
// Public, API or Roles must be set; New refuses a route with none.
type Access struct {
	// Public routes are open to anybody, signed in or not.
	Public bool
	// NoSession marks a Public route that never shows who is signed in
	// (assets, probes, the OpenAPI document): it skips the session read,
	// the user lookup and the Vary: Cookie that loading a session adds.
	NoSession bool
	// Roles that may use the page (wardload.Role*); allRoles for any
	// signed-in user. Signed-out visitors are sent to the sign-in page.
	Roles []string
	// API routes take a bearer token (never a session cookie) and answer
	// JSON; a missing or bad token is 401. Tokens have wards, not roles.
	API bool
	// WardScoped routes carry {ward} (a ward code) in the pattern; the
	// user or token must be a member of that ward (admins are members of
	// all). An unknown ward is 404.
	WardScoped bool
	// WriteStaffing marks an API route that changes planned staff: the
	// token must have APIToken.WriteStaffing, else 403.
	WriteStaffing bool
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
	sessionless := Access{Public: true, NoSession: true}
	signedIn := Access{Roles: allRoles}
	managers := Access{Roles: []string{wardload.RoleManager, wardload.RoleAdmin}}
	wardManagers := Access{Roles: managers.Roles, WardScoped: true}
	admins := Access{Roles: []string{wardload.RoleAdmin}}
	api := Access{API: true}
	wardReaders := Access{Roles: readers, WardScoped: true}
	return []Route{
		// Public: signed out, it names the wards this installation serves
		// (code and name, no figures) beside the sign-in link; signed in,
		// each person sees only their own wards with their pages.
		{Method: http.MethodGet, Pattern: "/", Name: "home", Access: public, Handler: s.handleHome},
		{Method: http.MethodGet, Pattern: "/healthz", Name: "healthz", Access: sessionless, Handler: s.handleHealthz},
		{Method: http.MethodGet, Pattern: "/readyz", Name: "readyz", Access: sessionless, Handler: s.handleReadyz},
		{Method: http.MethodGet, Pattern: "/static/*", Name: "static", Access: sessionless, Handler: s.handleStatic},

		{Method: http.MethodGet, Pattern: "/signin", Name: "signin.form", Access: public, Handler: s.handleSignInForm},
		{Method: http.MethodPost, Pattern: "/signin", Name: "signin", Access: public, Handler: s.handleSignIn, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/signout", Name: "signout", Access: signedIn, Handler: s.handleSignOut, MaxBodyBytes: 8 << 10},
		// Everyone's own password (account.go); the only pages left to a
		// user after an admin's reset (mustChangeRoutes).
		{Method: http.MethodGet, Pattern: passwordPath, Name: "account.password", Access: signedIn, Handler: s.handlePasswordForm},
		{Method: http.MethodPost, Pattern: passwordPath, Name: "account.password.save", Access: signedIn, Handler: s.handlePasswordChange, MaxBodyBytes: 16 << 10},

		{Method: http.MethodGet, Pattern: "/wards/{ward}/tokens", Name: "tokens", Access: wardManagers, Handler: s.handleTokens},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/tokens", Name: "token.create", Access: wardManagers, Handler: s.handleTokenCreate, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/tokens/{id}/revoke", Name: "token.revoke", Access: wardManagers, Handler: s.handleTokenRevoke, MaxBodyBytes: 8 << 10},

		{Method: http.MethodGet, Pattern: "/audit", Name: "audit", Access: managers, Handler: s.handleAudit},

		{Method: http.MethodGet, Pattern: "/admin/users", Name: "users", Access: admins, Handler: s.handleUsers},
		{Method: http.MethodPost, Pattern: "/admin/users", Name: "user.create", Access: admins, Handler: s.handleUserCreate, MaxBodyBytes: 64 << 10},
		{Method: http.MethodPost, Pattern: "/admin/users/{id}", Name: "user.update", Access: admins, Handler: s.handleUserUpdate, MaxBodyBytes: 64 << 10},
		{Method: http.MethodGet, Pattern: "/admin/wards/new", Name: "ward.new", Access: admins, Handler: s.handleWardNew},
		{Method: http.MethodPost, Pattern: "/admin/wards", Name: "ward.create", Access: admins, Handler: s.handleWardCreate, MaxBodyBytes: 16 << 10},
		// Edit, retire and reinstate a ward (ward_edit.go); its set-up checklist (ward_setup.go).
		{Method: http.MethodGet, Pattern: "/admin/wards/{ward}/edit", Name: "ward.edit", Access: Access{Roles: admins.Roles, WardScoped: true}, Handler: s.handleWardEdit},
		{Method: http.MethodPost, Pattern: "/admin/wards/{ward}", Name: "ward.update", Access: Access{Roles: admins.Roles, WardScoped: true}, Handler: s.handleWardUpdate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/admin/wards/{ward}/retire", Name: "ward.retire", Access: Access{Roles: admins.Roles, WardScoped: true}, Handler: s.handleWardRetire, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/admin/wards/{ward}/reinstate", Name: "ward.reinstate", Access: Access{Roles: admins.Roles, WardScoped: true}, Handler: s.handleWardReinstate, MaxBodyBytes: 8 << 10},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/setup", Name: "ward.setup", Access: wardManagers, Handler: s.handleWardSetup},

		{Method: http.MethodGet, Pattern: "/api/v1/wards", Name: "api.wards", Access: api, Handler: s.handleAPIWards},

		// Ward settings (managers) and the projections API with its
		// OpenAPI document (settings.go, api_projection.go, openapi.go).
		{Method: http.MethodGet, Pattern: "/wards/{ward}/settings", Name: "settings", Access: wardManagers, Handler: s.handleSettings},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings", Name: "settings.save", Access: wardManagers, Handler: s.handleSettingsSave, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/floors", Name: "settings.floors", Access: wardManagers, Handler: s.handleFloorsSave, MaxBodyBytes: 64 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/shifts", Name: "settings.shift.create", Access: wardManagers, Handler: s.handleShiftCreate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/shifts/{id}", Name: "settings.shift.update", Access: wardManagers, Handler: s.handleShiftUpdate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/tiers", Name: "settings.tier.create", Access: wardManagers, Handler: s.handleTierCreate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/tiers/{id}", Name: "settings.tier.update", Access: wardManagers, Handler: s.handleTierUpdate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/shifts/{id}/retire", Name: "settings.shift.retire", Access: wardManagers, Handler: s.handleShiftRetire, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/shifts/{id}/reinstate", Name: "settings.shift.reinstate", Access: wardManagers, Handler: s.handleShiftReinstate, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/tiers/{id}/retire", Name: "settings.tier.retire", Access: wardManagers, Handler: s.handleTierRetire, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/settings/tiers/{id}/reinstate", Name: "settings.tier.reinstate", Access: wardManagers, Handler: s.handleTierReinstate, MaxBodyBytes: 8 << 10},
		{Method: http.MethodGet, Pattern: "/api/v1/projections", Name: "api.projections", Access: api, Handler: s.handleAPIProjections},
		{Method: http.MethodGet, Pattern: "/api/v1/openapi.json", Name: "api.openapi", Access: sessionless, Handler: s.handleOpenAPI},

		// Census entry, projection pages and the shift list with its
		// downloads (census.go, projection.go, projection_list.go). Any
		// member of the ward enters census and reads projections; exports
		// are the managers'.
		{Method: http.MethodGet, Pattern: "/wards/{ward}/census", Name: "census.form", Access: Access{Roles: wardStaff, WardScoped: true}, Handler: s.handleCensusForm},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/census", Name: "census.create", Access: Access{Roles: wardStaff, WardScoped: true}, Handler: s.handleCensusCreate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/projections", Name: "projections", Access: Access{Roles: allRoles, WardScoped: true}, Handler: s.handleProjections},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/projections/{id}", Name: "projection", Access: Access{Roles: allRoles, WardScoped: true}, Handler: s.handleProjection},
		// The end-of-shift record of a dated shift (shift_record.go): any
		// member of the ward, once the shift has ended.
		{Method: http.MethodGet, Pattern: "/wards/{ward}/shift-record", Name: "shift_record.form", Access: Access{Roles: wardStaff, WardScoped: true}, Handler: s.handleShiftRecordForm},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/shift-record", Name: "shift_record.create", Access: Access{Roles: wardStaff, WardScoped: true}, Handler: s.handleShiftRecordCreate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/projections.csv", Name: "projections.csv", Access: wardReaders, Handler: s.handleProjectionsCSV},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/projections.json", Name: "projections.json", Access: wardReaders, Handler: s.handleProjectionsJSON},

		// Weekly tier review, exclusions and observation import, managers
		// only (review.go, review_page.go, review_exclusion.go,
		// observation_import.go).
		{Method: http.MethodGet, Pattern: "/wards/{ward}/review", Name: "review", Access: wardManagers, Handler: s.handleReview},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/relationship", Name: "relationship", Access: wardManagers, Handler: s.handleRelation},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/observations/{id}/exclude", Name: "observation.exclude", Access: wardManagers, Handler: s.handleObservationExclude, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/observations/{id}/restore", Name: "observation.restore", Access: wardManagers, Handler: s.handleObservationRestore, MaxBodyBytes: 8 << 10},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/observations/import", Name: "observations.import.form", Access: wardManagers, Handler: s.handleImportForm},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/observations/import", Name: "observations.import", Access: wardManagers, Handler: s.handleImport, MaxBodyBytes: maxImportBytes + 64<<10},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/observations/template.csv", Name: "observations.template", Access: wardManagers, Handler: s.handleImportTemplate},

		// Planned staff per dated shift and the hospital board (issue 10;
		// staffing.go, board.go, token_multi.go): ward staff plan in the
		// browser, a roster planner's token with WriteStaffing over the
		// API; the board is every ward the user or token may see.
		{Method: http.MethodGet, Pattern: "/wards/{ward}/staffing", Name: "staffing.form", Access: Access{Roles: wardStaff, WardScoped: true}, Handler: s.handleStaffingForm},
		{Method: http.MethodPost, Pattern: "/wards/{ward}/staffing", Name: "staffing.save", Access: Access{Roles: wardStaff, WardScoped: true}, Handler: s.handleStaffingSave, MaxBodyBytes: 8 << 10},
		{Method: http.MethodPut, Pattern: "/api/v1/wards/{ward}/shifts/{date}/{shift}/staffing", Name: "api.staffing.put", Access: Access{API: true, WardScoped: true, WriteStaffing: true}, Handler: s.handleAPIStaffingPut, MaxBodyBytes: 8 << 10},
		{Method: http.MethodGet, Pattern: "/board", Name: "board", Access: signedIn, Handler: s.handleBoard},
		{Method: http.MethodGet, Pattern: "/wards/{ward}/staffing-report", Name: "staffing_report", Access: Access{Roles: readers, WardScoped: true}, Handler: s.handleStaffingReport},
		{Method: http.MethodGet, Pattern: "/board.csv", Name: "board.csv", Access: Access{Roles: readers}, Handler: s.handleBoardCSV},
		{Method: http.MethodGet, Pattern: "/board.json", Name: "board.json", Access: Access{Roles: readers}, Handler: s.handleBoardJSON},
		{Method: http.MethodGet, Pattern: "/api/v1/board", Name: "api.board", Access: api, Handler: s.handleAPIBoard},
		{Method: http.MethodGet, Pattern: "/tokens", Name: "tokens.own", Access: Access{Roles: readers}, Handler: s.handleOwnTokens},
		{Method: http.MethodPost, Pattern: "/tokens", Name: "tokens.own.create", Access: Access{Roles: readers}, Handler: s.handleOwnTokenCreate, MaxBodyBytes: 16 << 10},
		{Method: http.MethodPost, Pattern: "/tokens/{id}/revoke", Name: "tokens.own.revoke", Access: Access{Roles: readers}, Handler: s.handleOwnTokenRevoke, MaxBodyBytes: 8 << 10},
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
// carries them. The body limit is per route (see Route.MaxBodyBytes), applied after the guard;
// requests that match no route never have their body read.
func (s *Server) router(routes []Route) http.Handler {
	r := chi.NewRouter()
	r.Use(s.requestID, s.logRequests, s.recoverPanics, securityHeaders)
	r.Use(s.crossOrigin)
	// HEAD is answered by the GET route (monitoring tools and link
	// checkers send HEAD).
	r.Use(middleware.GetHead)
	// The 404 page reads the session (never requires it) so a signed-in
	// person still sees their name and navigation.
	r.NotFound(s.withSession(s.optionalUser(s.handle(func(http.ResponseWriter, *http.Request) error {
		return wardload.Errorf(wardload.ENOTFOUND, "There is no page at this address.")
	}))).ServeHTTP)
	r.MethodNotAllowed(s.handle(func(w http.ResponseWriter, r *http.Request) error {
		allowMethods(w, r, routes)
		return &wardload.Error{Code: eMethod, Message: "This address does not accept that kind of request."}
	}))
	for _, rt := range routes {
		limit := s.cfg.MaxBodyBytes
		if rt.MaxBodyBytes > 0 {
			limit = rt.MaxBodyBytes
		}
		// The guard goes first so that a refused body (413) is answered
		// with the person still shown signed in; it reads no body.
		r.Method(rt.Method, rt.Pattern, s.guard(rt, s.limitBody(limit, s.handle(rt.Handler))))
	}
	return r
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
