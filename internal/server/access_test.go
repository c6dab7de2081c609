package server

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// Token principals of API routes.
const (
	tNone     = "no token"
	tForged   = "forged token"
	tRevoked  = "revoked token"
	tOtherW   = "token of ward B"
	tValid    = "token of ward A"
	tWriteA   = "staffing-write token of ward A"
	pSignedIn = "session cookie" // a signed-in admin's cookie on an API route
	pAnon     = "signed out"
)

var (
	everyone  = []string{pAnon, pNurseA, pManagerA, pAdmin, pManagerB, pStaffA}
	signedIn  = []string{pNurseA, pManagerA, pAdmin, pManagerB, pStaffA}
	managers  = []string{pManagerA, pAdmin, pManagerB}
	wardAMgrs = []string{pManagerA, pAdmin} // manager/admin who may see ward A
	admins    = []string{pAdmin}
	// wardAStaff work on ward A: they change census, records and plans.
	wardAStaff = []string{pNurseA, pManagerA, pAdmin}
	// wardAReaders read and download ward A's projections.
	wardAReaders = []string{pManagerA, pAdmin, pStaffA}
	// readersAny read and download the board of their own wards.
	readersAny = []string{pManagerA, pAdmin, pManagerB, pStaffA}
)

// routeExpectations says, for every route by name, which principals may
// use it. It is written independently of the route table: a route the
// table adds without an entry here fails TestEveryRouteByEveryPrincipal.
var routeExpectations = map[string][]string{
	"home":        everyone, // signed out: ward names and a sign-in link (TestHomeSignedOut)
	"healthz":     everyone,
	"readyz":      everyone,
	"static":      everyone,
	"signin.form": everyone,
	"signin":      everyone,
	"signout":     signedIn,
	// Everyone's own password (account_test.go).
	"account.password":      signedIn,
	"account.password.save": signedIn,
	"tokens":                wardAMgrs,
	"token.create":          wardAMgrs,
	"token.revoke":          wardAMgrs,
	"audit":                 managers,
	"users":                 admins,
	"user.create":           admins,
	"user.update":           admins,
	"ward.new":              admins, // ward_test.go
	"ward.create":           admins,
	// Ward lifecycle (ward_edit_test.go): admins only; set-up: ward A's managers.
	"ward.edit":      admins,
	"ward.update":    admins,
	"ward.retire":    admins,
	"ward.reinstate": admins,
	"ward.setup":     wardAMgrs,
	// API routes: token principals. A token of ward B may list its own
	// wards; ward-scoped API routes would refuse it for ward A.
	"api.wards": {tValid, tOtherW, tWriteA},

	// Ward settings and the projections API (settings_test.go, api_test.go).
	"settings":                 wardAMgrs,
	"settings.save":            wardAMgrs,
	"settings.floors":          wardAMgrs,
	"settings.shift.create":    wardAMgrs,
	"settings.shift.update":    wardAMgrs,
	"settings.tier.create":     wardAMgrs,
	"settings.tier.update":     wardAMgrs,
	"settings.shift.retire":    wardAMgrs,
	"settings.shift.reinstate": wardAMgrs,
	"settings.tier.retire":     wardAMgrs,
	"settings.tier.reinstate":  wardAMgrs,
	"api.projections":          {tValid, tWriteA}, // ward=w-a in routeQuery: ward B's token is refused
	"api.openapi":              everyone,

	// Census and projections (census_test.go, projection_test.go): every
	// member of ward A; the downloads only its manager and the admin.
	// The staffing office of ward A reads and downloads but enters nothing.
	"census.form":      wardAStaff,
	"census.create":    wardAStaff,
	"projections":      {pNurseA, pManagerA, pAdmin, pStaffA},
	"projection":       {pNurseA, pManagerA, pAdmin, pStaffA},
	"projections.csv":  wardAReaders,
	"staffing_report":  wardAReaders,
	"projections.json": wardAReaders,
	// End-of-shift record (shift_record_test.go): every member of ward A
	// who works on it.
	"shift_record.form":   wardAStaff,
	"shift_record.create": wardAStaff,

	// Weekly review, exclusions and import (review_test.go,
	// observation_import_test.go): ward A's manager and the admin.
	"review":                   wardAMgrs,
	"relationship":             wardAMgrs,
	"observation.exclude":      wardAMgrs,
	"observation.restore":      wardAMgrs,
	"observations.import.form": wardAMgrs,
	"observations.import":      wardAMgrs,
	"observations.template":    wardAMgrs,

	// Planned staff, the board and own tokens (issue 10; staffing_test.go,
	// board_test.go): planning is for ward staff; the board for everyone
	// signed in (their own wards); its downloads and own tokens for
	// readers; the staffing PUT only for a token that may write staffing.
	"staffing.form":     wardAStaff,
	"staffing.save":     wardAStaff,
	"api.staffing.put":  {tWriteA},
	"board":             signedIn,
	"board.csv":         readersAny,
	"board.json":        readersAny,
	"api.board":         {tValid, tOtherW, tWriteA},
	"tokens.own":        readersAny,
	"tokens.own.create": readersAny,
	"tokens.own.revoke": readersAny, // another's token: 404, not a refusal
}

