package storetest

import (
	"reflect"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// shiftRecordCases check the end-of-shift record, the staff on duty kept
// with a census revision and the ward settings of issue 11. The suite's
// clock starts at 2026-03-02 08:15:30 UTC; the seeded ward is in
// Europe/Dublin (UTC in March), so the night of 1 March (19:30–07:30) has
// ended and the day of 2 March (07:30–19:30) is running.
func shiftRecordCases() []testCase {
	return []testCase{
		{"ShiftRecord/CreateReviseFind", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			night := date(2026, 3, 1)
			r1 := &wardload.ShiftRecord{WardID: sw.ward.ID, Date: night, ShiftID: sw.night.ID, Worked: wardload.StaffOnDuty{Nurses: new(6)},
				Admissions: 2, Discharges: 1, EnteredBy: 5}
			noErr(t, f.store.CreateShiftRecord(f.ctx, r1))
			if r1.ID == 0 || r1.Revision != 1 {
				t.Fatalf("first: ID %d revision %d", r1.ID, r1.Revision)
			}
			sameTime(t, "EnteredAt", r1.EnteredAt, f.clock.Now())
			f.checkAudit(wardload.ActionShiftRecordCreate, "shift_record", r1.ID, sw.ward.ID)

			// A correction is a new revision; the first is kept.
			f.clock.Advance(10 * time.Minute)
			r2 := &wardload.ShiftRecord{WardID: sw.ward.ID, Date: night, ShiftID: sw.night.ID, Worked: wardload.StaffOnDuty{Nurses: new(5), Support: new(2)},
				Admissions: 3, Discharges: 0, CareLeftUndone: true, CareCategory: wardload.CareMobility, EnteredBy: 6}
			noErr(t, f.store.CreateShiftRecord(f.ctx, r2))
			if r2.Revision != 2 || r2.ID == r1.ID {
				t.Fatalf("second: ID %d revision %d, want revision 2", r2.ID, r2.Revision)
			}
			if n := f.auditCount(wardload.ActionShiftRecordCreate); n != 2 {
				t.Fatalf("shift_record.create rows = %d, want 2", n)
			}
			all, n, err := f.store.FindShiftRecords(f.ctx, wardload.ShiftRecordFilter{WardID: &sw.ward.ID})
			noErr(t, err)
			if n != 2 || len(all) != 2 || all[0].Revision != 2 || all[1].Revision != 1 {
				t.Fatalf("all records: n %d %+v", n, all)
			}
			if !reflect.DeepEqual(all[0], r2) {
				t.Fatalf("reread = %+v\nwant     %+v", all[0], r2)
			}
			if all[1].Worked.Support != nil || *all[1].Worked.Nurses != 6 || all[1].CareLeftUndone || all[1].CareCategory != "" {
				t.Fatalf("revision 1 reread = %+v", all[1])
			}
			latest, n, err := f.store.FindShiftRecords(f.ctx, wardload.ShiftRecordFilter{WardID: &sw.ward.ID, LatestOnly: true})
			noErr(t, err)
			if n != 1 || len(latest) != 1 || latest[0].ID != r2.ID {
				t.Fatalf("latest: n %d %+v", n, latest)
			}
			// Filters: another shift, another date range.
			other, n, err := f.store.FindShiftRecords(f.ctx, wardload.ShiftRecordFilter{WardID: &sw.ward.ID, ShiftID: &sw.day.ID})
			noErr(t, err)
			if n != 0 || len(other) != 0 {
				t.Fatalf("day shift records: %d", n)
			}
			from := date(2026, 3, 2)
			if _, n, err = f.store.FindShiftRecords(f.ctx, wardload.ShiftRecordFilter{From: &from}); err != nil || n != 0 {
				t.Fatalf("from 2 March: n %d err %v", n, err)
			}
		}},
		{"ShiftRecord/RefusedUntilEnded", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			r := &wardload.ShiftRecord{WardID: sw.ward.ID, Date: date(2026, 3, 2), ShiftID: sw.day.ID, Worked: wardload.StaffOnDuty{Nurses: new(6)}}
			before := *r
			wantErr(t, f.store.CreateShiftRecord(f.ctx, r), wardload.EINVALID, "shift")
			if !reflect.DeepEqual(*r, before) {
				t.Fatalf("refused record changed: %+v", r)
			}
			// One second before the end (19:30 Dublin = 19:30 UTC) still refused.
			f.clock.now = time.Date(2026, 3, 2, 19, 29, 59, 0, time.UTC)
			wantErr(t, f.store.CreateShiftRecord(f.ctx, r), wardload.EINVALID, "shift")
			if n := f.auditCount(wardload.ActionShiftRecordCreate); n != 0 {
				t.Fatalf("refused record audited %d times", n)
			}
			f.clock.now = time.Date(2026, 3, 2, 19, 30, 0, 0, time.UTC)
			noErr(t, f.store.CreateShiftRecord(f.ctx, r))
			if r.Revision != 1 {
				t.Fatalf("revision %d, want 1", r.Revision)
			}
		}},
		{"ShiftRecord/BadInput", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			night := date(2026, 3, 1)
			ok := func() *wardload.ShiftRecord {
				return &wardload.ShiftRecord{WardID: sw.ward.ID, Date: night, ShiftID: sw.night.ID, Worked: wardload.StaffOnDuty{Nurses: new(6)}}
			}
			for _, tc := range []struct {
				name        string
				edit        func(r *wardload.ShiftRecord)
				code, field string
			}{
				{"no nurses", func(r *wardload.ShiftRecord) { r.Worked.Nurses = nil }, wardload.EINVALID, "nurses_worked"},
				{"negative nurses", func(r *wardload.ShiftRecord) { r.Worked.Nurses = new(-1) }, wardload.EINVALID, "nurses_worked"},
				{"too many nurses", func(r *wardload.ShiftRecord) { r.Worked.Nurses = new(wardload.MaxStaffOnDuty + 1) }, wardload.EINVALID, "nurses_worked"},
				{"negative support", func(r *wardload.ShiftRecord) { r.Worked.Support = new(-2) }, wardload.EINVALID, "support_worked"},
				{"negative admissions", func(r *wardload.ShiftRecord) { r.Admissions = -1 }, wardload.EINVALID, "admissions"},
				{"too many discharges", func(r *wardload.ShiftRecord) { r.Discharges = wardload.MaxShiftMovements + 1 }, wardload.EINVALID, "discharges"},
				{"unknown category", func(r *wardload.ShiftRecord) { r.CareLeftUndone, r.CareCategory = true, "bed 4 fell" }, wardload.EINVALID, "care_category"},
				{"category without undone care", func(r *wardload.ShiftRecord) { r.CareCategory = wardload.CareHygiene }, wardload.EINVALID, "care_category"},
				{"unknown ward", func(r *wardload.ShiftRecord) { r.WardID = 9999 }, wardload.ENOTFOUND, "ward"},
				{"shift of another ward", func(r *wardload.ShiftRecord) { r.ShiftID = other.night.ID }, wardload.ENOTFOUND, "shift"},
				{"unknown shift", func(r *wardload.ShiftRecord) { r.ShiftID = 9999 }, wardload.ENOTFOUND, "shift"},
			} {
				r := ok()
				tc.edit(r)
				wantErr(t, f.store.CreateShiftRecord(f.ctx, r), tc.code, tc.field)
			}
			if _, n, err := f.store.FindShiftRecords(f.ctx, wardload.ShiftRecordFilter{}); err != nil || n != 0 {
				t.Fatalf("after refusals: %d records, err %v", n, err)
			}
			if n := f.auditCount(wardload.ActionShiftRecordCreate); n != 0 {
				t.Fatalf("refusals audited %d times", n)
			}
		}},
		{"Census/StaffOnDuty", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			d := date(2026, 3, 2)
			c1 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Staff: wardload.StaffOnDuty{Nurses: new(6), Support: new(2)}}
			noErr(t, f.store.CreateCensus(f.ctx, c1))
			c2 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Staff: wardload.StaffOnDuty{Nurses: new(7)}}
			noErr(t, f.store.CreateCensus(f.ctx, c2))
			c3 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID}
			noErr(t, f.store.CreateCensus(f.ctx, c3))
			for _, want := range []*wardload.Census{c1, c2, c3} {
				got, err := f.store.FindCensusByID(f.ctx, want.ID)
				noErr(t, err)
				if !reflect.DeepEqual(got.Staff, want.Staff) {
					t.Fatalf("revision %d staff = %+v, want %+v", want.Revision, got.Staff, want.Staff)
				}
			}
			rs, err := f.store.FindShiftRevisions(f.ctx, sw.ward.ID, d, sw.day.ID)
			noErr(t, err)
			if len(rs) != 3 || rs[0].Staff.Nurses != nil || *rs[1].Staff.Nurses != 7 || rs[1].Staff.Support != nil ||
				*rs[2].Staff.Nurses != 6 || *rs[2].Staff.Support != 2 {
				t.Fatalf("revisions' staff: %+v %+v %+v", rs[0].Staff, rs[1].Staff, rs[2].Staff)
			}
			bad := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Staff: wardload.StaffOnDuty{Nurses: new(-1)}}
			wantErr(t, f.store.CreateCensus(f.ctx, bad), wardload.EINVALID, "nurses_on_duty")
			bad = &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Staff: wardload.StaffOnDuty{Support: new(wardload.MaxStaffOnDuty + 1)}}
			wantErr(t, f.store.CreateCensus(f.ctx, bad), wardload.EINVALID, "support_on_duty")
			if n := f.auditCount(wardload.ActionCensusCreate); n != 3 {
				t.Fatalf("census.create rows = %d, want 3", n)
			}
		}},
		{"Settings/ChangeoverSupportEscalation", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			got, err := f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			if got.ChangeoverMinutes != wardload.DefaultChangeoverMinutes || got.SupportStaff || got.Escalation != "" {
				t.Fatalf("defaults: %+v", got)
			}
			s := wardload.DefaultSettings(sw.ward.ID)
			s.ChangeoverMinutes, s.SupportStaff = 0, true
			s.Escalation = "Call the site manager on bleep 4410.\nThen note it in the shift log."
			noErr(t, f.store.SaveSettings(f.ctx, s))
			got, err = f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			if got.ChangeoverMinutes != 0 || !got.SupportStaff || got.Escalation != s.Escalation {
				t.Fatalf("reread: %+v", got)
			}
			s.ChangeoverMinutes = wardload.MaxChangeoverMinutes + 1
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.EINVALID, "changeover_minutes")
			s.ChangeoverMinutes, s.Escalation = 60, strings.Repeat("é", wardload.MaxEscalationText+1)
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.EINVALID, "escalation")
			got, err = f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			if got.ChangeoverMinutes != 0 {
				t.Fatalf("a refused save changed the window to %d", got.ChangeoverMinutes)
			}
		}},
	}
}
