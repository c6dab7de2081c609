package storetest

import (
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// projectionOf returns a census of sw on d and shift sp with the given
// counts (t1, t2, t3) and a valid projection of it. The figures are
// arbitrary but distinct, so that a column mixed up on the way to the
// database and back shows.
func (sw *seededWard) projectionOf(d wardload.Date, sp *wardload.ShiftPattern, counts ...int) (*wardload.Census, *wardload.Projection) {
	c := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sp.ID, EnteredBy: testActor.UserID}
	for i, n := range counts {
		c.Counts = append(c.Counts, wardload.TierCount{TierID: sw.tiers[i].ID, Patients: n})
	}
	loc, _ := time.LoadLocation(sw.ward.TimeZone)
	start, end, hours := sp.Window(d, loc)
	floor := 3
	p := &wardload.Projection{
		WardID: sw.ward.ID, Date: d, ShiftID: sp.ID, ShiftName: sp.Name,
		Start: start, End: end, ShiftHours: hours, TotalPatients: c.Total(), CoverLevel: 0.9,
		ExpectedNurseHours: 40.25, CoverNurseHours: 47.5, BandLowNurseHours: 31.125, BandHighNurseHours: 49.375,
		NursesCover: 4, Floor: &floor, Recommended: 4, DecidedBy: "cover",
		MethodVersion: "test-method/1", Seed: 1<<63 + 12345, Draws: 2000,
		Input:  `{"tiers":[{"code":"t1"}],"draws":2000}`,
		Result: `{"method_version":"test-method/1"}`, CreatedBy: testActor.UserID,
	}
	return c, p
}

