package storetest

import (
	"reflect"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// censusPlannedCases check the planned movement stored with a census
// revision (issue 11 item 4).
func censusPlannedCases() []testCase {
	return []testCase{
		{"Census/PlannedMovement", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			d := date(2026, 3, 2)
			counts := []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: 3}}
			c1 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: counts,
				Planned: wardload.PlannedMovement{Admissions: new(2), Discharges: new(1)}}
			noErr(t, f.store.CreateCensus(f.ctx, c1))
			a := f.checkAudit(wardload.ActionCensusCreate, "census", c1.ID, sw.ward.ID)
			if !strings.Contains(a.After, `"Planned":{"Admissions":2,"Discharges":1}`) {
				t.Fatalf("audit row lacks the planned movement: %s", a.After)
			}
			c2 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: counts,
				Planned: wardload.PlannedMovement{Admissions: new(0)}}
			noErr(t, f.store.CreateCensus(f.ctx, c2))
			c3 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: counts}
			noErr(t, f.store.CreateCensus(f.ctx, c3))
			for _, want := range []*wardload.Census{c1, c2, c3} {
				got, err := f.store.FindCensusByID(f.ctx, want.ID)
				noErr(t, err)
				if !reflect.DeepEqual(got.Planned, want.Planned) {
					t.Fatalf("revision %d planned = %+v, want %+v", want.Revision, got.Planned, want.Planned)
				}
			}
			cs, _, err := f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &sw.ward.ID})
			noErr(t, err)
			if len(cs) != 3 || cs[2].Planned.Admissions == nil || *cs[2].Planned.Admissions != 2 {
				t.Fatalf("found %d, oldest planned %+v", len(cs), cs[len(cs)-1].Planned)
			}
			before := f.totalAudit()
			for field, p := range map[string]wardload.PlannedMovement{
				"planned_admissions": {Admissions: new(-1)},
				"planned_discharges": {Discharges: new(4)}, // above the 3 patients
			} {
				bad := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: counts, Planned: p}
				wantErr(t, f.store.CreateCensus(f.ctx, bad), wardload.EINVALID, field)
			}
			if f.totalAudit() != before {
				t.Fatal("a refused census was audited")
			}
		}},
	}
}
