package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"net/url"
	"slices"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func TestTokenPages(t *testing.T) {
	f := newFixture(t)
	_, onA := f.MustToken(t, "planner-a", f.wardA.ID)
	_, onB := f.MustToken(t, "planner-b", f.wardB.ID)
	c := MustSession(t, f.s, f.users[pManagerA].ID)

	_, body := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/tokens", nil), f, c.Value))
	if got := byTestID(t, body, "token-name"); !slices.Equal(got, []string{"planner-a"}) {
		t.Errorf("ward A lists %q, want only planner-a", got)
	}
	if got := byTestID(t, body, "token-last-used"); !slices.Equal(got, []string{"never"}) {
		t.Errorf("last used %q", got)
	}

	// Bad and taken names re-render the form with a message, 400.
	for _, name := range []string{"Bad Name", "planner-b", ""} {
		res, body := f.do(t, withCookie(post("/wards/w-a/tokens", url.Values{"name": {name}}), f, c.Value))
		if res.StatusCode != 400 || len(byTestID(t, body, "token-error")) != 1 {
			t.Errorf("name %q: %d, want 400 with a message", name, res.StatusCode)
		}
	}

	// A token of another ward cannot be revoked from this ward's page.
	res, _ := f.do(t, withCookie(post(fmt.Sprintf("/wards/w-a/tokens/%d/revoke", onB.ID), nil), f, c.Value))
	if res.StatusCode != 404 {
		t.Errorf("revoke ward B's token via ward A = %d, want 404", res.StatusCode)
	}
	res, _ = f.do(t, withCookie(post(fmt.Sprintf("/wards/w-a/tokens/%d/revoke", onA.ID), nil), f, c.Value))
	if res.StatusCode != 303 {
		t.Fatalf("revoke = %d", res.StatusCode)
	}
	_, body = f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/tokens", nil), f, c.Value))
	if got := byTestID(t, body, "token-status"); len(got) != 1 || !strings.HasPrefix(got[0], "Revoked 2026-03-02 09:00 UTC") {
		t.Errorf("status after revoke %q", got)
	}
	es := f.audit(t, "token.revoke")
	if len(es) != 1 || es[0].Actor != "m.manager" || es[0].UserID != f.users[pManagerA].ID {
		t.Errorf("token.revoke audit = %+v", es)
	}
	if tok, _ := f.st.FindTokenByName(context.Background(), "planner-b"); !tok.Active() {
		t.Error("ward B's token was revoked")
	}
	// The ward's manager finds the token's changes in their audit log.
	_, body = f.do(t, withCookie(httptest.NewRequest("GET", "/audit?entity=token", nil), f, c.Value))
	if acts := byTestID(t, body, "audit-what"); !slices.Contains(acts, "Revoked an API token") || !slices.Contains(acts, "Created an API token") {
		t.Errorf("manager of A sees token actions %q, want create and revoke of planner-a", acts)
	}
}

func TestAPIRevokedTokenIsAudited(t *testing.T) {
	f := newFixture(t)
	secret, tok := f.MustToken(t, "planner-a", f.wardA.ID)
	if err := f.st.RevokeToken(context.Background(), tok.ID); err != nil {
		t.Fatal(err)
	}
	req := httptest.NewRequest("GET", "/api/v1/wards", nil)
	req.Header.Set("Authorization", "Bearer "+secret)
	if res, _ := f.do(t, req); res.StatusCode != 401 {
		t.Errorf("revoked token = %d", res.StatusCode)
	}
	if es := f.audit(t, "api.refused"); len(es) != 1 || es[0].EntityID != tok.ID || strings.Contains(es[0].After, secret) {
		t.Errorf("api.refused audit = %+v", es)
	}
	if got, _ := f.st.FindTokenByName(context.Background(), "planner-a"); !got.LastUsedAt.IsZero() {
		t.Error("a refused use counted as a use")
	}
}