// routeQuery is appended to the path of routes that read their subject
// from the query rather than the pattern.
var routeQuery = map[string]string{
	"api.projections": "?ward=w-a&from=2026-03-01&to=2026-03-07",
}

// TestEveryRouteByEveryPrincipal walks every route of the table as every
// principal and checks the declared answer: signed out → 303 to sign-in
// (pages) or 401 (API); wrong role or other ward → 403; allowed → neither.
func TestEveryRouteByEveryPrincipal(t *testing.T) {
	f := newFixture(t)
	validSecret, _ := f.MustToken(t, "planner-a", f.wardA.ID)
	otherSecret, _ := f.MustToken(t, "planner-b", f.wardB.ID)
	revokedSecret, revoked := f.MustToken(t, "planner-old", f.wardA.ID)
	if err := f.st.RevokeToken(context.Background(), revoked.ID); err != nil {
		t.Fatal(err)
	}
	_, target := f.MustToken(t, "to-revoke", f.wardA.ID)
	writeSecret, _ := f.MustWriteToken(t, "planner-write-a", f.wardA.ID)
	forged, _ := NewTokenSecret()
	tokens := map[string]string{tNone: "", tForged: forged, tRevoked: revokedSecret, tOtherW: otherSecret, tValid: validSecret, tWriteA: writeSecret}

	seen := map[string]bool{}
	for _, rt := range f.s.Routes() {
		allowed, ok := routeExpectations[rt.Name]
		if !ok {
			t.Errorf("route %s %s (%s) has no expectation in routeExpectations", rt.Method, rt.Pattern, rt.Name)
			continue
		}
		seen[rt.Name] = true
		path := strings.NewReplacer("{ward}", f.wardA.Code, "*", "wardload.css", "{date}", "2026-03-02", "{shift}", "day").Replace(rt.Pattern)
		path = strings.ReplaceAll(path, "{id}", fmt.Sprint(idFor(rt, f, target))) + routeQuery[rt.Name]
		if strings.Contains(path, "{") {
			t.Errorf("route %s: test cannot fill %s", rt.Name, path)
			continue
		}
		newReq := func() *http.Request {
			if rt.Method == http.MethodPost {
				return post(path, url.Values{})
			}
			return httptest.NewRequest(rt.Method, path, nil)
		}
		if rt.Access.API {
			for _, p := range []string{pSignedIn, tNone, tForged, tRevoked, tOtherW, tValid, tWriteA} {
				t.Run(rt.Name+"/"+p, func(t *testing.T) {
					req := newReq()
					if p == pSignedIn {
						req = f.as(t, pAdmin, req)
					} else if tokens[p] != "" {
						req.Header.Set("Authorization", "Bearer "+tokens[p])
					}
					res, body := f.do(t, req)
					switch {
					case slices.Contains(allowed, p):
						if res.StatusCode == 401 || res.StatusCode == 403 {
							t.Errorf("allowed: status %d %s", res.StatusCode, body)
						}
					case p == tOtherW || p == tValid || p == tWriteA:
						// A good token without the ward or the permission.
						if res.StatusCode != 403 {
							t.Errorf("%s: status %d, want 403", p, res.StatusCode)
						}
					default:
						if res.StatusCode != 401 || !strings.HasPrefix(res.Header.Get("WWW-Authenticate"), "Bearer") {
							t.Errorf("status %d WWW-Authenticate %q, want 401 Bearer", res.StatusCode, res.Header.Get("WWW-Authenticate"))
						}
						if !strings.Contains(body, `"code":"unauthorized"`) {
							t.Errorf("body %s, want JSON unauthorized", body)
						}
					}
				})
			}
			continue
		}
		for _, p := range everyone {
			t.Run(rt.Name+"/"+p, func(t *testing.T) {
				req := newReq()
				if p != pAnon {
					req = f.as(t, p, req)
				}
				res, body := f.do(t, req)
				loc := res.Header.Get("Location")
				toSignIn := res.StatusCode == 303 && strings.HasPrefix(loc, "/signin?next=")
				switch {
				case slices.Contains(allowed, p):
					if res.StatusCode == 401 || res.StatusCode == 403 || toSignIn {
						t.Errorf("allowed: status %d Location %q\n%s", res.StatusCode, loc, body)
					}
				case p == pAnon:
					if !toSignIn {
						t.Errorf("signed out: status %d Location %q, want 303 to /signin?next=", res.StatusCode, loc)
					}
				default:
					if res.StatusCode != 403 || len(byTestID(t, body, "error-message")) != 1 {
						t.Errorf("refused: status %d, want the 403 page", res.StatusCode)
					}
				}
			})
		}
	}
	for name := range routeExpectations {
		if !seen[name] {
			t.Errorf("expectation for %s, which is not in the route table", name)
		}
	}
}

