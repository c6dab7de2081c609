package storetest

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func observationCases() []testCase {
	return []testCase{
		{"Observation/CreateBatchAndFind", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			o1 := sw.obs(date(2026, 3, 2), 30)
			o1.Factors = map[string]float64{"dependency": 2.5}
			o2 := sw.obs(date(2026, 3, 1), 12.25)
			o2.TierID, o2.ShiftID, o2.WindowHours = sw.tiers[1].ID, sw.night.ID, 24
			batch, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{o1, o2})
			noErr(t, err)
			if batch == "" || o1.BatchID != batch || o2.BatchID != batch {
				t.Fatalf("batch = %q, rows %q %q", batch, o1.BatchID, o2.BatchID)
			}
			if o1.ID == 0 || o2.ID == 0 || o1.ID == o2.ID {
				t.Fatalf("IDs %d %d", o1.ID, o2.ID)
			}
			sameTime(t, "EnteredAt", o1.EnteredAt, f.clock.Now())
			got, err := f.store.FindObservationByID(f.ctx, o1.ID)
			noErr(t, err)
			if got.WardID != sw.ward.ID || got.TierID != o1.TierID || got.ShiftID != sw.day.ID || got.Date != o1.Date ||
				got.WindowHours != 4 || got.CareMinutes != 30 || got.Factors["dependency"] != 2.5 || len(got.Factors) != 1 ||
				got.EnteredBy != testActor.UserID || got.BatchID != batch || got.Excluded || got.ExcludedReason != "" || got.ExcludedBy != 0 || !got.ExcludedAt.IsZero() {
				t.Fatalf("got %+v", got)
			}
			sameTime(t, "EnteredAt", got.EnteredAt, f.clock.Now())
			got2, err := f.store.FindObservationByID(f.ctx, o2.ID)
			noErr(t, err)
			if got2.CareMinutes != 12.25 || got2.WindowHours != 24 || len(got2.Factors) != 0 {
				t.Fatalf("got2 %+v", got2)
			}
			// Ordered by Date, then ID.
			os, n, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{})
			noErr(t, err)
			if n != 2 || len(os) != 2 || os[0].ID != o2.ID || os[1].ID != o1.ID {
				t.Fatalf("find = %d %v", n, obsIDs(os))
			}
			e := f.checkAudit("observation.import", "observation_batch", 0, sw.ward.ID)
			if !strings.Contains(e.After, batch) {
				t.Fatalf("audit after %q does not name the batch", e.After)
			}
			if n := f.auditCount("observation.import"); n != 1 {
				t.Fatalf("one import wrote %d audit rows, want 1", n)
			}
			_, err = f.store.FindObservationByID(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")
		}},
		{"Observation/AllOrNothing", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			d := date(2026, 3, 2)
			rows := func(bad func(o *wardload.Observation)) []*wardload.Observation {
				var os []*wardload.Observation
				for i := range 5 {
					os = append(os, sw.obs(d, float64(10+i)))
				}
				bad(os[2])
				return os
			}
			for _, tc := range []struct {
				name  string
				bad   func(o *wardload.Observation)
				code  string
				field string
			}{
				{"unknown tier", func(o *wardload.Observation) { o.TierID = 99999 }, wardload.EINVALID, "tier"},
				{"tier of other ward", func(o *wardload.Observation) { o.TierID = other.tiers[0].ID }, wardload.EINVALID, "tier"},
				{"unknown shift", func(o *wardload.Observation) { o.ShiftID = 99999 }, wardload.EINVALID, "shift"},
				{"shift of other ward", func(o *wardload.Observation) { o.ShiftID = other.day.ID }, wardload.EINVALID, "shift"},
				{"unknown ward", func(o *wardload.Observation) { o.WardID = 99999 }, wardload.EINVALID, "ward"},
				{"unnamed factor", func(o *wardload.Observation) { o.Factors = map[string]float64{"weight": 80} }, wardload.EINVALID, "factors"},
				{"negative minutes", func(o *wardload.Observation) { o.CareMinutes = -1 }, wardload.EINVALID, "care_minutes"},
				{"zero window", func(o *wardload.Observation) { o.WindowHours = 0 }, wardload.EINVALID, "window_hours"},
				{"no date", func(o *wardload.Observation) { o.Date = wardload.Date{} }, wardload.EINVALID, "date"},
			} {
				t.Run(tc.name, func(t *testing.T) {
					_, err := f.store.CreateObservations(f.ctx, rows(tc.bad))
					wantErr(t, err, tc.code, tc.field)
					if msg := wardload.ErrorMessage(err); !strings.HasPrefix(msg, "Row 3:") {
						t.Fatalf("message %q does not start with \"Row 3:\"", msg)
					}
				})
			}
			_, n, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{IncludeExcluded: true})
			noErr(t, err)
			if n != 0 {
				t.Fatalf("%d observations stored after failed imports, want 0", n)
			}
			if c := f.auditCount("observation.import"); c != 0 {
				t.Fatalf("%d import audit rows after failures", c)
			}
			_, err = f.store.CreateObservations(f.ctx, nil)
			wantErr(t, err, wardload.EINVALID, "")
		}},
		{"Observation/Filters", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			mk := func(w *seededWard, d wardload.Date, tier int, night bool) *wardload.Observation {
				o := w.obs(d, 20)
				o.TierID = w.tiers[tier].ID
				if night {
					o.ShiftID = w.night.ID
				}
				return o
			}
			b1, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{
				mk(sw, date(2026, 3, 3), 0, false), // 1
				mk(sw, date(2026, 3, 1), 1, true),  // 2
				mk(sw, date(2026, 3, 2), 0, true),  // 3
			})
			noErr(t, err)
			f.clock.Advance(time.Minute)
			b2, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{
				mk(sw, date(2026, 3, 2), 1, false), // 4
				mk(other, date(2026, 3, 2), 0, false),
			})
			noErr(t, err)
			if b1 == b2 {
				t.Fatal("two imports share a batch ID")
			}
			count := func(fl wardload.ObservationFilter) (int, []*wardload.Observation) {
				t.Helper()
				os, n, err := f.store.FindObservations(f.ctx, fl)
				noErr(t, err)
				return n, os
			}
			wid := sw.ward.ID
			for _, tc := range []struct {
				name string
				f    wardload.ObservationFilter
				want int
			}{
				{"all", wardload.ObservationFilter{}, 5},
				{"ward", wardload.ObservationFilter{WardID: &wid}, 4},
				{"tier", wardload.ObservationFilter{WardID: &wid, TierID: &sw.tiers[1].ID}, 2},
				{"shift", wardload.ObservationFilter{ShiftID: &sw.night.ID}, 2},
				{"from", wardload.ObservationFilter{WardID: &wid, From: new(date(2026, 3, 2))}, 3},
				{"to inclusive", wardload.ObservationFilter{WardID: &wid, To: new(date(2026, 3, 2))}, 3},
				{"from-to one day", wardload.ObservationFilter{From: new(date(2026, 3, 2)), To: new(date(2026, 3, 2))}, 3},
				{"batch", wardload.ObservationFilter{BatchID: &b2}, 2},
			} {
				if n, os := count(tc.f); n != tc.want || len(os) != tc.want {
					t.Errorf("%s: total %d, rows %d, want %d", tc.name, n, len(os), tc.want)
				}
			}
			n, os := count(wardload.ObservationFilter{WardID: &wid, Offset: 1, Limit: 2})
			if n != 4 || len(os) != 2 {
				t.Fatalf("page: total %d rows %d", n, len(os))
			}
			// Date order 03-01, 03-02 (id 3), 03-02 (id 4), 03-03; page is the middle two.
			if !os[0].Date.Before(date(2026, 3, 3)) || os[0].Date != date(2026, 3, 2) || os[1].Date != date(2026, 3, 2) || os[0].ID >= os[1].ID {
				t.Fatalf("page order: %+v %+v", os[0], os[1])
			}
		}},
		{"Observation/ExcludeRestore", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			o := sw.obs(date(2026, 3, 2), 30)
			keep := sw.obs(date(2026, 3, 2), 40)
			_, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{o, keep})
			noErr(t, err)
			f.clock.Advance(2 * time.Hour)

			_, err = f.store.ExcludeObservation(f.ctx, o.ID, "  ", 7)
			wantErr(t, err, wardload.EINVALID, "reason")
			_, err = f.store.ExcludeObservation(f.ctx, 9999, "typo", 7)
			wantErr(t, err, wardload.ENOTFOUND, "")
			if n := f.auditCount("observation.exclude"); n != 0 {
				t.Fatalf("failed excludes wrote %d audit rows", n)
			}

			ex, err := f.store.ExcludeObservation(f.ctx, o.ID, "extra zero typed", 7)
			noErr(t, err)
			if !ex.Excluded || ex.ExcludedReason != "extra zero typed" || ex.ExcludedBy != 7 {
				t.Fatalf("excluded = %+v", ex)
			}
			sameTime(t, "ExcludedAt", ex.ExcludedAt, f.clock.Now())
			re, err := f.store.FindObservationByID(f.ctx, o.ID)
			noErr(t, err)
			if !re.Excluded || re.ExcludedReason != "extra zero typed" || re.ExcludedBy != 7 {
				t.Fatalf("reread = %+v", re)
			}
			sameTime(t, "ExcludedAt reread", re.ExcludedAt, f.clock.Now())
			sameTime(t, "EnteredAt unchanged", re.EnteredAt, startTime)
			e := f.checkAudit("observation.exclude", "observation", o.ID, sw.ward.ID)
			if !strings.Contains(e.After, "extra zero typed") || e.Before == "" {
				t.Fatalf("audit = %q / %q", e.Before, e.After)
			}

			_, err = f.store.ExcludeObservation(f.ctx, o.ID, "again", 7)
			wantErr(t, err, wardload.ECONFLICT, "")

			wid := sw.ward.ID
			os, n, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &wid})
			noErr(t, err)
			if n != 1 || os[0].ID != keep.ID {
				t.Fatalf("default filter: %d %v, want only the included row", n, obsIDs(os))
			}
			_, n, err = f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &wid, IncludeExcluded: true})
			noErr(t, err)
			if n != 2 {
				t.Fatalf("IncludeExcluded: %d, want 2 (exclusion never deletes)", n)
			}

			f.clock.Advance(time.Hour)
			_, err = f.store.RestoreObservation(f.ctx, keep.ID, 8)
			wantErr(t, err, wardload.ECONFLICT, "")
			_, err = f.store.RestoreObservation(f.ctx, 9999, 8)
			wantErr(t, err, wardload.ENOTFOUND, "")
			rs, err := f.store.RestoreObservation(f.ctx, o.ID, 8)
			noErr(t, err)
			if rs.Excluded || rs.ExcludedReason != "" || rs.ExcludedBy != 0 || !rs.ExcludedAt.IsZero() {
				t.Fatalf("restored = %+v", rs)
			}
			f.checkAudit("observation.restore", "observation", o.ID, sw.ward.ID)
			_, n, _ = f.store.FindObservations(f.ctx, wardload.ObservationFilter{WardID: &wid})
			if n != 2 {
				t.Fatalf("after restore %d included, want 2", n)
			}
			_, err = f.store.RestoreObservation(f.ctx, o.ID, 8)
			wantErr(t, err, wardload.ECONFLICT, "")
		}},
	}
}

