package server

import (
	"context"
	"fmt"
	"net/http"
	"net/http/httptest"
	"net/url"
	"strings"
	"testing"

	"wardload/internal/password"
	"wardload/internal/wardload"
)

// changeForm is the account page's form.
func changeForm(current, pw, repeat string) url.Values {
	return url.Values{"current": {current}, "password": {pw}, "repeat": {repeat}}
}

func TestPasswordPage(t *testing.T) {
	f := newFixture(t)
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/", nil)))
	if got := byTestIDAttr(t, body, "account-password"); got != "/account/password" {
		t.Errorf("layout link to the password page = %q", got)
	}
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/account/password", nil)))
	if res.StatusCode != 200 || len(byTestID(t, body, "password-form")) != 1 || !strings.Contains(body, "At least 15 characters") {
		t.Fatalf("password page = %d\n%s", res.StatusCode, body)
	}
	if len(byTestID(t, body, "password-required")) != 0 {
		t.Error("the page says a change is required, but no admin reset the password")
	}
}

// TestPasswordChangeRefusals: bad input gets a plain message on the
// field, status 400, no change and no audit row, and the page never shows
// what was typed.
func TestPasswordChangeRefusals(t *testing.T) {
	f := newFixture(t)
	cur := f.passwords["n.nurse"]
	good := "sunflower garden tuesday"
	for _, tc := range []struct {
		name  string
		form  url.Values
		field string
		msg   string
	}{
		{"no current password", changeForm("", good, good), "current", "Enter your current password"},
		{"wrong current password", changeForm("pw of someone else", good, good), "current", "not your current password"},
		{"repeat differs", changeForm(cur, good, good+"!"), "repeat", "differ"},
		{"1,000 characters", changeForm(cur, strings.Repeat("Zq8!", 250), strings.Repeat("Zq8!", 250)), "password", "at most 256 characters"},
		{"invalid UTF-8", changeForm(cur, good+"\xff", good+"\xff"), "password", "valid UTF-8"},
		{"14 characters", changeForm(cur, "x7#Kq9!mZ2@vL4", "x7#Kq9!mZ2@vL4"), "password", "at least 15 characters"},
		{"the user name", changeForm(cur, "N.Nurse n.nurse n.nurse", "N.Nurse n.nurse n.nurse"), "password", "user name"},
		{"common password", changeForm(cur, "iloveyou12345678", "iloveyou12345678"), "password", "too easy to guess"},
		{"same as the current one", changeForm(cur, cur, cur), "password", "must differ"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			rows := len(f.audit(t, wardload.ActionUserUpdate))
			res, body := f.do(t, f.as(t, pNurseA, post("/account/password", tc.form)))
			if res.StatusCode != http.StatusBadRequest || !strings.Contains(strings.Join(byTestID(t, body, "error-"+tc.field), ""), tc.msg) {
				t.Fatalf("= %d, %s errors %q; want 400 saying %q", res.StatusCode, tc.field, byTestID(t, body, "error-"+tc.field), tc.msg)
			}
			for _, typed := range []string{tc.form.Get("current"), tc.form.Get("password")} {
				if typed != "" && strings.Contains(body, typed) {
					t.Errorf("the page shows a typed password")
				}
			}
			if n := len(f.audit(t, wardload.ActionUserUpdate)); n != rows {
				t.Errorf("a refused change wrote %d audit rows", n-rows)
			}
			u, _ := f.st.FindUserByID(context.Background(), f.users[pNurseA].ID)
			if u.PasswordChanges != 0 {
				t.Errorf("a refused change changed the password: %+v", u)
			}
		})
	}
}

// TestPasswordChangeNFKC: a password chosen with full-width letters signs
// in typed in ASCII, and one with a composed accent signs in typed with a
// combining accent (UAX #15 NFKC; see internal/password).
func TestPasswordChangeNFKC(t *testing.T) {
	f := newFixture(t)
	chosen := "\uff4b\uff45\uff54\uff54\uff4c\uff45 m\u00e4rsh lantern" // "ｋｅｔｔｌｅ märsh lantern"
	typed := "kettle ma\u0308rsh lantern"
	res, _ := f.do(t, f.as(t, pNurseA, post("/account/password", changeForm(f.passwords["n.nurse"], chosen, chosen))))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/account/password" {
		t.Fatalf("change = %d %q", res.StatusCode, res.Header.Get("Location"))
	}
	res, _ = f.do(t, signInForm("n.nurse", typed, "/"))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/" {
		t.Fatalf("sign-in typed decomposed = %d %q; want 303 to /", res.StatusCode, res.Header.Get("Location"))
	}
	u, _ := f.st.FindUserByID(context.Background(), f.users[pNurseA].ID)
	if ok, _ := password.Verify("kettle m\u00e4rsh lantern", u.PasswordHash); !ok {
		t.Error("the stored hash is not of the NFKC form")
	}
}