func TestAuditPage(t *testing.T) {
	f := newFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{UserID: f.users[pManagerA].ID, Name: "m.manager"})
	for _, w := range []*wardload.Ward{f.wardA, f.wardB} {
		if err := f.st.CreateTier(ctx, &wardload.Tier{WardID: w.ID, Code: "t1", Label: "Tier 1"}); err != nil {
			t.Fatal(err)
		}
	}
	f.do(t, signInForm("n.nurse", "wrong guess 1234", "/"))
	rows := func(p, query string) (int, []string, string) {
		res, body := f.do(t, f.as(t, p, httptest.NewRequest("GET", "/audit"+query, nil)))
		return res.StatusCode, byTestID(t, body, "audit-ward"), body
	}
	// Manager of A: only ward A's entries, never B's nor ward-less ones.
	code, wards, _ := rows(pManagerA, "")
	if code != 200 || len(wards) == 0 || slices.ContainsFunc(wards, func(w string) bool { return w != "w-a" }) {
		t.Errorf("manager of A: %d wards %q, want only w-a", code, wards)
	}
	// Admin: everything, newest first; filters narrow it.
	_, _, body := rows(pAdmin, "")
	if acts := byTestID(t, body, "audit-what"); len(acts) < 6 || acts[0] != "Failed sign-ins" {
		t.Errorf("admin sees %q, want the sign-in failure first and all changes", acts)
	}
	_, _, body = rows(pAdmin, "?action=signin.fail")
	if got := byTestID(t, body, "audit-actor"); !slices.Equal(got, []string{"n.nurse"}) {
		t.Errorf("filter by action: %q", got)
	}
	_, _, body = rows(pAdmin, "?user=m.manager&ward=w-b")
	if got := byTestID(t, body, "audit-ward"); !slices.Equal(got, []string{"w-b"}) {
		t.Errorf("filter by user and ward: %q", got)
	}
	_, _, body = rows(pAdmin, "?from=2026-03-03")
	if len(byTestID(t, body, "audit-empty")) != 1 {
		t.Error("filter from tomorrow should be empty")
	}
	_, _, body = rows(pAdmin, "?from=2026-03-02&to=2026-03-02")
	if len(byTestID(t, body, "audit-row")) < 6 {
		t.Error("filter for today (inclusive) lost rows")
	}
	// A manager may not filter to a ward they do not belong to; bad dates
	// are a plain message.
	for _, q := range []string{"?ward=w-b", "?from=yesterday", "?user=nobody"} {
		if code, _, body := rows(pManagerA, q); code != 400 || len(byTestID(t, body, "audit-error")) != 1 || len(byTestID(t, body, "audit-row")) != 0 {
			t.Errorf("%s: %d, want 400 with a message and no rows", q, code)
		}
	}
	// A manager of no ward sees nothing (not everything).
	f.MustUser(t, "", "l.lonely", wardload.RoleManager, "lonely pw 1234")
	lonely, _ := f.st.FindUserByName(context.Background(), "l.lonely")
	req := httptest.NewRequest("GET", "/audit", nil)
	req.AddCookie(MustSession(t, f.s, lonely.ID))
	if _, body := f.do(t, req); len(byTestID(t, body, "audit-row")) != 0 {
		t.Error("manager of no ward sees audit rows")
	}
	// There is no route that changes the audit log.
	for _, rt := range f.s.Routes() {
		if strings.HasPrefix(rt.Pattern, "/audit") && rt.Method != "GET" {
			t.Errorf("route %s %s could change the audit log", rt.Method, rt.Pattern)
		}
	}
}

