package storetest

import (
	"testing"

	"wardload/internal/wardload"
)

// leanCases check ObservationFilter.Lean: the same rows, in the same
// order, with the same values and review state as a full read, but no
// factors and no entry details.
func leanCases() []testCase {
	return []testCase{
		{"Observation/LeanRead", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			o1 := sw.obs(date(2026, 3, 2), 30)
			o1.Factors = map[string]float64{"dependency": 2.5}
			o2 := sw.obs(date(2026, 3, 1), 12.25)
			o2.TierID, o2.ShiftID, o2.WindowHours = sw.tiers[1].ID, sw.night.ID, 24
			o3 := sw.obs(date(2026, 3, 3), 45)
			_, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{o1, o2, o3})
			noErr(t, err)
			_, err = f.store.ExcludeObservation(f.ctx, o3.ID, "extra zero typed", testActor.UserID)
			noErr(t, err)
			for _, all := range []bool{false, true} {
				full, n, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &sw.ward.ID, IncludeExcluded: all})
				noErr(t, err)
				lean, m, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &sw.ward.ID, IncludeExcluded: all, Lean: true})
				noErr(t, err)
				if m != n || len(lean) != len(full) || len(full) == 0 {
					t.Fatalf("include excluded %v: lean read %d rows (total %d), full read %d (total %d)", all, len(lean), m, len(full), n)
				}
				for i, g := range lean {
					w := full[i]
					if g.Factors != nil || g.EnteredBy != 0 || !g.EnteredAt.IsZero() || g.BatchID != "" {
						t.Fatalf("lean row %d carries entry details or factors: %+v", i, g)
					}
					if g.ID != w.ID || g.WardID != w.WardID || g.TierID != w.TierID || g.ShiftID != w.ShiftID || g.Date != w.Date ||
						g.WindowHours != w.WindowHours || g.CareMinutes != w.CareMinutes || g.Excluded != w.Excluded ||
						g.ExcludedReason != w.ExcludedReason || g.ExcludedBy != w.ExcludedBy || !g.ExcludedAt.Equal(w.ExcludedAt) {
						t.Fatalf("lean row %d = %+v, full row %+v", i, g, w)
					}
				}
			}
			// A page of a lean read still counts every match.
			lean, n, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &sw.ward.ID, IncludeExcluded: true, Lean: true, Limit: 1, Offset: 1})
			noErr(t, err)
			if n != 3 || len(lean) != 1 || lean[0].ID != o1.ID || lean[0].Excluded {
				t.Fatalf("page of a lean read: total %d, rows %v", n, obsIDs(lean))
			}
			ex, _, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &sw.ward.ID, IncludeExcluded: true, Lean: true, From: &o3.Date})
			noErr(t, err)
			if len(ex) != 1 || !ex[0].Excluded || ex[0].ExcludedReason != "extra zero typed" || ex[0].ExcludedBy != testActor.UserID || ex[0].ExcludedAt.IsZero() {
				t.Fatalf("lean read of the excluded row: %+v", ex)
			}
		}},
	}
}