// TestPasswordChangeThrottled: wrong current passwords count against the
// account like failed sign-ins, so a stolen session cannot guess it fast.
func TestPasswordChangeThrottled(t *testing.T) {
	f := newFixture(t)
	good := "sunflower garden tuesday"
	for i := range 3 {
		if res, _ := f.do(t, f.as(t, pNurseA, post("/account/password", changeForm(fmt.Sprint("wrong guess ", i), good, good)))); res.StatusCode != http.StatusBadRequest {
			t.Fatalf("guess %d = %d, want 400", i, res.StatusCode)
		}
	}
	res, _ := f.do(t, f.as(t, pNurseA, post("/account/password", changeForm(f.passwords["n.nurse"], good, good))))
	if res.StatusCode != http.StatusTooManyRequests || res.Header.Get("Retry-After") == "" {
		t.Fatalf("fourth try = %d, want 429 with Retry-After", res.StatusCode)
	}
}

// TestAdminResetForcesChange: a password set on the users page ends the
// user's sessions and, once they sign in with it, leaves them only the
// change page until they have chosen their own; API tokens are unaffected.
func TestAdminResetForcesChange(t *testing.T) {
	f := newFixture(t)
	nurse := f.users[pNurseA]
	live := MustSession(t, f.s, nurse.ID)
	temp := "violet harbour quietly"
	reset := url.Values{"role": {wardload.RoleChargeNurse}, "ward": {fmt.Sprint(f.wardA.ID)}, "password": {temp}}
	res, _ := f.do(t, f.as(t, pAdmin, post(fmt.Sprintf("/admin/users/%d", nurse.ID), reset)))
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("reset = %d", res.StatusCode)
	}
	if res, _ := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/census", nil), f, live.Value)); res.StatusCode != http.StatusSeeOther ||
		!strings.HasPrefix(res.Header.Get("Location"), "/signin") {
		t.Errorf("session from before the reset: %d %q; want sent to sign in", res.StatusCode, res.Header.Get("Location"))
	}
	res, _ = f.do(t, signInForm("n.nurse", temp, "/wards/w-a/census"))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/account/password" {
		t.Fatalf("sign-in with the temporary password = %d %q; want 303 to the change page", res.StatusCode, res.Header.Get("Location"))
	}
	c := f.sessionCookie(res).Value
	for _, req := range []*http.Request{
		httptest.NewRequest("GET", "/wards/w-a/census", nil),
		httptest.NewRequest("GET", "/", nil), // public pages stay open
		post("/wards/w-a/census", url.Values{}),
	} {
		res, _ := f.do(t, withCookie(req, f, c))
		if req.URL.Path == "/" {
			if res.StatusCode != 200 {
				t.Errorf("home = %d", res.StatusCode)
			}
			continue
		}
		if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/account/password" {
			t.Errorf("%s %s before choosing = %d %q; want 303 to the change page", req.Method, req.URL.Path, res.StatusCode, res.Header.Get("Location"))
		}
	}
	_, body := f.do(t, withCookie(httptest.NewRequest("GET", "/account/password", nil), f, c))
	if len(byTestID(t, body, "password-required")) != 1 {
		t.Error("the change page does not say a new password is required")
	}
	// An API token of the ward works meanwhile.
	secret, _ := f.MustToken(t, "planner", f.wardA.ID)
	req := httptest.NewRequest("GET", "/api/v1/wards", nil)
	req.Header.Set("Authorization", "Bearer "+secret)
	if res, _ := f.do(t, req); res.StatusCode != 200 {
		t.Errorf("API token during must-change = %d", res.StatusCode)
	}

	mine := "sunflower garden tuesday"
	res, _ = f.do(t, withCookie(post("/account/password", changeForm(temp, mine, mine)), f, c))
	if res.StatusCode != http.StatusSeeOther {
		t.Fatalf("change = %d", res.StatusCode)
	}
	kept := f.sessionCookie(res)
	if kept == nil || kept.Value == c {
		t.Fatal("the changing session was not re-issued with a new ID")
	}
	if res, _ := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/census", nil), f, kept.Value)); res.StatusCode != 200 {
		t.Errorf("census page after choosing = %d, want 200", res.StatusCode)
	}
	if res, _ := f.do(t, withCookie(httptest.NewRequest("GET", "/wards/w-a/census", nil), f, c)); res.StatusCode != http.StatusSeeOther {
		t.Errorf("the old session ID still works after the change: %d", res.StatusCode)
	}
	es := f.audit(t, wardload.ActionUserUpdate)
	if len(es) != 2 || !strings.Contains(es[1].After, `"MustChangePassword":true`) || !strings.Contains(es[0].After, `"MustChangePassword":false`) {
		t.Fatalf("user.update rows %+v; want the reset then the change", es)
	}
	for _, e := range es {
		for _, secret := range []string{temp, mine, "argon2"} {
			if strings.Contains(e.Before+e.After, secret) {
				t.Errorf("audit row holds %q", secret)
			}
		}
	}
}