func TestAuditPaging(t *testing.T) {
	f := newFixture(t)
	// Failed sign-ins are summarised per source and window, and names that
	// match no account are not stored: one failure each for known accounts
	// x00, x01, ..., each from its own address, makes one row each.
	for i := range auditPageSize + 5 {
		name := fmt.Sprintf("x%02d", i)
		f.MustUser(t, "", name, wardload.RoleChargeNurse, "pw of "+name+" 123", f.wardA.ID)
		req := signInForm(name, "pw", "/")
		req.RemoteAddr = fmt.Sprintf("198.51.100.%d:4000", i+1)
		f.do(t, req)
	}
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/audit?action=signin.fail", nil)))
	if res.StatusCode != 200 || len(byTestID(t, body, "audit-row")) != auditPageSize {
		t.Fatalf("first page: %d rows", len(byTestID(t, body, "audit-row")))
	}
	if got := byTestID(t, body, "audit-page"); !slices.Equal(got, []string{fmt.Sprintf("Entries 1–%d of %d", auditPageSize, auditPageSize+5)}) {
		t.Errorf("page text %q", got)
	}
	_, body = f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/audit?action=signin.fail&page=2", nil)))
	if got := byTestID(t, body, "audit-actor"); len(got) != 5 || got[4] != "x00" {
		t.Errorf("second page actors %q, want 5 ending with the oldest", got)
	}
}

func TestUserPages(t *testing.T) {
	f := newFixture(t)
	admin := MustSession(t, f.s, f.users[pAdmin].ID)
	ward := fmt.Sprint(f.wardA.ID)
	create := func(v url.Values) (int, string) {
		res, body := f.do(t, withCookie(post("/admin/users", v), f, admin.Value))
		return res.StatusCode, body
	}
	for _, tc := range []struct {
		name string
		form url.Values
	}{
		{"short password", url.Values{"name": {"s.short"}, "role": {"charge_nurse"}, "password": {"short"}}},
		{"bad name", url.Values{"name": {"Has Space"}, "role": {"charge_nurse"}, "password": {"long enough passphrase"}}},
		{"bad role", url.Values{"name": {"r.role"}, "role": {"root"}, "password": {"long enough passphrase"}}},
		{"taken name", url.Values{"name": {"n.nurse"}, "role": {"charge_nurse"}, "password": {"long enough passphrase"}}},
		{"unknown ward", url.Values{"name": {"u.ward"}, "role": {"charge_nurse"}, "ward": {"999"}, "password": {"long enough passphrase"}}},
		{"ward not a number", url.Values{"name": {"u.ward"}, "role": {"charge_nurse"}, "ward": {"w-a"}, "password": {"long enough passphrase"}}},
	} {
		if code, body := create(tc.form); code != 400 || !strings.Contains(body, `class="form-error"`) || strings.Contains(body, "long enough passphrase") {
			t.Errorf("%s: %d, want 400 with a message and without the password", tc.name, code)
		}
	}
	if code, _ := create(url.Values{"name": {"New.Nurse"}, "role": {"charge_nurse"}, "ward": {ward}, "password": {"long enough passphrase"}}); code != 303 {
		t.Fatalf("create = %d", code)
	}
	u, err := f.st.FindUserByName(context.Background(), "new.nurse")
	if err != nil || u.Role != wardload.RoleChargeNurse || !slices.Equal(u.WardIDs, []int64{f.wardA.ID}) {
		t.Fatalf("created user %+v %v", u, err)
	}

	// Disable: the user's live session stops working at once.
	live := MustSession(t, f.s, u.ID)
	res, _ := f.do(t, withCookie(post(fmt.Sprintf("/admin/users/%d", u.ID), url.Values{"role": {"charge_nurse"}, "ward": {ward}, "disabled": {"1"}}), f, admin.Value))
	if res.StatusCode != 303 {
		t.Fatalf("disable = %d", res.StatusCode)
	}
	if res, _ := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/census", nil), f, live.Value)); res.StatusCode != 303 {
		t.Errorf("disabled user's session: %d, want 303", res.StatusCode)
	}
	if es := f.audit(t, "user.update"); len(es) == 0 || es[0].Actor != "a.admin" || !strings.Contains(es[0].After, `"Disabled":true`) {
		t.Errorf("user.update audit %+v", es)
	}

	// An admin cannot disable or demote themself.
	for _, v := range []url.Values{{"role": {"admin"}, "disabled": {"1"}}, {"role": {"manager"}}} {
		res, body := f.do(t, withCookie(post(fmt.Sprintf("/admin/users/%d", f.users[pAdmin].ID), v), f, admin.Value))
		if res.StatusCode != 400 || len(byTestID(t, body, "user-error")) != 1 {
			t.Errorf("self-change %v = %d, want 400 with a message", v, res.StatusCode)
		}
	}
	if me, _ := f.st.FindUserByID(context.Background(), f.users[pAdmin].ID); me.Disabled || me.Role != wardload.RoleAdmin {
		t.Error("admin changed themself")
	}
	// An unknown user is 404.
	if res, _ := f.do(t, withCookie(post("/admin/users/9999", url.Values{"role": {"admin"}}), f, admin.Value)); res.StatusCode != 404 {
		t.Errorf("unknown user = %d, want 404", res.StatusCode)
	}
}

