package storetest

import (
	"testing"

	"wardload/internal/wardload"
)

// versionCases check WardVersion: every change to a ward's data moves
// it, reads and other wards' changes do not.
func versionCases() []testCase {
	return []testCase{
		{"Version/MovesWithEveryChange", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			d := date(2026, 3, 2)
			last, err := f.store.WardVersion(f.ctx, w1.ward.ID)
			noErr(t, err)
			if last.Entries == 0 || last.LastID == 0 {
				t.Fatalf("seeded ward has version %+v, want its set-up counted", last)
			}
			moved := func(what string, want bool) {
				t.Helper()
				v, err := f.store.WardVersion(f.ctx, w1.ward.ID)
				noErr(t, err)
				if (v != last) != want {
					t.Fatalf("after %s: version %+v, before %+v; want moved = %v", what, v, last, want)
				}
				last = v
			}
			o := w1.obs(d, 30)
			_, err = f.store.CreateObservations(f.ctx, []*wardload.Observation{o})
			noErr(t, err)
			moved("an import", true)
			_, _, err = f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &w1.ward.ID})
			noErr(t, err)
			moved("a read", false)
			_, err = f.store.ExcludeObservation(f.ctx, o.ID, "extra zero typed", testActor.UserID)
			noErr(t, err)
			moved("an exclusion", true)
			_, err = f.store.RestoreObservation(f.ctx, o.ID, testActor.UserID)
			noErr(t, err)
			moved("a restoration", true)
			st, err := f.store.FindSettings(f.ctx, w1.ward.ID)
			noErr(t, err)
			st.LookbackWeeks++
			noErr(t, f.store.SaveSettings(f.ctx, st))
			moved("a settings save", true)
			_, err = f.store.CreateObservations(f.ctx, []*wardload.Observation{w2.obs(d, 10)})
			noErr(t, err)
			moved("another ward's import", false)
			_, err = f.store.CreateObservations(f.ctx, []*wardload.Observation{w2.obs(d, 10), w1.obs(d, 20)})
			noErr(t, err)
			moved("an import of both wards", true)
			none, err := f.store.WardVersion(f.ctx, 99999)
			noErr(t, err)
			if none != (wardload.WardVersion{}) {
				t.Fatalf("unknown ward has version %+v, want zero", none)
			}
		}},
	}
}