// TestAdminResetRefusals: the users page refuses a reset of a disabled
// account that stays disabled, of the admin's own password, and of a
// password the rule refuses, changing nothing.
func TestAdminResetRefusals(t *testing.T) {
	f := newFixture(t)
	off := f.MustUser(t, "", "d.off", wardload.RoleChargeNurse, "pw of d.off 7c1e")
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	if _, err := f.st.UpdateUser(ctx, off.ID, wardload.UserUpdate{Disabled: new(true)}); err != nil {
		t.Fatal(err)
	}
	rows := len(f.audit(t, wardload.ActionUserUpdate))
	good := "violet harbour quietly"
	for _, tc := range []struct {
		name string
		id   int64
		form url.Values
		msg  string
	}{
		{"disabled", off.ID, url.Values{"role": {"charge_nurse"}, "disabled": {"1"}, "password": {good}}, "is disabled"},
		{"own password", f.users[pAdmin].ID, url.Values{"role": {"admin"}, "password": {good}}, "Password link"},
		{"1,000 characters", f.users[pNurseA].ID, url.Values{"role": {"charge_nurse"}, "password": {strings.Repeat("Zq8!", 250)}}, "at most 256"},
		{"the user name", f.users[pNurseA].ID, url.Values{"role": {"charge_nurse"}, "password": {"n.nurse.n.nurse.n.nurse"}}, "user name"},
		{"same as the current one", f.users[pNurseA].ID, url.Values{"role": {"charge_nurse"}, "password": {f.passwords["n.nurse"]}}, "must differ"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			res, body := f.do(t, f.as(t, pAdmin, post(fmt.Sprintf("/admin/users/%d", tc.id), tc.form)))
			if res.StatusCode != 400 || !strings.Contains(strings.Join(byTestID(t, body, "user-error"), ""), tc.msg) {
				t.Fatalf("= %d %q; want 400 saying %q", res.StatusCode, byTestID(t, body, "user-error"), tc.msg)
			}
		})
	}
	if n := len(f.audit(t, wardload.ActionUserUpdate)); n != rows {
		t.Errorf("refused resets wrote %d audit rows", n-rows)
	}
	for _, id := range []int64{off.ID, f.users[pAdmin].ID, f.users[pNurseA].ID} {
		if u, _ := f.st.FindUserByID(context.Background(), id); u.PasswordChanges != 0 || u.MustChangePassword {
			t.Errorf("a refused reset changed %s: %+v", u.Name, u)
		}
	}
}

// TestShortLegacyPasswordSignsIn: the rule applies to new passwords only;
// an account whose password predates it (here 11 characters) still signs
// in, and is not made to change it.
func TestShortLegacyPasswordSignsIn(t *testing.T) {
	f := newFixture(t)
	f.MustUser(t, "", "l.legacy", wardload.RoleChargeNurse, "short pw 10", f.wardA.ID)
	res, _ := f.do(t, signInForm("l.legacy", "short pw 10", "/wards/w-a/census"))
	if res.StatusCode != http.StatusSeeOther || res.Header.Get("Location") != "/wards/w-a/census" {
		t.Fatalf("sign-in with a pre-rule password = %d %q", res.StatusCode, res.Header.Get("Location"))
	}
}