func TestNavByRole(t *testing.T) {
	f := newFixture(t)
	for p, want := range map[string][]string{
		pNurseA:   {"WardsBoard"},
		pManagerA: {"WardsBoardAPI tokensAudit log"}, // link texts run together in the test's text extraction
		pAdmin:    {"WardsBoardAPI tokensAudit logUsers"},
		pStaffA:   {"WardsBoardAPI tokens"},
	} {
		_, body := f.do(t, f.as(t, p, httptest.NewRequest("GET", "/", nil)))
		if got := byTestID(t, body, "nav"); !slices.Equal(got, want) {
			t.Errorf("%s: nav %q, want %q", p, got, want)
		}
		if len(byTestID(t, body, "signout")) != 1 {
			t.Errorf("%s: no sign-out form", p)
		}
	}
	// A user sees only their wards; the home page links tokens for managers.
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/", nil)))
	if got := byTestID(t, body, "ward-code"); !slices.Equal(got, []string{"w-a"}) || len(byTestID(t, body, "ward-tokens")) != 0 {
		t.Errorf("nurse of A sees wards %q (and no token links)", got)
	}
	_, body = f.do(t, f.as(t, pManagerB, httptest.NewRequest("GET", "/", nil)))
	if got := byTestID(t, body, "ward-code"); !slices.Equal(got, []string{"w-b"}) || len(byTestID(t, body, "ward-tokens")) != 1 {
		t.Errorf("manager of B sees wards %q", got)
	}
	_, body = f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/", nil)))
	if got := byTestID(t, body, "ward-code"); !slices.Equal(got, []string{"w-a", "w-b"}) {
		t.Errorf("admin sees wards %q", got)
	}
}

// Refusals and unknown addresses still show who is signed in, so a person
// is not told "Sign in" while signed in.
func TestErrorPagesKeepTheSignedInHeader(t *testing.T) {
	f := newFixture(t)
	for _, tc := range []struct {
		path   string
		status int
	}{
		{"/audit", 403},             // wrong role
		{"/wards/w-b/census", 403},  // another ward
		{"/no/such/page", 404},      // unknown address
		{"/wards/nope/census", 404}, // unknown ward
	} {
		res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", tc.path, nil)))
		if res.StatusCode != tc.status {
			t.Errorf("%s: status %d, want %d", tc.path, res.StatusCode, tc.status)
		}
		if got := byTestID(t, body, "user-name"); !slices.Equal(got, []string{"Signed in as n.nurse"}) {
			t.Errorf("%s: header %q, want the nurse's name", tc.path, got)
		}
	}
	// Signed out, an unknown address is still a plain 404 with the sign-in link.
	res, body := f.do(t, httptest.NewRequest("GET", "/no/such/page", nil))
	if res.StatusCode != 404 || len(byTestID(t, body, "user-name")) != 0 {
		t.Errorf("signed out 404: %d, header %q", res.StatusCode, byTestID(t, body, "user-name"))
	}
}
