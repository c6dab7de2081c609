package storetest

import (
	"reflect"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func wardCases() []testCase {
	return []testCase{
		{"Ward/CreateAndFind", func(t *testing.T, f *fixture) {
			w := &wardload.Ward{Code: "w4-north", Name: "Ward 4 North", TimeZone: "America/St_Johns", FactorNames: []string{"mobility", "dependency"}}
			noErr(t, f.store.CreateWard(f.ctx, w))
			if w.ID == 0 {
				t.Fatal("ID not set")
			}
			sameTime(t, "CreatedAt", w.CreatedAt, f.clock.Now())
			for _, get := range []func() (*wardload.Ward, error){
				func() (*wardload.Ward, error) { return f.store.FindWardByID(f.ctx, w.ID) },
				func() (*wardload.Ward, error) { return f.store.FindWardByCode(f.ctx, "w4-north") },
			} {
				got, err := get()
				noErr(t, err)
				if got.ID != w.ID || got.Code != w.Code || got.Name != w.Name || got.TimeZone != "America/St_Johns" {
					t.Fatalf("got %+v, want %+v", got, w)
				}
				// Factor order is the ward's choice and is kept.
				if !reflect.DeepEqual(got.FactorNames, []string{"mobility", "dependency"}) {
					t.Fatalf("FactorNames = %v", got.FactorNames)
				}
				sameTime(t, "CreatedAt", got.CreatedAt, f.clock.Now())
			}
			e := f.checkAudit("ward.create", "ward", w.ID, w.ID)
			if e.Before != "" || !strings.Contains(e.After, "w4-north") {
				t.Fatalf("audit before/after = %q / %q", e.Before, e.After)
			}
		}},
		{"Ward/NotFound", func(t *testing.T, f *fixture) {
			_, err := f.store.FindWardByID(f.ctx, 999)
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.FindWardByCode(f.ctx, "nope")
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.UpdateWard(f.ctx, 999, wardload.WardUpdate{Name: new("X")})
			wantErr(t, err, wardload.ENOTFOUND, "")
		}},
		{"Ward/Invalid", func(t *testing.T, f *fixture) {
			for _, tc := range []struct {
				name  string
				ward  wardload.Ward
				field string
			}{
				{"bad code", wardload.Ward{Code: "Bad Code", Name: "X", TimeZone: "UTC"}, "code"},
				{"no name", wardload.Ward{Code: "w1", Name: " ", TimeZone: "UTC"}, "name"},
				{"unknown tz", wardload.Ward{Code: "w1", Name: "X", TimeZone: "Mars/Olympus"}, "time_zone"},
				{"empty tz", wardload.Ward{Code: "w1", Name: "X"}, "time_zone"},
				{"dup factor", wardload.Ward{Code: "w1", Name: "X", TimeZone: "UTC", FactorNames: []string{"a", "a"}}, "factor_names"},
			} {
				t.Run(tc.name, func(t *testing.T) {
					w := tc.ward
					wantErr(t, f.store.CreateWard(f.ctx, &w), wardload.EINVALID, tc.field)
				})
			}
			if n := f.totalAudit(); n != 0 {
				t.Fatalf("%d audit rows after failed creates, want 0", n)
			}
			if _, n, err := f.store.FindWards(f.ctx, wardload.WardFilter{}); err != nil || n != 0 {
				t.Fatalf("FindWards = %d, %v; want nothing stored", n, err)
			}
		}},
		{"Ward/DuplicateCode", func(t *testing.T, f *fixture) {
			noErr(t, f.store.CreateWard(f.ctx, &wardload.Ward{Code: "w1", Name: "One", TimeZone: "UTC"}))
			err := f.store.CreateWard(f.ctx, &wardload.Ward{Code: "w1", Name: "Other", TimeZone: "UTC"})
			wantErr(t, err, wardload.ECONFLICT, "code")
			if n := f.auditCount("ward.create"); n != 1 {
				t.Fatalf("ward.create audit rows = %d, want 1", n)
			}
		}},
		{"Ward/Update", func(t *testing.T, f *fixture) {
			w := &wardload.Ward{Code: "w1", Name: "One", TimeZone: "UTC", FactorNames: []string{"a"}}
			noErr(t, f.store.CreateWard(f.ctx, w))
			f.clock.Advance(time.Hour)
			got, err := f.store.UpdateWard(f.ctx, w.ID, wardload.WardUpdate{Name: new("Renamed"), TimeZone: new("Asia/Kolkata"), FactorNames: []string{"b", "c"}})
			noErr(t, err)
			if got.Name != "Renamed" || got.TimeZone != "Asia/Kolkata" || !reflect.DeepEqual(got.FactorNames, []string{"b", "c"}) || got.Code != "w1" {
				t.Fatalf("updated = %+v", got)
			}
			sameTime(t, "CreatedAt after update", got.CreatedAt, startTime)
			// nil FactorNames leaves them; an update is persisted.
			got, err = f.store.UpdateWard(f.ctx, w.ID, wardload.WardUpdate{Name: new("Again")})
			noErr(t, err)
			if !reflect.DeepEqual(got.FactorNames, []string{"b", "c"}) {
				t.Fatalf("FactorNames after nil update = %v", got.FactorNames)
			}
			re, err := f.store.FindWardByID(f.ctx, w.ID)
			noErr(t, err)
			if re.Name != "Again" || re.TimeZone != "Asia/Kolkata" {
				t.Fatalf("reread = %+v", re)
			}
			e := f.checkAudit("ward.update", "ward", w.ID, w.ID)
			if !strings.Contains(e.Before, "Renamed") || !strings.Contains(e.After, "Again") {
				t.Fatalf("audit before/after = %q / %q", e.Before, e.After)
			}
			// Invalid updates change nothing and are not audited.
			_, err = f.store.UpdateWard(f.ctx, w.ID, wardload.WardUpdate{TimeZone: new("Nowhere/Land")})
			wantErr(t, err, wardload.EINVALID, "time_zone")
			_, err = f.store.UpdateWard(f.ctx, w.ID, wardload.WardUpdate{Name: new("")})
			wantErr(t, err, wardload.EINVALID, "name")
			if n := f.auditCount("ward.update"); n != 2 {
				t.Fatalf("ward.update rows = %d, want 2", n)
			}
			re, _ = f.store.FindWardByID(f.ctx, w.ID)
			if re.TimeZone != "Asia/Kolkata" || re.Name != "Again" {
				t.Fatalf("failed update changed the ward: %+v", re)
			}
		}},
		{"Ward/Find", func(t *testing.T, f *fixture) {
			var ids []int64
			for _, c := range []string{"c", "a", "d", "b"} {
				w := &wardload.Ward{Code: c, Name: "Ward " + c, TimeZone: "UTC"}
				noErr(t, f.store.CreateWard(f.ctx, w))
				ids = append(ids, w.ID)
			}
			ws, n, err := f.store.FindWards(f.ctx, wardload.WardFilter{})
			noErr(t, err)
			if n != 4 || codes(ws) != "a,b,c,d" {
				t.Fatalf("all = %d %s", n, codes(ws))
			}
			ws, n, err = f.store.FindWards(f.ctx, wardload.WardFilter{Offset: 1, Limit: 2})
			noErr(t, err)
			if n != 4 || codes(ws) != "b,c" {
				t.Fatalf("page = %d %s, want total 4 and b,c", n, codes(ws))
			}
			ws, n, err = f.store.FindWards(f.ctx, wardload.WardFilter{Code: new("d")})
			noErr(t, err)
			if n != 1 || codes(ws) != "d" {
				t.Fatalf("by code = %d %s", n, codes(ws))
			}
			ws, n, err = f.store.FindWards(f.ctx, wardload.WardFilter{ID: &ids[0]})
			noErr(t, err)
			if n != 1 || codes(ws) != "c" {
				t.Fatalf("by id = %d %s", n, codes(ws))
			}
			u := &wardload.User{Name: "m.member", Role: wardload.RoleChargeNurse, PasswordHash: "x", WardIDs: []int64{ids[2], ids[3]}}
			noErr(t, f.store.CreateUser(f.ctx, u))
			ws, n, err = f.store.FindWards(f.ctx, wardload.WardFilter{UserID: &u.ID})
			noErr(t, err)
			if n != 2 || codes(ws) != "b,d" {
				t.Fatalf("by user = %d %s, want b,d", n, codes(ws))
			}
		}},
	}
}

func codes(ws []*wardload.Ward) string {
	var s []string
	for _, w := range ws {
		s = append(s, w.Code)
	}
	return strings.Join(s, ",")
}
