package storetest

import (
	"reflect"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// staffingCases check the planned staff per dated shift (issue 10) and the
// token permission to send it.
func staffingCases() []testCase {
	return []testCase{
		{"PlannedStaff/SetReplaceIdempotentFind", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			d := date(2026, 3, 3)
			p := &wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.day.ID, Nurses: 6, UpdatedBy: 7}
			changed, err := f.store.SetPlannedStaff(f.ctx, p)
			noErr(t, err)
			if !changed {
				t.Fatal("first plan: changed false")
			}
			sameTime(t, "UpdatedAt", p.UpdatedAt, f.clock.Now())
			e := f.checkAudit(wardload.ActionStaffingPlan, "planned_staff", w1.day.ID, w1.ward.ID)
			if e.Before != "" || !strings.Contains(e.After, `"Nurses":6`) || !strings.Contains(e.After, "2026-03-03") {
				t.Fatalf("first plan audit before %q after %q", e.Before, e.After)
			}

			// The same counts again, later and by someone else: nothing
			// written, nothing audited, the stored plan returned.
			f.clock.Advance(time.Hour)
			again := &wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.day.ID, Nurses: 6, UpdatedBy: 8}
			changed, err = f.store.SetPlannedStaff(f.ctx, again)
			noErr(t, err)
			if changed || again.UpdatedBy != 7 || !again.UpdatedAt.Equal(startTime) {
				t.Fatalf("repeat: changed %v, %+v; want unchanged, the first save's", changed, again)
			}
			if n := f.auditCount(wardload.ActionStaffingPlan); n != 1 {
				t.Fatalf("staffing.plan rows after repeat = %d, want 1", n)
			}

			// A new value replaces it; the audit keeps the old one.
			repl := &wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.day.ID, Nurses: 7, Support: new(2), UpdatedBy: 8}
			changed, err = f.store.SetPlannedStaff(f.ctx, repl)
			noErr(t, err)
			if !changed {
				t.Fatal("replacement: changed false")
			}
			e = f.checkAudit(wardload.ActionStaffingPlan, "planned_staff", w1.day.ID, w1.ward.ID)
			if !strings.Contains(e.Before, `"Nurses":6`) || !strings.Contains(e.After, `"Nurses":7`) {
				t.Fatalf("replacement audit before %q after %q", e.Before, e.After)
			}
			// Other plans: the night of the same date, and ward 2.
			noErr2(t, f, &wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.night.ID, Nurses: 4})
			noErr2(t, f, &wardload.PlannedStaff{WardID: w2.ward.ID, Date: date(2026, 3, 5), ShiftID: w2.day.ID, Nurses: 3})

			all, err := f.store.FindPlannedStaff(f.ctx, wardload.PlannedStaffFilter{})
			noErr(t, err)
			if len(all) != 3 {
				t.Fatalf("all plans = %d, want 3", len(all))
			}
			one, err := f.store.FindPlannedStaff(f.ctx, wardload.PlannedStaffFilter{WardIDs: []int64{w1.ward.ID}, From: &d, To: &d})
			noErr(t, err)
			if len(one) != 2 {
				t.Fatalf("ward 1 plans of %s = %d, want 2", d, len(one))
			}
			var day *wardload.PlannedStaff
			for _, x := range one {
				if x.ShiftID == w1.day.ID {
					day = x
				}
			}
			if !reflect.DeepEqual(day, repl) {
				t.Fatalf("reread = %+v\nwant     %+v", day, repl)
			}
			later := date(2026, 3, 4)
			if got, err := f.store.FindPlannedStaff(f.ctx, wardload.PlannedStaffFilter{From: &later}); err != nil || len(got) != 1 || got[0].WardID != w2.ward.ID {
				t.Fatalf("from %s: %v %+v", later, err, got)
			}
			if got, err := f.store.FindPlannedStaff(f.ctx, wardload.PlannedStaffFilter{WardIDs: []int64{}}); err != nil || len(got) != 0 {
				t.Fatalf("no wards: %v %+v", err, got)
			}
		}},
		{"PlannedStaff/BadInputStoresNothing", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			d := date(2026, 3, 3)
			before := f.totalAudit()
			for _, tc := range []struct {
				name        string
				p           wardload.PlannedStaff
				code, field string
			}{
				{"negative", wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.day.ID, Nurses: -1}, wardload.EINVALID, "nurses"},
				{"absurd", wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.day.ID, Nurses: wardload.MaxStaffOnDuty + 1}, wardload.EINVALID, "nurses"},
				{"negative support", wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w1.day.ID, Nurses: 3, Support: new(-2)}, wardload.EINVALID, "support"},
				{"no date", wardload.PlannedStaff{WardID: w1.ward.ID, ShiftID: w1.day.ID, Nurses: 3}, wardload.EINVALID, "date"},
				{"unknown shift", wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: 99999, Nurses: 3}, wardload.ENOTFOUND, "shift"},
				{"other ward's shift", wardload.PlannedStaff{WardID: w1.ward.ID, Date: d, ShiftID: w2.day.ID, Nurses: 3}, wardload.ENOTFOUND, "shift"},
				{"unknown ward", wardload.PlannedStaff{WardID: 99999, Date: d, ShiftID: w1.day.ID, Nurses: 3}, wardload.ENOTFOUND, "ward"},
			} {
				p := tc.p
				_, err := f.store.SetPlannedStaff(f.ctx, &p)
				if err == nil {
					t.Fatalf("%s: no error", tc.name)
				}
				wantErr(t, err, tc.code, tc.field)
			}
			if got, _ := f.store.FindPlannedStaff(f.ctx, wardload.PlannedStaffFilter{}); len(got) != 0 {
				t.Fatalf("bad input stored %+v", got)
			}
			if n := f.totalAudit(); n != before {
				t.Fatalf("bad input wrote %d audit rows", n-before)
			}
		}},
		{"User/StaffingOfficeRole", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			u := &wardload.User{Name: "s.office", Role: wardload.RoleStaffingOffice, PasswordHash: "x", WardIDs: []int64{w2.ward.ID, w1.ward.ID}}
			noErr(t, f.store.CreateUser(f.ctx, u))
			got, err := f.store.FindUserByName(f.ctx, "s.office")
			noErr(t, err)
			if got.Role != wardload.RoleStaffingOffice || !reflect.DeepEqual(got.WardIDs, []int64{w1.ward.ID, w2.ward.ID}) {
				t.Fatalf("reread %+v", got)
			}
			bad := &wardload.User{Name: "x.bad", Role: "office", PasswordHash: "x"}
			wantErr(t, f.store.CreateUser(f.ctx, bad), wardload.EINVALID, "role")
		}},
		{"Token/WriteStaffingScope", func(t *testing.T, f *fixture) {
			w1 := f.seedWard("w1")
			ro := &wardload.APIToken{Name: "reader", Hash: hashOf("r"), WardIDs: []int64{w1.ward.ID}}
			rw := &wardload.APIToken{Name: "planner", Hash: hashOf("w"), WardIDs: []int64{w1.ward.ID}, WriteStaffing: true}
			noErr(t, f.store.CreateToken(f.ctx, ro))
			noErr(t, f.store.CreateToken(f.ctx, rw))
			for _, want := range []*wardload.APIToken{ro, rw} {
				got, err := f.store.FindTokenByHash(f.ctx, want.Hash)
				noErr(t, err)
				if got.WriteStaffing != want.WriteStaffing {
					t.Fatalf("%s: WriteStaffing %v, want %v", want.Name, got.WriteStaffing, want.WriteStaffing)
				}
			}
			if e := f.lastAudit(wardload.ActionTokenCreate); !strings.Contains(e.After, `"WriteStaffing":true`) {
				t.Fatalf("token.create audit %q does not say the token may write staffing", e.After)
			}
		}},
	}
}

// noErr2 sets a plan that must succeed.
func noErr2(t *testing.T, f *fixture, p *wardload.PlannedStaff) {
	t.Helper()
	_, err := f.store.SetPlannedStaff(f.ctx, p)
	noErr(t, err)
}
