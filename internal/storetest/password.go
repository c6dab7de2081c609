package storetest

import (
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// passwordCases check how stores keep a password change: the count that
// ends other sessions, the must-change flag of an admin reset, the refusal
// for a disabled account, and audit rows that never hold a hash.
func passwordCases() []testCase {
	return []testCase{
		{"User/PasswordChange", func(t *testing.T, f *fixture) {
			u := &wardload.User{Name: "p.change", Role: wardload.RoleChargeNurse, PasswordHash: secretHash}
			noErr(t, f.store.CreateUser(f.ctx, u))
			if u.PasswordChanges != 0 || u.MustChangePassword {
				t.Fatalf("new user = %+v; want no changes counted and no flag", u)
			}
			reset := "$argon2id$v=19$reset-by-admin-hash"
			got, err := f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{PasswordHash: &reset, MustChangePassword: new(true)})
			noErr(t, err)
			re, err := f.store.FindUserByID(f.ctx, u.ID)
			noErr(t, err)
			for _, v := range []*wardload.User{got, re} {
				if v.PasswordHash != reset || !v.MustChangePassword || v.PasswordChanges != 1 {
					t.Fatalf("after reset = %+v; want the new hash, the flag and 1 change", v)
				}
			}
			if !re.SessionCurrent(1) || re.SessionCurrent(0) {
				t.Fatal("after one change a session of count 0 must end and one of count 1 stay")
			}
			e := f.checkAudit("user.update", "user", u.ID, 0)
			if !strings.Contains(e.Before, `"PasswordChanges":0`) || !strings.Contains(e.After, `"PasswordChanges":1`) ||
				!strings.Contains(e.After, `"MustChangePassword":true`) {
				t.Fatalf("reset audit %q -> %q; want the change count and the flag", e.Before, e.After)
			}
			for _, h := range []string{secretHash, reset, "argon2"} {
				if strings.Contains(e.Before+e.After, h) {
					t.Fatalf("reset audit holds a password hash: %q / %q", e.Before, e.After)
				}
			}

			// The user's own change clears the flag and counts again; an
			// update without a password counts nothing.
			own := "$argon2id$v=19$chosen-by-user-hash"
			_, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{PasswordHash: &own, MustChangePassword: new(false)})
			noErr(t, err)
			_, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{Role: ptr(wardload.RoleManager)})
			noErr(t, err)
			re, err = f.store.FindUserByName(f.ctx, "p.change")
			noErr(t, err)
			if re.PasswordHash != own || re.MustChangePassword || re.PasswordChanges != 2 {
				t.Fatalf("after own change and a role change = %+v; want 2 changes, no flag", re)
			}
		}},
		{"User/PasswordResetRefused", func(t *testing.T, f *fixture) {
			u := &wardload.User{Name: "p.off", Role: wardload.RoleChargeNurse, PasswordHash: secretHash, Disabled: true}
			noErr(t, f.store.CreateUser(f.ctx, u))
			before := f.totalAudit()
			h := "$argon2id$v=19$never-stored-hash"
			_, err := f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{PasswordHash: &h})
			wantErr(t, err, wardload.EINVALID, "password")
			_, err = f.store.UpdateUser(f.ctx, 9999, wardload.UserUpdate{PasswordHash: &h})
			wantErr(t, err, wardload.ENOTFOUND, "")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after refused resets", before, n)
			}
			re, err := f.store.FindUserByID(f.ctx, u.ID)
			noErr(t, err)
			if re.PasswordHash != secretHash || re.PasswordChanges != 0 {
				t.Fatalf("a refused reset changed the user: %+v", re)
			}
			// Enabling in the same update is allowed.
			got, err := f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{PasswordHash: &h, Disabled: new(false), MustChangePassword: new(true)})
			noErr(t, err)
			if got.Disabled || got.PasswordChanges != 1 || !got.MustChangePassword {
				t.Fatalf("enable and reset = %+v", got)
			}
		}},
	}
}
