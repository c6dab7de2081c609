package storetest

import (
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func shiftCases() []testCase {
	return []testCase{
		{"Shift/CreateFindUpdate", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			got, err := f.store.FindShiftPatternByID(f.ctx, sw.night.ID)
			noErr(t, err)
			if *got != *sw.night {
				t.Fatalf("got %+v, want %+v", got, sw.night)
			}
			ps, err := f.store.FindShiftPatterns(f.ctx, sw.ward.ID)
			noErr(t, err)
			if shiftNames(ps) != "Day,Night" {
				t.Fatalf("order = %s, want by start", shiftNames(ps))
			}
			f.checkAudit("shift.create", "shift", sw.day.ID, sw.ward.ID)

			up, err := f.store.UpdateShiftPattern(f.ctx, sw.night.ID, wardload.ShiftPatternUpdate{Name: new("Late"), StartMinute: new(300), NominalHours: new(7.5)})
			noErr(t, err)
			if up.Name != "Late" || up.StartMinute != 300 || up.NominalHours != 7.5 || up.WardID != sw.ward.ID {
				t.Fatalf("updated = %+v", up)
			}
			ps, _ = f.store.FindShiftPatterns(f.ctx, sw.ward.ID)
			if shiftNames(ps) != "Late,Day" {
				t.Fatalf("order after update = %s", shiftNames(ps))
			}
			e := f.checkAudit("shift.update", "shift", sw.night.ID, sw.ward.ID)
			if !strings.Contains(e.Before, "Night") || !strings.Contains(e.After, "Late") {
				t.Fatalf("audit = %q / %q", e.Before, e.After)
			}
		}},
		{"Shift/Errors", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			before := f.totalAudit()
			wid := sw.ward.ID
			wantErr(t, f.store.CreateShiftPattern(f.ctx, &wardload.ShiftPattern{WardID: wid, Name: "", StartMinute: 0, NominalHours: 8}), wardload.EINVALID, "name")
			wantErr(t, f.store.CreateShiftPattern(f.ctx, &wardload.ShiftPattern{WardID: wid, Name: "X", StartMinute: 1440, NominalHours: 8}), wardload.EINVALID, "start")
			wantErr(t, f.store.CreateShiftPattern(f.ctx, &wardload.ShiftPattern{WardID: wid, Name: "X", StartMinute: 0, NominalHours: 25}), wardload.EINVALID, "hours")
			wantErr(t, f.store.CreateShiftPattern(f.ctx, &wardload.ShiftPattern{WardID: 9999, Name: "X", StartMinute: 0, NominalHours: 8}), wardload.ENOTFOUND, "")
			wantErr(t, f.store.CreateShiftPattern(f.ctx, &wardload.ShiftPattern{WardID: wid, Name: "Day", StartMinute: 0, NominalHours: 8}), wardload.ECONFLICT, "name")
			_, err := f.store.UpdateShiftPattern(f.ctx, sw.night.ID, wardload.ShiftPatternUpdate{Name: new("Day")})
			wantErr(t, err, wardload.ECONFLICT, "name")
			_, err = f.store.UpdateShiftPattern(f.ctx, sw.night.ID, wardload.ShiftPatternUpdate{NominalHours: new(0.0)})
			wantErr(t, err, wardload.EINVALID, "hours")
			_, err = f.store.UpdateShiftPattern(f.ctx, 9999, wardload.ShiftPatternUpdate{Name: new("Z")})
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.FindShiftPatternByID(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after failures", before, n)
			}
			got, _ := f.store.FindShiftPatternByID(f.ctx, sw.night.ID)
			if *got != *sw.night {
				t.Fatalf("failed update changed the pattern: %+v", got)
			}
			// A name is unique per ward only.
			other := &wardload.Ward{Code: "w2", Name: "W2", TimeZone: "UTC"}
			noErr(t, f.store.CreateWard(f.ctx, other))
			noErr(t, f.store.CreateShiftPattern(f.ctx, &wardload.ShiftPattern{WardID: other.ID, Name: "Day", StartMinute: 0, NominalHours: 8}))
		}},
	}
}

func shiftNames(ps []*wardload.ShiftPattern) string {
	var s []string
	for _, p := range ps {
		s = append(s, p.Name)
	}
	return strings.Join(s, ",")
}