// importCases pin what an import leaves on the caller's rows and how a
// batch of several wards is audited.
func importCases() []testCase {
	return []testCase{
		{"Observation/FailedImportLeavesRowsBare", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			d := date(2026, 3, 2)
			os := []*wardload.Observation{sw.obs(d, 10), sw.obs(d, 20), sw.obs(d, 30)}
			os[2].TierID = 99999
			_, err := f.store.CreateObservations(f.ctx, os)
			wantErr(t, err, wardload.EINVALID, "tier")
			for i, o := range os {
				if o.ID != 0 || o.BatchID != "" || !o.EnteredAt.IsZero() {
					t.Fatalf("row %d after a failed import: ID %d, batch %q, entered %v; want none", i+1, o.ID, o.BatchID, o.EnteredAt)
				}
			}
		}},
		{"Observation/LargeImportKeepsRowOrderAndFactors", func(t *testing.T, f *fixture) {
			// More rows than one bulk statement carries, two wards
			// interleaved, factors on some rows: the stores write in bulk
			// and must still give IDs in row order and keep every factor.
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			first := w1.obs(date(2026, 3, 1), 5)
			_, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{first})
			noErr(t, err)
			const n = 1234
			os := make([]*wardload.Observation, n)
			for i := range os {
				sw := w1
				if i%5 == 0 {
					sw = w2
				}
				os[i] = sw.obs(date(2026, 3, 1+i%28), float64(i))
				if i%3 == 0 {
					os[i].Factors = map[string]float64{"dependency": float64(i) / 4}
				}
			}
			batch, err := f.store.CreateObservations(f.ctx, os)
			noErr(t, err)
			for i, o := range os {
				if o.ID <= first.ID || i > 0 && o.ID <= os[i-1].ID || o.BatchID != batch {
					t.Fatalf("row %d: ID %d after %d (first batch %d), batch %q", i+1, o.ID, os[max(i-1, 0)].ID, first.ID, o.BatchID)
				}
			}
			got, total, err := f.store.FindObservations(f.ctx, wardload.ObservationFilter{BatchID: &batch})
			noErr(t, err)
			if total != n || len(got) != n {
				t.Fatalf("batch holds %d rows (%d), want %d", total, len(got), n)
			}
			byID := map[int64]*wardload.Observation{}
			for _, o := range got {
				byID[o.ID] = o
			}
			for i, o := range os {
				g := byID[o.ID]
				if g == nil || g.WardID != o.WardID || g.CareMinutes != float64(i) || g.Date != o.Date || len(g.Factors) != len(o.Factors) ||
					o.Factors != nil && g.Factors["dependency"] != o.Factors["dependency"] {
					t.Fatalf("row %d stored as %+v, want %+v", i+1, g, o)
				}
			}
			if n := f.auditCount("observation.import"); n != 3 {
				t.Fatalf("%d import audit rows, want 1 for the first batch and 1 per ward for the second", n)
			}
			after := w2.obs(date(2026, 3, 1), 1)
			_, err = f.store.CreateObservations(f.ctx, []*wardload.Observation{after})
			noErr(t, err)
			if after.ID <= os[n-1].ID {
				t.Fatalf("next import got ID %d, not after %d", after.ID, os[n-1].ID)
			}
		}},
		{"Observation/ImportOfTwoWardsAuditsEachWard", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			d := date(2026, 3, 2)
			batch, err := f.store.CreateObservations(f.ctx, []*wardload.Observation{w2.obs(d, 10), w1.obs(d, 20), w2.obs(d, 30)})
			noErr(t, err)
			if n := f.auditCount("observation.import"); n != 2 {
				t.Fatalf("an import of two wards wrote %d audit rows, want one per ward", n)
			}
			e := f.checkAudit("observation.import", "observation_batch", 0, w1.ward.ID)
			want := fmt.Sprintf(`{"BatchID":%q,"Rows":3,"WardIDs":[%d,%d]}`, batch, w2.ward.ID, w1.ward.ID)
			if e.Before != "" || e.After != want {
				t.Fatalf("import audit %q / %q, want none / %s", e.Before, e.After, want)
			}
		}},
	}
}

func obsIDs(os []*wardload.Observation) []int64 {
	var ids []int64
	for _, o := range os {
		ids = append(ids, o.ID)
	}
	return ids
}