func projectionCases() []testCase {
	return []testCase{
		{"Projection/CreateAndFind", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			// The night of 28 March 2026 spans the spring change in Europe/Dublin, so
			// it is 11 real hours and its window must survive the
			// round trip exactly.
			d := date(2026, 3, 28)
			c, p := sw.projectionOf(d, sw.night, 4, 7)
			if p.ShiftHours != 11 {
				t.Fatalf("fixture: night over the spring change = %g hours, want 11", p.ShiftHours)
			}
			// The re-read is compared with what was given, not with p after the
			// create: a store may overwrite p with its own re-read, and a read
			// compared with a read cannot catch a column mixed up on the way in.
			given := *p
			given.Floor = new(*p.Floor)
			noErr(t, f.store.CreateCensusProjection(f.ctx, c, p))
			if c.ID == 0 || c.Revision != 1 || p.ID == 0 || p.CensusID != c.ID || p.CensusRevision != 1 {
				t.Fatalf("census ID %d rev %d, projection ID %d census %d rev %d", c.ID, c.Revision, p.ID, p.CensusID, p.CensusRevision)
			}
			sameTime(t, "EnteredAt", c.EnteredAt, f.clock.Now())
			sameTime(t, "CreatedAt", p.CreatedAt, f.clock.Now())
			// Counts: every tier of the ward by display order (t2, t1, t3), t3 stored as 0.
			want := []wardload.TierCount{{TierID: sw.tiers[1].ID, Patients: 7}, {TierID: sw.tiers[0].ID, Patients: 4}, {TierID: sw.tiers[2].ID, Patients: 0}}
			if !slices.Equal(p.Counts, want) {
				t.Fatalf("projection counts = %+v, want %+v", p.Counts, want)
			}
			given.ID, given.CensusID, given.CensusRevision, given.Counts = p.ID, c.ID, c.Revision, want
			f.checkAudit("census.create", "census", c.ID, sw.ward.ID)
			e := f.checkAudit("projection.create", "projection", p.ID, sw.ward.ID)
			if strings.Contains(e.After, p.Input) || strings.Contains(e.After, "test-method/1\"}") || !strings.Contains(e.After, "47.5") {
				t.Fatalf("projection audit JSON must hold the figures but not Input/Result: %s", e.After)
			}

			got, err := f.store.FindProjectionByID(f.ctx, p.ID)
			noErr(t, err)
			sameTime(t, "Start", got.Start, given.Start)
			sameTime(t, "End", got.End, given.End)
			sameTime(t, "CreatedAt reread", got.CreatedAt, f.clock.Now())
			if got.Start.Location() != time.UTC {
				t.Fatalf("Start location = %v, want UTC", got.Start.Location())
			}
			// Everything else must come back exactly, the seed's top bit included.
			norm := func(x *wardload.Projection) wardload.Projection {
				y := *x
				y.Start, y.End, y.CreatedAt = time.Time{}, time.Time{}, time.Time{}
				return y
			}
			if g, w := norm(got), norm(&given); !reflect.DeepEqual(g, w) {
				t.Fatalf("reread = %+v\nwant     %+v", g, w)
			}
			if g, w := norm(p), norm(&given); !reflect.DeepEqual(g, w) {
				t.Fatalf("returned = %+v\nwant       %+v", g, w)
			}
			if g, _ := f.store.FindCensusByID(f.ctx, c.ID); g == nil || g.Total() != 11 {
				t.Fatalf("census of the projection = %+v", g)
			}

			// No floor configured: nil comes back as nil.
			f.clock.Advance(time.Minute)
			c2, p2 := sw.projectionOf(d, sw.day, 1)
			p2.Floor = nil
			noErr(t, f.store.CreateCensusProjection(f.ctx, c2, p2))
			got2, err := f.store.FindProjectionByID(f.ctx, p2.ID)
			noErr(t, err)
			if got2.Floor != nil || got2.ShiftHours != 12 {
				t.Fatalf("floor = %v hours %g, want nil and 12", got2.Floor, got2.ShiftHours)
			}
			_, err = f.store.FindProjectionByID(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")
		}},
		{"Projection/RevisionsAndOrder", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			d1, d2 := date(2026, 3, 2), date(2026, 3, 3)
			// A census without a projection takes revision 1: the
			// projection's census is then revision 2.
			noErr(t, f.store.CreateCensus(f.ctx, &wardload.Census{WardID: sw.ward.ID, Date: d1, ShiftID: sw.day.ID}))
			save := func(sw *seededWard, d wardload.Date, sp *wardload.ShiftPattern, n int) *wardload.Projection {
				t.Helper()
				f.clock.Advance(time.Minute)
				c, p := sw.projectionOf(d, sp, n)
				noErr(t, f.store.CreateCensusProjection(f.ctx, c, p))
				return p
			}
			d1Day2 := save(sw, d1, sw.day, 5)
			d1Day3 := save(sw, d1, sw.day, 6)
			d1Night := save(sw, d1, sw.night, 7)
			d2Day := save(sw, d2, sw.day, 8)
			save(other, d2, other.day, 9)
			if d1Day2.CensusRevision != 2 || d1Day3.CensusRevision != 3 || d1Night.CensusRevision != 1 {
				t.Fatalf("revisions %d %d %d, want 2 3 1", d1Day2.CensusRevision, d1Day3.CensusRevision, d1Night.CensusRevision)
			}
			ids := func(ps []*wardload.Projection) []int64 {
				var out []int64
				for _, p := range ps {
					out = append(out, p.ID)
				}
				return out
			}
			for _, tc := range []struct {
				name  string
				f     wardload.ProjectionFilter
				want  []*wardload.Projection
				total int
			}{
				// Newest first: date, then shift start (night 19:30 before day 07:30), then revision.
				{"all of ward", wardload.ProjectionFilter{WardID: &sw.ward.ID}, []*wardload.Projection{d2Day, d1Night, d1Day3, d1Day2}, 4},
				{"latest only", wardload.ProjectionFilter{WardID: &sw.ward.ID, LatestOnly: true}, []*wardload.Projection{d2Day, d1Night, d1Day3}, 3},
				{"from d2", wardload.ProjectionFilter{WardID: &sw.ward.ID, From: &d2}, []*wardload.Projection{d2Day}, 1},
				{"to d1", wardload.ProjectionFilter{WardID: &sw.ward.ID, To: &d1}, []*wardload.Projection{d1Night, d1Day3, d1Day2}, 3},
				{"day shift", wardload.ProjectionFilter{WardID: &sw.ward.ID, ShiftID: &sw.day.ID}, []*wardload.Projection{d2Day, d1Day3, d1Day2}, 3},
				{"page", wardload.ProjectionFilter{WardID: &sw.ward.ID, Offset: 1, Limit: 2}, []*wardload.Projection{d1Night, d1Day3}, 4},
			} {
				t.Run(tc.name, func(t *testing.T) {
					got, total, err := f.store.FindProjections(f.ctx, tc.f)
					noErr(t, err)
					if total != tc.total || !reflect.DeepEqual(ids(got), ids(tc.want)) {
						t.Fatalf("got %v (total %d), want %v (total %d)", ids(got), total, ids(tc.want), tc.total)
					}
					for i, p := range got {
						if p.Counts[0].Patients+p.Counts[1].Patients+p.Counts[2].Patients != tc.want[i].TotalPatients {
							t.Fatalf("projection %d counts %+v, total %d", p.ID, p.Counts, tc.want[i].TotalPatients)
						}
					}
				})
			}
			_, total, err := f.store.FindProjections(f.ctx, wardload.ProjectionFilter{})
			noErr(t, err)
			if total != 5 {
				t.Fatalf("all projections = %d, want 5", total)
			}
		}},
		{"Projection/ShiftRevisions", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			d := date(2026, 3, 2)
			// Revision 1 has no projection; 2 and 3 have one. The night
			// shift, the next day and the other ward must not show.
			c1 := &wardload.Census{WardID: sw.ward.ID, Date: d, ShiftID: sw.day.ID, Counts: []wardload.TierCount{{TierID: sw.tiers[0].ID, Patients: 2}, {TierID: sw.tiers[2].ID, Patients: 1}}}
			noErr(t, f.store.CreateCensus(f.ctx, c1))
			save := func(sw *seededWard, d wardload.Date, sp *wardload.ShiftPattern, counts ...int) (*wardload.Census, *wardload.Projection) {
				t.Helper()
				f.clock.Advance(time.Minute)
				c, p := sw.projectionOf(d, sp, counts...)
				p.Recommended = 10 + len(counts) + counts[0]
				noErr(t, f.store.CreateCensusProjection(f.ctx, c, p))
				return c, p
			}
			c2, p2 := save(sw, d, sw.day, 5, 4)
			c3, p3 := save(sw, d, sw.day, 6, 1, 2)
			save(sw, d, sw.night, 7)
			save(sw, d.AddDays(1), sw.day, 8)
			save(other, d, other.day, 9)
			want := []wardload.ShiftRevision{
				{CensusID: c3.ID, Revision: 3, EnteredAt: c3.EnteredAt, TotalPatients: 9, ProjectionID: p3.ID, Recommended: 19},
				{CensusID: c2.ID, Revision: 2, EnteredAt: c2.EnteredAt, TotalPatients: 9, ProjectionID: p2.ID, Recommended: 17},
				{CensusID: c1.ID, Revision: 1, EnteredAt: c1.EnteredAt, TotalPatients: 3},
			}
			got, err := f.store.FindShiftRevisions(f.ctx, sw.ward.ID, d, sw.day.ID)
			noErr(t, err)
			if len(got) != len(want) {
				t.Fatalf("got %d revisions, want %d: %+v", len(got), len(want), got)
			}
			for i, g := range got {
				sameTime(t, "EnteredAt", g.EnteredAt, want[i].EnteredAt)
				g2 := *g
				g2.EnteredAt = want[i].EnteredAt
				if g2 != want[i] {
					t.Errorf("revision %d = %+v, want %+v", i, g2, want[i])
				}
			}
			for _, tc := range []struct {
				name        string
				ward, shift int64
				d           wardload.Date
			}{
				{"no census that day", sw.ward.ID, sw.day.ID, d.AddDays(2)},
				{"shift of another ward", sw.ward.ID, other.day.ID, d},
				{"unknown ward", 9999, sw.day.ID, d},
			} {
				got, err := f.store.FindShiftRevisions(f.ctx, tc.ward, tc.d, tc.shift)
				noErr(t, err)
				if len(got) != 0 {
					t.Errorf("%s: got %+v, want none", tc.name, got)
				}
			}
		}},
		{"Projection/Errors", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			d := date(2026, 3, 2)
			before := f.totalAudit()
			for _, tc := range []struct {
				name   string
				mutate func(c *wardload.Census, p *wardload.Projection)
				code   string
				field  string
			}{
				{"other date", func(c *wardload.Census, p *wardload.Projection) { p.Date = d.AddDays(1) }, wardload.EINVALID, "projection"},
				{"other shift", func(c *wardload.Census, p *wardload.Projection) { p.ShiftID = sw.night.ID }, wardload.EINVALID, "projection"},
				{"total differs", func(c *wardload.Census, p *wardload.Projection) { p.TotalPatients++ }, wardload.EINVALID, "projection"},
				{"no input", func(c *wardload.Census, p *wardload.Projection) { p.Input = "" }, wardload.EINVALID, "projection"},
				{"no window", func(c *wardload.Census, p *wardload.Projection) { p.End = p.Start }, wardload.EINVALID, "shift"},
				{"bad cover", func(c *wardload.Census, p *wardload.Projection) { p.CoverLevel = 1 }, wardload.EINVALID, "cover_level"},
				{"negative count", func(c *wardload.Census, p *wardload.Projection) {
					c.Counts[0].Patients = -1
					p.TotalPatients = c.Total()
				}, wardload.EINVALID, "patients"},
				{"unknown ward", func(c *wardload.Census, p *wardload.Projection) { c.WardID, p.WardID = 9999, 9999 }, wardload.ENOTFOUND, "ward"},
				{"shift of other ward", func(c *wardload.Census, p *wardload.Projection) { c.ShiftID, p.ShiftID = other.day.ID, other.day.ID }, wardload.ENOTFOUND, "shift"},
				{"tier of other ward", func(c *wardload.Census, p *wardload.Projection) { c.Counts[1].TierID = other.tiers[1].ID }, wardload.ENOTFOUND, "tier"},
			} {
				t.Run(tc.name, func(t *testing.T) {
					c, p := sw.projectionOf(d, sw.day, 2, 3)
					tc.mutate(c, p)
					c0, p0 := *c, *p
					wantErr(t, f.store.CreateCensusProjection(f.ctx, c, p), tc.code, tc.field)
					if !reflect.DeepEqual(*c, c0) || !reflect.DeepEqual(*p, p0) {
						t.Fatalf("failed create changed its arguments:\n%+v\n%+v", *c, *p)
					}
				})
			}
			// Nothing stored: no census, no projection, no audit row.
			if _, n, err := f.store.FindCensus(f.ctx, wardload.CensusFilter{}); err != nil || n != 0 {
				t.Fatalf("census entries after failures = %d (%v), want 0", n, err)
			}
			if _, n, err := f.store.FindProjections(f.ctx, wardload.ProjectionFilter{}); err != nil || n != 0 {
				t.Fatalf("projections after failures = %d (%v), want 0", n, err)
			}
			if got := f.totalAudit(); got != before {
				t.Fatalf("audit rows %d -> %d after failed creates", before, got)
			}
		}},
	}
}
