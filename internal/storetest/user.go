package storetest

import (
	"reflect"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

const secretHash = "$argon2id$v=19$m=65536,t=1,p=4$c2FsdHNhbHQ$notARealHashButSecretLooking"

func userCases() []testCase {
	return []testCase{
		{"User/CreateFindUpdate", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			u := &wardload.User{Name: "a.murphy", Role: wardload.RoleChargeNurse, PasswordHash: secretHash, WardIDs: []int64{w2.ward.ID, w1.ward.ID}}
			noErr(t, f.store.CreateUser(f.ctx, u))
			if u.ID == 0 {
				t.Fatal("ID not set")
			}
			sameTime(t, "CreatedAt", u.CreatedAt, f.clock.Now())
			want := []int64{w1.ward.ID, w2.ward.ID} // ascending
			for _, get := range []func() (*wardload.User, error){
				func() (*wardload.User, error) { return f.store.FindUserByID(f.ctx, u.ID) },
				func() (*wardload.User, error) { return f.store.FindUserByName(f.ctx, "a.murphy") },
			} {
				got, err := get()
				noErr(t, err)
				if got.ID != u.ID || got.Name != u.Name || got.Role != u.Role || got.PasswordHash != secretHash || got.Disabled || !reflect.DeepEqual(got.WardIDs, want) {
					t.Fatalf("got %+v", got)
				}
				sameTime(t, "CreatedAt reread", got.CreatedAt, f.clock.Now())
			}
			e := f.checkAudit("user.create", "user", u.ID, 0)
			if strings.Contains(e.After, secretHash) || strings.Contains(e.After, "argon2") || !strings.Contains(e.After, "a.murphy") {
				t.Fatalf("user.create audit after %q: must name the user and never hold the password hash", e.After)
			}

			f.clock.Advance(time.Hour)
			newHash := "$argon2id$v=19$second-secret-hash"
			got, err := f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{Role: ptr(wardload.RoleManager), PasswordHash: &newHash, Disabled: new(true), WardIDs: []int64{w2.ward.ID}})
			noErr(t, err)
			if got.Role != wardload.RoleManager || got.PasswordHash != newHash || !got.Disabled || !reflect.DeepEqual(got.WardIDs, []int64{w2.ward.ID}) {
				t.Fatalf("updated = %+v", got)
			}
			sameTime(t, "CreatedAt after update", got.CreatedAt, startTime)
			e = f.checkAudit("user.update", "user", u.ID, 0)
			for _, h := range []string{secretHash, newHash, "argon2"} {
				if strings.Contains(e.Before+e.After, h) {
					t.Fatalf("user.update audit holds a password hash: %q / %q", e.Before, e.After)
				}
			}
			// nil WardIDs leaves them; empty clears them.
			got, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{Disabled: new(false)})
			noErr(t, err)
			if got.Disabled || !reflect.DeepEqual(got.WardIDs, []int64{w2.ward.ID}) {
				t.Fatalf("after nil wards = %+v", got)
			}
			got, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{WardIDs: []int64{}})
			noErr(t, err)
			if len(got.WardIDs) != 0 {
				t.Fatalf("after empty wards = %v", got.WardIDs)
			}
			if n := f.auditCount("user.update"); n != 3 {
				t.Fatalf("three updates wrote %d user.update rows, want 3", n)
			}
		}},
		{"User/Errors", func(t *testing.T, f *fixture) {
			w := f.seedWard("w1")
			noErr(t, f.store.CreateUser(f.ctx, &wardload.User{Name: "b.one", Role: wardload.RoleAdmin, PasswordHash: "h"}))
			before := f.totalAudit()
			wantErr(t, f.store.CreateUser(f.ctx, &wardload.User{Name: "B One", Role: wardload.RoleAdmin, PasswordHash: "h"}), wardload.EINVALID, "name")
			wantErr(t, f.store.CreateUser(f.ctx, &wardload.User{Name: "b.two", Role: "boss", PasswordHash: "h"}), wardload.EINVALID, "role")
			wantErr(t, f.store.CreateUser(f.ctx, &wardload.User{Name: "b.two", Role: wardload.RoleAdmin}), wardload.EINVALID, "password")
			wantErr(t, f.store.CreateUser(f.ctx, &wardload.User{Name: "b.one", Role: wardload.RoleAdmin, PasswordHash: "h"}), wardload.ECONFLICT, "name")
			wantErr(t, f.store.CreateUser(f.ctx, &wardload.User{Name: "b.two", Role: wardload.RoleAdmin, PasswordHash: "h", WardIDs: []int64{w.ward.ID, 9999}}), wardload.ENOTFOUND, "wards")
			_, err := f.store.FindUserByName(f.ctx, "b.two")
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.FindUserByID(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.UpdateUser(f.ctx, 9999, wardload.UserUpdate{Disabled: new(true)})
			wantErr(t, err, wardload.ENOTFOUND, "")
			u, _ := f.store.FindUserByName(f.ctx, "b.one")
			_, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{Role: new("boss")})
			wantErr(t, err, wardload.EINVALID, "role")
			_, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{PasswordHash: new("")})
			wantErr(t, err, wardload.EINVALID, "password")
			_, err = f.store.UpdateUser(f.ctx, u.ID, wardload.UserUpdate{WardIDs: []int64{9999}})
			wantErr(t, err, wardload.ENOTFOUND, "wards")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after failures", before, n)
			}
			re, _ := f.store.FindUserByID(f.ctx, u.ID)
			if re.Role != wardload.RoleAdmin || len(re.WardIDs) != 0 {
				t.Fatalf("failed updates changed the user: %+v", re)
			}
		}},
		{"User/Find", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			for _, u := range []*wardload.User{
				{Name: "d.nurse", Role: wardload.RoleChargeNurse, PasswordHash: "h", WardIDs: []int64{w1.ward.ID}},
				{Name: "a.admin", Role: wardload.RoleAdmin, PasswordHash: "h"},
				{Name: "c.manager", Role: wardload.RoleManager, PasswordHash: "h", WardIDs: []int64{w1.ward.ID, w2.ward.ID}},
				{Name: "b.nurse", Role: wardload.RoleChargeNurse, PasswordHash: "h", WardIDs: []int64{w2.ward.ID}},
			} {
				noErr(t, f.store.CreateUser(f.ctx, u))
			}
			find := func(fl wardload.UserFilter) (string, int) {
				t.Helper()
				us, n, err := f.store.FindUsers(f.ctx, fl)
				noErr(t, err)
				var s []string
				for _, u := range us {
					s = append(s, u.Name)
				}
				return strings.Join(s, ","), n
			}
			for _, tc := range []struct {
				name  string
				f     wardload.UserFilter
				names string
				total int
			}{
				{"all by name", wardload.UserFilter{}, "a.admin,b.nurse,c.manager,d.nurse", 4},
				{"role", wardload.UserFilter{Role: ptr(wardload.RoleChargeNurse)}, "b.nurse,d.nurse", 2},
				{"ward", wardload.UserFilter{WardID: &w1.ward.ID}, "c.manager,d.nurse", 2},
				{"name", wardload.UserFilter{Name: new("c.manager")}, "c.manager", 1},
				{"page", wardload.UserFilter{Offset: 1, Limit: 2}, "b.nurse,c.manager", 4},
			} {
				if names, n := find(tc.f); names != tc.names || n != tc.total {
					t.Errorf("%s: %q %d, want %q %d", tc.name, names, n, tc.names, tc.total)
				}
			}
			us, _, err := f.store.FindUsers(f.ctx, wardload.UserFilter{Name: new("c.manager")})
			noErr(t, err)
			if len(us) != 1 || !reflect.DeepEqual(us[0].WardIDs, []int64{w1.ward.ID, w2.ward.ID}) {
				t.Fatalf("FindUsers does not load ward memberships: %+v", us)
			}
			id := us[0].ID
			if names, n := find(wardload.UserFilter{ID: &id}); names != "c.manager" || n != 1 {
				t.Fatalf("by id: %q %d", names, n)
			}
		}},
	}
}
