package storetest

import (
	"slices"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// retireCases pin the lifecycle of wards, shift patterns and tiers:
// retired, never deleted; audited; the last active shift pattern and tier
// stay; a new census names nothing retired; history stays readable.
func retireCases() []testCase {
	return []testCase{
		{"Retire/WardEditAndRetire", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			c := &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 2), ShiftID: sw.day.ID,
				Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: 3}}}
			noErr(t, f.store.CreateCensus(f.ctx, c))

			f.clock.Advance(time.Minute)
			up, err := f.store.UpdateWard(f.ctx, sw.ward.ID, wardload.WardUpdate{Name: new("Ward One"), TimeZone: new("Asia/Kolkata")})
			noErr(t, err)
			if up.Name != "Ward One" || up.TimeZone != "Asia/Kolkata" || up.Code != "w1" || up.Retired() {
				t.Fatalf("edited = %+v", up)
			}
			f.checkAudit("ward.update", "ward", sw.ward.ID, sw.ward.ID)

			f.clock.Advance(time.Minute)
			up, err = f.store.UpdateWard(f.ctx, sw.ward.ID, wardload.WardUpdate{Retired: new(true)})
			noErr(t, err)
			sameTime(t, "RetiredAt", up.RetiredAt, f.clock.Now())
			e := f.checkAudit("ward.retire", "ward", sw.ward.ID, sw.ward.ID)
			if e.Before == e.After {
				t.Fatalf("retire audit has no change: %q", e.After)
			}
			got, err := f.store.FindWardByCode(f.ctx, "w1")
			noErr(t, err)
			sameTime(t, "RetiredAt reread", got.RetiredAt, f.clock.Now())
			if got.Name != "Ward One" {
				t.Fatalf("reread = %+v", got)
			}
			// Retiring again keeps the first time; nothing else changes.
			f.clock.Advance(time.Minute)
			again, err := f.store.UpdateWard(f.ctx, sw.ward.ID, wardload.WardUpdate{Retired: new(true)})
			noErr(t, err)
			sameTime(t, "RetiredAt kept", again.RetiredAt, got.RetiredAt)

			// Listing: all wards by default, only active ones on request.
			ws, n, err := f.store.FindWards(f.ctx, wardload.WardFilter{})
			noErr(t, err)
			if n != 2 || len(ws) != 2 || !ws[0].Retired() || ws[1].Retired() {
				t.Fatalf("all wards = %d %+v", n, ws)
			}
			ws, n, err = f.store.FindWards(f.ctx, wardload.WardFilter{ActiveOnly: true, Limit: 10})
			noErr(t, err)
			if n != 1 || len(ws) != 1 || ws[0].ID != other.ward.ID {
				t.Fatalf("active wards = %d %+v", n, ws)
			}

			// History stays: the census is still there; a new one is refused.
			old, err := f.store.FindCensusByID(f.ctx, c.ID)
			noErr(t, err)
			if old.Total() != 3 {
				t.Fatalf("census after retiring = %+v", old)
			}
			before := f.totalAudit()
			err = f.store.CreateCensus(f.ctx, &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 3), ShiftID: sw.day.ID})
			wantErr(t, err, wardload.EINVALID, "ward")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after a refused census", before, n)
			}

			// Reinstating clears it.
			up, err = f.store.UpdateWard(f.ctx, sw.ward.ID, wardload.WardUpdate{Retired: new(false)})
			noErr(t, err)
			if up.Retired() {
				t.Fatalf("reinstated = %+v", up)
			}
			f.checkAudit("ward.reinstate", "ward", sw.ward.ID, sw.ward.ID)
			noErr(t, f.store.CreateCensus(f.ctx, &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 3), ShiftID: sw.day.ID}))
		}},
		{"Retire/WardUpdateInvalid", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			before := f.totalAudit()
			_, err := f.store.UpdateWard(f.ctx, sw.ward.ID, wardload.WardUpdate{TimeZone: new("Mars/Olympus"), Retired: new(true)})
			wantErr(t, err, wardload.EINVALID, "time_zone")
			_, err = f.store.UpdateWard(f.ctx, sw.ward.ID, wardload.WardUpdate{Name: new(" ")})
			wantErr(t, err, wardload.EINVALID, "name")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after failures", before, n)
			}
			got, err := f.store.FindWardByID(f.ctx, sw.ward.ID)
			noErr(t, err)
			if got.TimeZone != "Europe/Dublin" || got.Retired() || got.Name != sw.ward.Name {
				t.Fatalf("ward changed by a refused update: %+v", got)
			}
		}},
		{"Retire/ShiftPattern", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			c := &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 2), ShiftID: sw.night.ID}
			noErr(t, f.store.CreateCensus(f.ctx, c))
			f.clock.Advance(time.Minute)
			p, err := f.store.UpdateShiftPattern(f.ctx, sw.night.ID, wardload.ShiftPatternUpdate{Retired: new(true)})
			noErr(t, err)
			sameTime(t, "RetiredAt", p.RetiredAt, f.clock.Now())
			f.checkAudit("shift.retire", "shift", sw.night.ID, sw.ward.ID)
			// Kept for history, marked retired.
			ps, err := f.store.FindShiftPatterns(f.ctx, sw.ward.ID)
			noErr(t, err)
			if len(ps) != 2 || shiftNames(wardload.ActiveShifts(ps)) != "Day" {
				t.Fatalf("patterns = %+v", ps)
			}
			got, err := f.store.FindShiftPatternByID(f.ctx, sw.night.ID)
			noErr(t, err)
			sameTime(t, "RetiredAt reread", got.RetiredAt, f.clock.Now())
			if _, err := f.store.FindCensusByID(f.ctx, c.ID); err != nil {
				t.Fatalf("census of the retired shift: %v", err)
			}
			// A new census for it is refused, naming the shift.
			before := f.totalAudit()
			err = f.store.CreateCensus(f.ctx, &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 3), ShiftID: sw.night.ID})
			wantErr(t, err, wardload.EINVALID, "shift")
			// The last active pattern cannot be retired.
			_, err = f.store.UpdateShiftPattern(f.ctx, sw.day.ID, wardload.ShiftPatternUpdate{Retired: new(true)})
			wantErr(t, err, wardload.EINVALID, "retired")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after refusals", before, n)
			}
			day, _ := f.store.FindShiftPatternByID(f.ctx, sw.day.ID)
			if day.Retired() {
				t.Fatal("last active shift pattern was retired")
			}
			// Editing a retired pattern keeps it retired; reinstating works.
			p, err = f.store.UpdateShiftPattern(f.ctx, sw.night.ID, wardload.ShiftPatternUpdate{Name: new("Late")})
			noErr(t, err)
			if !p.Retired() {
				t.Fatalf("edit reinstated the pattern: %+v", p)
			}
			p, err = f.store.UpdateShiftPattern(f.ctx, sw.night.ID, wardload.ShiftPatternUpdate{Retired: new(false)})
			noErr(t, err)
			if p.Retired() {
				t.Fatalf("reinstated = %+v", p)
			}
			f.checkAudit("shift.reinstate", "shift", sw.night.ID, sw.ward.ID)
			// With Late active again, Day may go.
			_, err = f.store.UpdateShiftPattern(f.ctx, sw.day.ID, wardload.ShiftPatternUpdate{Retired: new(true)})
			noErr(t, err)
		}},
		{"Retire/Tier", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			t3 := sw.tiers[2]
			f.clock.Advance(time.Minute)
			tr, err := f.store.UpdateTier(f.ctx, t3.ID, wardload.TierUpdate{Retired: new(true)})
			noErr(t, err)
			sameTime(t, "RetiredAt", tr.RetiredAt, f.clock.Now())
			f.checkAudit("tier.retire", "tier", t3.ID, sw.ward.ID)
			ts, err := f.store.FindTiers(f.ctx, sw.ward.ID)
			noErr(t, err)
			if len(ts) != 3 || len(wardload.ActiveTiers(ts)) != 2 {
				t.Fatalf("tiers = %+v", ts)
			}
			// A new census has no row for the retired tier; patients in it
			// are refused.
			c := &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 2), ShiftID: sw.day.ID,
				Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: 2}, {TierID: t3.ID, Patients: 0}}}
			noErr(t, f.store.CreateCensus(f.ctx, c))
			got, err := f.store.FindCensusByID(f.ctx, c.ID)
			noErr(t, err)
			want := []wardload.TierCount{{TierID: sw.tiers[1].ID, Patients: 0}, {TierID: sw.tiers[0].ID, Patients: 2}}
			if !slices.Equal(got.Counts, want) {
				t.Fatalf("counts = %+v, want %+v", got.Counts, want)
			}
			err = f.store.CreateCensus(f.ctx, &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 2), ShiftID: sw.day.ID,
				Counts: []wardload.TierCount{{TierID: t3.ID, Patients: 1}}})
			wantErr(t, err, wardload.EINVALID, "tier")
			// The last active tier stays.
			_, err = f.store.UpdateTier(f.ctx, sw.tiers[0].ID, wardload.TierUpdate{Retired: new(true)})
			noErr(t, err)
			_, err = f.store.UpdateTier(f.ctx, sw.tiers[1].ID, wardload.TierUpdate{Retired: new(true)})
			wantErr(t, err, wardload.EINVALID, "retired")
			last, _ := f.store.FindTierByID(f.ctx, sw.tiers[1].ID)
			if last.Retired() {
				t.Fatal("last active tier was retired")
			}
		}},
	}
}
