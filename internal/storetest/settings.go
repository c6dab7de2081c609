package storetest

import (
	"reflect"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func settingsCases() []testCase {
	return []testCase{
		{"Settings/DefaultsAndSave", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			got, err := f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			if !reflect.DeepEqual(got, wardload.DefaultSettings(sw.ward.ID)) {
				t.Fatalf("unsaved settings = %+v, want defaults", got)
			}
			_, err = f.store.FindSettings(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")

			f.clock.Advance(time.Hour)
			s := &wardload.Settings{WardID: sw.ward.ID, DirectCareFraction: 0.8, CoverLevel: 0.95, LookbackWeeks: 12, Quartiles: wardload.QuartilesHF7, Beds: 28, UpdatedBy: 3,
				Floors: []wardload.RatioFloor{
					{ShiftID: sw.day.ID, PatientsPerNurse: 4, ChargeNurseCounts: true},
					{ShiftID: sw.night.ID, TierID: sw.tiers[2].ID, PatientsPerNurse: 1.5},
				}}
			noErr(t, f.store.SaveSettings(f.ctx, s))
			sameTime(t, "UpdatedAt", s.UpdatedAt, f.clock.Now())
			got, err = f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			sameTime(t, "UpdatedAt reread", got.UpdatedAt, f.clock.Now())
			got.UpdatedAt = s.UpdatedAt
			if !reflect.DeepEqual(got, s) {
				t.Fatalf("reread = %+v\nwant     %+v", got, s)
			}
			// Nothing was saved before: the audit row has no before, not the defaults.
			e := f.checkAudit("settings.save", "settings", sw.ward.ID, sw.ward.ID)
			if e.Before != "" {
				t.Fatalf("first save audits before %q, want none", e.Before)
			}

			// Saving replaces the floors.
			f.clock.Advance(time.Hour)
			s2 := wardload.DefaultSettings(sw.ward.ID)
			s2.Floors = []wardload.RatioFloor{{ShiftID: sw.night.ID, PatientsPerNurse: 6}}
			noErr(t, f.store.SaveSettings(f.ctx, s2))
			got, err = f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			if len(got.Floors) != 1 || got.Floors[0] != s2.Floors[0] || got.Beds != 0 || got.Quartiles != wardload.QuartilesHinges {
				t.Fatalf("after replace = %+v", got)
			}
			sameTime(t, "UpdatedAt second save", got.UpdatedAt, f.clock.Now())
			if e := f.checkAudit("settings.save", "settings", sw.ward.ID, sw.ward.ID); e.Before == "" || e.Before == e.After {
				t.Fatalf("second save audits before %q after %q: want the first save before", e.Before, e.After)
			}
			if n := f.auditCount("settings.save"); n != 2 {
				t.Fatalf("settings.save rows = %d, want 2", n)
			}
		}},
		{"Settings/Errors", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			good := func() *wardload.Settings {
				s := wardload.DefaultSettings(sw.ward.ID)
				s.Floors = []wardload.RatioFloor{{ShiftID: sw.day.ID, PatientsPerNurse: 4}}
				return s
			}
			noErr(t, f.store.SaveSettings(f.ctx, good()))
			before := f.totalAudit()

			s := good()
			s.CoverLevel = 1
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.EINVALID, "cover_level")
			s = good()
			s.Quartiles = "type9"
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.EINVALID, "quartiles")
			s = good()
			s.WardID = 9999
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.ENOTFOUND, "")
			s = good()
			s.Floors = append(s.Floors, wardload.RatioFloor{ShiftID: other.night.ID, PatientsPerNurse: 3})
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.ENOTFOUND, "floors")
			s = good()
			s.Floors = append(s.Floors, wardload.RatioFloor{ShiftID: 9999, PatientsPerNurse: 3})
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.ENOTFOUND, "floors")
			s = good()
			s.Floors = append(s.Floors, wardload.RatioFloor{ShiftID: sw.night.ID, TierID: other.tiers[0].ID, PatientsPerNurse: 3})
			wantErr(t, f.store.SaveSettings(f.ctx, s), wardload.ENOTFOUND, "floors")

			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after failures", before, n)
			}
			got, err := f.store.FindSettings(f.ctx, sw.ward.ID)
			noErr(t, err)
			if len(got.Floors) != 1 || got.Floors[0].ShiftID != sw.day.ID {
				t.Fatalf("failed saves changed floors: %+v", got.Floors)
			}
		}},
	}
}