// idFor returns an existing ID for a route's {id}: a token of ward A for
// token routes, a user for user routes.
func idFor(rt Route, f *fixture, tok *wardload.APIToken) int64 {
	switch {
	case strings.Contains(rt.Pattern, "/tokens/"):
		return tok.ID
	case strings.Contains(rt.Pattern, "/users/"):
		return f.users[pNurseA].ID
	}
	return 0
}

func TestUnknownWardIs404(t *testing.T) {
	f := newFixture(t)
	for _, p := range []string{pManagerA, pAdmin} {
		res, _ := f.do(t, f.as(t, p, httptest.NewRequest("GET", "/wards/no-such-ward/tokens", nil)))
		if res.StatusCode != 404 {
			t.Errorf("%s: unknown ward = %d, want 404", p, res.StatusCode)
		}
	}
}

func TestSignedOutRedirectKeepsOnlyLocalNext(t *testing.T) {
	f := newFixture(t)
	res, _ := f.do(t, httptest.NewRequest("GET", "/audit?action=signin.fail", nil))
	if got := res.Header.Get("Location"); got != "/signin?next="+url.QueryEscape("/audit?action=signin.fail") {
		t.Errorf("Location = %q", got)
	}
	// A form post cannot be repeated after signing in: next is home.
	res, _ = f.do(t, post("/wards/w-a/tokens", url.Values{"name": {"x"}}))
	if got := res.Header.Get("Location"); got != "/signin?next=%2F" {
		t.Errorf("POST Location = %q, want /signin?next=%%2F", got)
	}
}

func TestLocalPath(t *testing.T) {
	for in, want := range map[string]string{
		"/":                     "/",
		"/audit?ward=w-a":       "/audit?ward=w-a",
		"":                      "/",
		"//evil.example/":       "/",
		"/\\evil.example":       "/",
		"https://evil.example/": "/",
		"evil":                  "/",
		"/ok\r\nSet-Cookie: x":  "/",
		"javascript:alert(1)":   "/",
	} {
		if got := localPath(in); got != want {
			t.Errorf("localPath(%q) = %q, want %q", in, got, want)
		}
	}
}

// TestCrossSitePostToRealRoutes: the cross-origin check sits in front of
// every route, so a signed-in manager's browser tricked by another site
// into posting creates nothing and signs nobody in or out.
func TestCrossSitePostToRealRoutes(t *testing.T) {
	f := newFixture(t)
	for _, tc := range []struct {
		name string
		req  *http.Request
	}{
		{"create token", f.as(t, pManagerA, post("/wards/w-a/tokens", url.Values{"name": {"evil"}}))},
		{"sign in", post("/signin", url.Values{"name": {"a.admin"}, "password": {f.passwords["a.admin"]}})},
		{"create user", f.as(t, pAdmin, post("/admin/users", url.Values{"name": {"evil"}, "role": {"admin"}, "password": {"0123456789abc"}}))},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tc.req.Header.Set("Sec-Fetch-Site", "cross-site")
			tc.req.Header.Set("Origin", "https://evil.example")
			res, _ := f.do(t, tc.req)
			if res.StatusCode != 403 {
				t.Errorf("status %d, want 403", res.StatusCode)
			}
			if f.sessionCookie(res) != nil {
				t.Error("refused request set a session cookie")
			}
		})
	}
	if _, err := f.st.FindTokenByName(context.Background(), "evil"); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("token after cross-site post: %v, want not found", err)
	}
	if _, err := f.st.FindUserByName(context.Background(), "evil"); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("user after cross-site post: %v, want not found", err)
	}
	if n := len(f.audit(t, "signin.ok")); n != 0 {
		t.Errorf("%d sign-ins after cross-site post, want 0", n)
	}
}
