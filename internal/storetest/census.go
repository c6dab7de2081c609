package storetest

import (
	"slices"
	"sync"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func censusCases() []testCase {
	return []testCase{
		{"Census/CreateAndRevise", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			d := date(2026, 3, 2)
			// t3 is missing: stored as 0.
			c1 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, EnteredBy: 5, Counts: []wardload.TierCount{
				{TierID: sw.tiers[0].ID, Patients: 4}, {TierID: sw.tiers[1].ID, Patients: 7},
			}}
			noErr(t, f.store.CreateCensus(f.ctx, c1))
			if c1.ID == 0 || c1.Revision != 1 {
				t.Fatalf("first: ID %d revision %d", c1.ID, c1.Revision)
			}
			sameTime(t, "EnteredAt", c1.EnteredAt, f.clock.Now())
			f.checkAudit("census.create", "census", c1.ID, sw.ward.ID)

			got, err := f.store.FindCensusByID(f.ctx, c1.ID)
			noErr(t, err)
			// Counts by tier DisplayOrder: t2 (1), t1 (2), t3 (3).
			want := []wardload.TierCount{{TierID: sw.tiers[1].ID, Patients: 7}, {TierID: sw.tiers[0].ID, Patients: 4}, {TierID: sw.tiers[2].ID, Patients: 0}}
			if !slices.Equal(got.Counts, want) {
				t.Fatalf("counts = %+v, want %+v", got.Counts, want)
			}
			if got.WardID != sw.ward.ID || got.Date != d || got.ShiftID != sw.day.ID || got.Revision != 1 || got.EnteredBy != 5 || got.Total() != 11 {
				t.Fatalf("got %+v", got)
			}
			sameTime(t, "EnteredAt reread", got.EnteredAt, startTime)

			f.clock.Advance(30 * time.Minute)
			c2 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, EnteredBy: 6, Counts: []wardload.TierCount{{TierID: sw.tiers[2].ID, Patients: 1}}}
			noErr(t, f.store.CreateCensus(f.ctx, c2))
			if c2.Revision != 2 || c2.ID == c1.ID {
				t.Fatalf("second: ID %d revision %d, want revision 2", c2.ID, c2.Revision)
			}
			sameTime(t, "EnteredAt rev 2", c2.EnteredAt, f.clock.Now())
			// History is kept.
			old, err := f.store.FindCensusByID(f.ctx, c1.ID)
			noErr(t, err)
			if old.Revision != 1 || old.Total() != 11 {
				t.Fatalf("revision 1 changed: %+v", old)
			}
			// A different shift starts again at revision 1.
			c3 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.night.ID}
			noErr(t, f.store.CreateCensus(f.ctx, c3))
			if c3.Revision != 1 {
				t.Fatalf("night revision %d, want 1", c3.Revision)
			}
			g3, _ := f.store.FindCensusByID(f.ctx, c3.ID)
			if len(g3.Counts) != 3 || g3.Total() != 0 {
				t.Fatalf("empty census counts = %+v, want 3 zero counts", g3.Counts)
			}
			_, err = f.store.FindCensusByID(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")
		}},
		{"Census/ConcurrentRevisions", func(t *testing.T, f *fixture) {
			// Corrections entered at the same moment from two screens must
			// both be kept, as consecutive revisions, never as duplicates.
			sw := f.seedWard("w1")
			const n = 8
			var wg sync.WaitGroup
			errs := make([]error, n)
			for i := range n {
				wg.Go(func() {
					c := &wardload.Census{WardID: sw.ward.ID, Date: date(2026, 3, 2), ShiftID: sw.day.ID, Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: i}}}
					errs[i] = f.store.CreateCensus(f.ctx, c)
				})
			}
			wg.Wait()
			for _, err := range errs {
				noErr(t, err)
			}
			cs, total, err := f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &sw.ward.ID})
			noErr(t, err)
			if total != n {
				t.Fatalf("%d entries stored, want %d", total, n)
			}
			for i, c := range cs {
				if c.Revision != n-i {
					t.Fatalf("revision at %d = %d, want %d (revisions must be 1..%d without gaps or repeats)", i, c.Revision, n-i, n)
				}
			}
			if got := f.auditCount("census.create"); got != n {
				t.Fatalf("census.create rows = %d, want %d", got, n)
			}
		}},
		{"Census/Errors", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			d := date(2026, 3, 2)
			before := f.totalAudit()
			for _, tc := range []struct {
				name  string
				c     wardload.Census
				code  string
				field string
			}{
				{"no shift", wardload.Census{WardID: sw.ward.ID, Date: d}, wardload.EINVALID, "shift"},
				{"no date", wardload.Census{WardID: sw.ward.ID, ShiftID: sw.day.ID}, wardload.EINVALID, "date"},
				{"negative", wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: -1}}}, wardload.EINVALID, "patients"},
				{"unknown ward", wardload.Census{WardID: 9999, Date: d, ShiftID: sw.day.ID}, wardload.ENOTFOUND, "ward"},
				{"unknown shift", wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: 9999}, wardload.ENOTFOUND, "shift"},
				{"shift of other ward", wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: other.day.ID}, wardload.ENOTFOUND, "shift"},
				{"unknown tier", wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: 1}, {TierID: 9999, Patients: 1}}}, wardload.ENOTFOUND, "tier"},
				{"tier of other ward", wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: 1}, {TierID: other.tiers[1].ID, Patients: 2}}}, wardload.ENOTFOUND, "tier"},
			} {
				t.Run(tc.name, func(t *testing.T) {
					c := tc.c
					wantErr(t, f.store.CreateCensus(f.ctx, &c), tc.code, tc.field)
				})
			}
			_, n, err := f.store.FindCensus(f.ctx, wardload.CensusFilter{})
			noErr(t, err)
			if n != 0 {
				t.Fatalf("%d census rows stored after failures", n)
			}
			if got := f.totalAudit(); got != before {
				t.Fatalf("audit rows %d -> %d after failures", before, got)
			}
			// The failures did not use up revision 1.
			c := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID}
			noErr(t, f.store.CreateCensus(f.ctx, c))
			if c.Revision != 1 {
				t.Fatalf("revision %d after failures, want 1", c.Revision)
			}
		}},
		{"Census/FindOrderAndFilters", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			add := func(w *seededWard, d wardload.Date, s *wardload.ShiftPattern, patients int) *wardload.Census {
				t.Helper()
				c := &wardload.Census{WardID: w.ward.ID, Date: d, ShiftID: s.ID, Counts: []wardload.TierCount{{TierID: w.tiers[0].ID, Patients: patients}}}
				noErr(t, f.store.CreateCensus(f.ctx, c))
				return c
			}
			d1, d2 := date(2026, 3, 1), date(2026, 3, 2)
			a := add(sw, d1, sw.night, 1)
			b := add(sw, d2, sw.night, 2)
			c := add(sw, d2, sw.day, 3)
			b2 := add(sw, d2, sw.night, 4) // revision 2 of b
			add(other, d2, other.day, 5)

			wid := sw.ward.ID
			cs, n, err := f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &wid})
			noErr(t, err)
			// Date desc; within a date by shift start (Day 07:30 before Night 19:30); then revision desc.
			if n != 4 || !slices.Equal(censusIDs(cs), []int64{c.ID, b2.ID, b.ID, a.ID}) {
				t.Fatalf("order = %d %v, want %v", n, censusIDs(cs), []int64{c.ID, b2.ID, b.ID, a.ID})
			}
			if cs[0].Counts == nil || cs[0].Total() != 3 {
				t.Fatalf("FindCensus does not load counts: %+v", cs[0])
			}
			cs, n, err = f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &wid, LatestOnly: true})
			noErr(t, err)
			if n != 3 || !slices.Equal(censusIDs(cs), []int64{c.ID, b2.ID, a.ID}) {
				t.Fatalf("latest = %d %v", n, censusIDs(cs))
			}
			cs, n, err = f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &wid, ShiftID: &sw.night.ID, LatestOnly: true})
			noErr(t, err)
			if n != 2 || !slices.Equal(censusIDs(cs), []int64{b2.ID, a.ID}) {
				t.Fatalf("latest night = %d %v", n, censusIDs(cs))
			}
			cs, n, err = f.store.FindCensus(f.ctx, wardload.CensusFilter{From: &d2, To: &d2})
			noErr(t, err)
			if n != 4 || len(cs) != 4 {
				t.Fatalf("one day, all wards = %d", n)
			}
			cs, n, err = f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &wid, To: &d1})
			noErr(t, err)
			if n != 1 || cs[0].ID != a.ID {
				t.Fatalf("to d1 = %d %v", n, censusIDs(cs))
			}
			cs, n, err = f.store.FindCensus(f.ctx, wardload.CensusFilter{WardID: &wid, Offset: 1, Limit: 2})
			noErr(t, err)
			if n != 4 || !slices.Equal(censusIDs(cs), []int64{b2.ID, b.ID}) {
				t.Fatalf("page = %d %v", n, censusIDs(cs))
			}
		}},
	}
}

func censusIDs(cs []*wardload.Census) []int64 {
	var ids []int64
	for _, c := range cs {
		ids = append(ids, c.ID)
	}
	return ids
}
