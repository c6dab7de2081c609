package projector_test

import (
	"context"
	"encoding/json"
	"fmt"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"wardload/internal/projector"
	"wardload/internal/sqlite"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// now is the fixed clock of these tests: 20 March 2026, 10:00 UTC.
var now = time.Date(2026, 3, 20, 10, 0, 0, 0, time.UTC)

var ctx = wardload.WithActor(context.Background(), wardload.Actor{UserID: 7, Name: "c.nurse"})

// MustOpen returns a migrated SQLite store in t.TempDir() with the fixed clock.
func MustOpen(tb testing.TB) *sqlite.Store {
	tb.Helper()
	s, err := sqlite.Open(context.Background(), sqlite.Config{Path: filepath.Join(tb.TempDir(), "wardload.db"), Now: func() time.Time { return now }})
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { s.Close() })
	if err := s.Migrate(context.Background()); err != nil {
		tb.Fatal(err)
	}
	return s
}

func must(tb testing.TB, err error) {
	tb.Helper()
	if err != nil {
		tb.Fatal(err)
	}
}

func day(s string) wardload.Date {
	d, err := wardload.ParseDate(s)
	if err != nil {
		panic(err)
	}
	return d
}

// handWard is the hand-checkable case of internal/stats TestProjectHand
// as store content: an 8-hour "Early" shift in UTC, tiers a, b, c, direct
// care 0.5, cover 0.9, a one-week lookback and a floor of 4 patients per
// nurse with the nurse in charge not counting. The lookback holds a 10,
// 20, 30; b 50, 70; c 5 (8-hour windows). Around them are observations the
// projection must not use: one excluded, one a day before the lookback,
// one on the shift's own date, one of another shift.
type handWard struct {
	st           *sqlite.Store
	ward         *wardload.Ward
	a, b, c      *wardload.Tier
	early, late  *wardload.ShiftPattern
	shiftDate    wardload.Date
	excludedObs  int64
	settingsSave *wardload.Settings
}

func seedHand(t *testing.T) *handWard {
	t.Helper()
	st := MustOpen(t)
	h := &handWard{st: st, shiftDate: day("2026-03-20")}
	h.ward = &wardload.Ward{Code: "hand", Name: "Hand case", TimeZone: "UTC"}
	must(t, st.CreateWard(ctx, h.ward))
	for i, p := range []**wardload.Tier{&h.a, &h.b, &h.c} {
		code := []string{"a", "b", "c"}[i]
		*p = &wardload.Tier{WardID: h.ward.ID, Code: code, Label: "Tier " + strings.ToUpper(code), DisplayOrder: i + 1}
		must(t, st.CreateTier(ctx, *p))
	}
	h.early = &wardload.ShiftPattern{WardID: h.ward.ID, Name: "Early", StartMinute: 7 * 60, NominalHours: 8}
	must(t, st.CreateShiftPattern(ctx, h.early))
	h.late = &wardload.ShiftPattern{WardID: h.ward.ID, Name: "Late", StartMinute: 15 * 60, NominalHours: 8}
	must(t, st.CreateShiftPattern(ctx, h.late))
	h.settingsSave = &wardload.Settings{WardID: h.ward.ID, DirectCareFraction: 0.5, CoverLevel: 0.9, LookbackWeeks: 1,
		Quartiles: wardload.QuartilesHinges, Floors: []wardload.RatioFloor{{ShiftID: h.early.ID, PatientsPerNurse: 4}}}
	must(t, st.SaveSettings(ctx, h.settingsSave))
	o := func(tier *wardload.Tier, shift *wardload.ShiftPattern, date string, minutes float64) *wardload.Observation {
		return &wardload.Observation{WardID: h.ward.ID, TierID: tier.ID, ShiftID: shift.ID, Date: day(date), WindowHours: 8, CareMinutes: minutes}
	}
	obs := []*wardload.Observation{
		o(h.a, h.early, "2026-03-13", 10), o(h.a, h.early, "2026-03-16", 20), o(h.a, h.early, "2026-03-19", 30),
		o(h.b, h.early, "2026-03-14", 50), o(h.b, h.early, "2026-03-18", 70),
		o(h.c, h.early, "2026-03-15", 5),
		o(h.a, h.early, "2026-03-17", 500), // excluded below
		o(h.a, h.early, "2026-03-12", 900), // a day before the lookback
		o(h.b, h.early, "2026-03-20", 900), // the shift's own date
		o(h.a, h.late, "2026-03-16", 900),  // another shift
	}
	_, err := st.CreateObservations(ctx, obs)
	must(t, err)
	h.excludedObs = obs[6].ID
	_, err = st.ExcludeObservation(ctx, h.excludedObs, "typed 500 for 50", 7)
	must(t, err)
	return h
}

func (h *handWard) service() *projector.Service {
	return &projector.Service{Store: h.st, Now: func() time.Time { return now }}
}

func (h *handWard) counts(a, b, c int) []wardload.TierCount {
	return []wardload.TierCount{{TierID: h.a.ID, Patients: a}, {TierID: h.b.ID, Patients: b}, {TierID: h.c.ID, Patients: c}}
}

func decodeInput(t *testing.T, p *wardload.Projection) projector.Input {
	t.Helper()
	var in projector.Input
	must(t, json.Unmarshal([]byte(p.Input), &in))
	return in
}

// The hand ward's tiers hold 3, 2 and 1 observations, fewer than
// stats.MinTierObservations, so version 2 declines: the recommendation is
// the floor, ceil(5/4) + 1 = 3, and no care-time figure is stored.
// Version 1 on the same stored input still gives the hand figures (as
// internal/stats TestProjectHand): μ = 220 minutes, expected nurse-hours
// 220 / 60 / 0.5 = 7.3333, and the band at two-sided level 0.9 from R
// 4.2.2 Patched (2022-11-10 r83330), Debian r-base-core:
// sprintf("%.17g", (220 + c(-1, 1)*qnorm(0.95)*sqrt(800 + 3100/3))/60/0.5)
// = 4.9857191782163852, 9.6809474884502809 (minutes there, ×60×0.5 here).
func TestPrepareHand(t *testing.T) {
	h := seedHand(t)
	c, p, err := h.service().Prepare(ctx, h.ward.ID, h.shiftDate, h.early.ID, h.counts(2, 3, 0))
	must(t, err)
	near := func(name string, got, want float64) {
		t.Helper()
		if !scalar.EqualWithinAbsOrRel(got, want, 1e-12, 1e-12) {
			t.Errorf("%s = %.17g, want %.17g", name, got, want)
		}
	}
	if p.Floor == nil || *p.Floor != 3 || p.Recommended != 3 || p.DecidedBy != stats.DecidedByInsufficient ||
		p.NursesCover != 0 || p.ExpectedNurseHours != 0 || p.CoverNurseHours != 0 {
		t.Errorf("floor %v, recommended %d by %s, cover %d, nurse-hours %g; want the floor 3 by insufficient_data and no care-time figure",
			p.Floor, p.Recommended, p.DecidedBy, p.NursesCover, p.ExpectedNurseHours)
	}
	v1, err := stats.ProjectV1(decodeInput(t, p).Model)
	must(t, err)
	near("version 1 expected nurse-hours", v1.NurseHours.Expected, 220.0/60/0.5)
	near("version 1 band low", v1.Bands[0].Low/60/0.5, 4.9857191782163852)
	near("version 1 band high", v1.Bands[0].High/60/0.5, 9.6809474884502809)
	if p.ShiftHours != 8 || p.ShiftName != "Early" || !p.Start.Equal(time.Date(2026, 3, 20, 7, 0, 0, 0, time.UTC)) ||
		!p.End.Equal(time.Date(2026, 3, 20, 15, 0, 0, 0, time.UTC)) {
		t.Errorf("shift %s %g h %v–%v", p.ShiftName, p.ShiftHours, p.Start, p.End)
	}
	if p.TotalPatients != 5 || c.Total() != 5 || p.CoverLevel != 0.9 || p.CreatedBy != 7 || c.EnteredBy != 7 {
		t.Errorf("total %d/%d cover %g by %d/%d", p.TotalPatients, c.Total(), p.CoverLevel, p.CreatedBy, c.EnteredBy)
	}
	if p.MethodVersion != stats.MethodVersion || p.Draws != projector.DefaultDraws || p.Seed != projector.Seed(h.ward.ID, h.shiftDate, h.early.ID) {
		t.Errorf("method %s draws %d seed %d", p.MethodVersion, p.Draws, p.Seed)
	}
	// Only the six observations in the lookback, of this shift, included, were used.
	in := decodeInput(t, p)
	want := [][]float64{{10, 20, 30}, {50, 70}, {5}}
	for k, tier := range in.Model.Tiers {
		if !slices.Equal(tier.CareMinutes, want[k]) || in.Tiers[k].Observations != len(want[k]) {
			t.Errorf("tier %s used %v, want %v", tier.Code, tier.CareMinutes, want[k])
		}
	}
	if s := in.Settings; s.LookbackFrom != "2026-03-13" || s.LookbackTo != "2026-03-19" || s.Quartiles != "hinges" || len(s.Floors) != 1 {
		t.Errorf("input settings = %+v", s)
	}
	if in.Model.Levels[0] != 0.9 || in.Model.Floor == nil || in.Model.Floor.PatientsPerNurse != 4 || in.Model.Floor.ChargeNurseCounts {
		t.Errorf("model input = %+v floor %+v", in.Model, in.Model.Floor)
	}
	var res struct { // stats.Number has no UnmarshalJSON, so not stats.Projection
		Caution string           `json:"caution"`
		Floor   *stats.FloorUsed `json:"floor_used"`
	}
	must(t, json.Unmarshal([]byte(p.Result), &res))
	if res.Caution != stats.Caution || res.Floor == nil || !strings.Contains(res.Floor.Description, "4 patients per nurse") {
		t.Errorf("result lacks the caution or the floor used: %+v", res.Floor)
	}
}

// addObservations gives each of tiers a, b and c n more observations of
// the Early shift in the lookback, so version 2 has enough to project.
// Invented values, for properties only.
func (h *handWard) addObservations(t *testing.T, n int) {
	t.Helper()
	var obs []*wardload.Observation
	for k, tier := range []*wardload.Tier{h.a, h.b, h.c} {
		for i := range n {
			obs = append(obs, &wardload.Observation{WardID: h.ward.ID, TierID: tier.ID, ShiftID: h.early.ID,
				Date: h.shiftDate.AddDays(-1 - i%7), WindowHours: 8, CareMinutes: float64(10*(k+1) + 7*(i%5) + i%3)})
		}
	}
	_, err := h.st.CreateObservations(ctx, obs)
	must(t, err)
}

func TestSaveAndRecompute(t *testing.T) {
	h := seedHand(t)
	h.addObservations(t, 12)
	s := h.service()
	c1, p1, err := s.Save(ctx, h.ward.ID, h.shiftDate, h.early.ID, h.counts(2, 3, 0), wardload.StaffOnDuty{Nurses: new(3)}, wardload.PlannedMovement{Admissions: new(2)})
	must(t, err)
	if c1.Revision != 1 || p1.CensusRevision != 1 || p1.ID == 0 {
		t.Fatalf("first save: census rev %d, projection %d rev %d", c1.Revision, p1.ID, p1.CensusRevision)
	}
	if sc, err := h.st.FindCensusByID(ctx, c1.ID); err != nil || sc.Staff.Nurses == nil || *sc.Staff.Nurses != 3 || sc.Staff.Support != nil ||
		sc.Planned.Admissions == nil || *sc.Planned.Admissions != 2 || sc.Planned.Discharges != nil {
		t.Fatalf("staff on duty and planned movement stored with the census: %+v, %v", sc, err)
	}
	stored, err := h.st.FindProjectionByID(ctx, p1.ID)
	must(t, err)
	for name, p := range map[string]*wardload.Projection{"returned": p1, "stored": stored} {
		got, err := projector.Recompute(p)
		must(t, err)
		b, err := json.Marshal(got)
		must(t, err)
		if string(b) != p.Result {
			t.Errorf("%s: recomputed result differs from the stored one:\n%s\n%s", name, b, p.Result)
		}
	}
	// A correction is a new revision with its own projection; the first is kept.
	_, p2, err := s.Save(ctx, h.ward.ID, h.shiftDate, h.early.ID, h.counts(2, 4, 0), wardload.StaffOnDuty{}, wardload.PlannedMovement{})
	must(t, err)
	if p2.CensusRevision != 2 || p2.ExpectedNurseHours <= p1.ExpectedNurseHours || p2.Seed != p1.Seed {
		t.Errorf("correction: rev %d, nurse-hours %g after %g, seed %d vs %d", p2.CensusRevision, p2.ExpectedNurseHours, p1.ExpectedNurseHours, p2.Seed, p1.Seed)
	}
	all, n, err := h.st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &h.ward.ID})
	must(t, err)
	if n != 2 || all[0].ID != p2.ID || all[1].ID != p1.ID {
		t.Errorf("history = %d projections, want revision 2 then 1", n)
	}
	// A projection stored under version 2 recomputes as version 2, not 3.
	var in projector.Input
	must(t, json.Unmarshal([]byte(stored.Input), &in))
	v2, err := stats.ProjectV2(in.Model)
	must(t, err)
	b2, err := json.Marshal(v2)
	must(t, err)
	asV2 := *stored
	asV2.MethodVersion, asV2.Result = stats.MethodVersionV2, string(b2)
	if string(b2) == stored.Result {
		t.Fatal("version 2 and 3 gave the same result here; the check below would prove nothing")
	}
	got, err := projector.Recompute(&asV2)
	must(t, err)
	if b, _ := json.Marshal(got); string(b) != asV2.Result {
		t.Errorf("version 2 recomputed differs:\n%s\n%s", b, asV2.Result)
	}
	// A projection of another method version cannot be reproduced here.
	old := *stored
	old.MethodVersion = "wardload-model/0"
	if _, err := projector.Recompute(&old); wardload.ErrorField(err) != "method_version" {
		t.Errorf("old method: %v", err)
	}
}

func TestPrepareErrors(t *testing.T) {
	h := seedHand(t)
	other := &wardload.Ward{Code: "other", Name: "Other", TimeZone: "UTC"}
	must(t, h.st.CreateWard(ctx, other))
	otherShift := &wardload.ShiftPattern{WardID: other.ID, Name: "Early", StartMinute: 420, NominalHours: 8}
	must(t, h.st.CreateShiftPattern(ctx, otherShift))
	otherTier := &wardload.Tier{WardID: other.ID, Code: "a", Label: "A"}
	must(t, h.st.CreateTier(ctx, otherTier))
	d := &wardload.Tier{WardID: h.ward.ID, Code: "d", Label: "Tier D", DisplayOrder: 4}
	must(t, h.st.CreateTier(ctx, d))
	beds := *h.settingsSave
	beds.Beds = 6
	must(t, h.st.SaveSettings(ctx, &beds))
	auditBefore := countAudit(t, h.st)

	for _, tc := range []struct {
		name   string
		ward   int64
		date   string
		shift  int64
		counts []wardload.TierCount
		code   string
		field  string
		msg    string // part of the message
		staff  wardload.StaffOnDuty
		plan   wardload.PlannedMovement
	}{
		{"unknown ward", 9999, "2026-03-20", h.early.ID, nil, wardload.ENOTFOUND, "", "", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"unknown shift", h.ward.ID, "2026-03-20", 9999, nil, wardload.EINVALID, "shift", "no such shift", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"shift of other ward", h.ward.ID, "2026-03-20", otherShift.ID, nil, wardload.EINVALID, "shift", "no such shift", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"three days ahead", h.ward.ID, "2026-03-23", h.early.ID, nil, wardload.EINVALID, "date", "too far from today", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"fifteen days back", h.ward.ID, "2026-03-05", h.early.ID, nil, wardload.EINVALID, "date", "14 days back", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"tier above beds", h.ward.ID, "2026-03-20", h.early.ID, h.counts(7, 0, 0), wardload.EINVALID, "tier_a", "6 beds", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"total above beds", h.ward.ID, "2026-03-20", h.early.ID, h.counts(4, 3, 0), wardload.EINVALID, "patients", "7 patients, more than the ward's 6 beds", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"negative", h.ward.ID, "2026-03-20", h.early.ID, h.counts(-1, 0, 0), wardload.EINVALID, "tier_a", "Tier A", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"tier of other ward", h.ward.ID, "2026-03-20", h.early.ID, []wardload.TierCount{{TierID: otherTier.ID, Patients: 1}}, wardload.EINVALID, "tier", "", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		{"tier twice", h.ward.ID, "2026-03-20", h.early.ID, []wardload.TierCount{{TierID: h.a.ID, Patients: 1}, {TierID: h.a.ID, Patients: 1}}, wardload.EINVALID, "tier", "twice", wardload.StaffOnDuty{}, wardload.PlannedMovement{}},
		// Staff on duty: at most twice the 6 beds (wardload.MaxStaff).
		{"nurses negative", h.ward.ID, "2026-03-20", h.early.ID, h.counts(1, 0, 0), wardload.EINVALID, "nurses_on_duty", "cannot be negative", wardload.StaffOnDuty{Nurses: new(-1)}, wardload.PlannedMovement{}},
		{"nurses above twice the beds", h.ward.ID, "2026-03-20", h.early.ID, h.counts(1, 0, 0), wardload.EINVALID, "nurses_on_duty", "twice the ward's 6 beds", wardload.StaffOnDuty{Nurses: new(13)}, wardload.PlannedMovement{}},
		{"support above twice the beds", h.ward.ID, "2026-03-20", h.early.ID, h.counts(1, 0, 0), wardload.EINVALID, "support_on_duty", "twice", wardload.StaffOnDuty{Nurses: new(12), Support: new(13)}, wardload.PlannedMovement{}},
		// Planned movement: admissions at most the 6 beds, discharges at
		// most the census.
		{"planned admissions above beds", h.ward.ID, "2026-03-20", h.early.ID, h.counts(1, 0, 0), wardload.EINVALID, "planned_admissions", "6 beds", wardload.StaffOnDuty{}, wardload.PlannedMovement{Admissions: new(7)}},
		{"planned admissions negative", h.ward.ID, "2026-03-20", h.early.ID, h.counts(1, 0, 0), wardload.EINVALID, "planned_admissions", "cannot be negative", wardload.StaffOnDuty{}, wardload.PlannedMovement{Admissions: new(-1)}},
		{"planned discharges above census", h.ward.ID, "2026-03-20", h.early.ID, h.counts(1, 0, 0), wardload.EINVALID, "planned_discharges", "1 patients", wardload.StaffOnDuty{}, wardload.PlannedMovement{Discharges: new(2)}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var date wardload.Date
			if tc.date != "" {
				date = day(tc.date)
			}
			c, p, err := h.service().Save(ctx, tc.ward, date, tc.shift, tc.counts, tc.staff, tc.plan)
			if c != nil || p != nil || wardload.ErrorCode(err) != tc.code || wardload.ErrorField(err) != tc.field {
				t.Fatalf("got %v, want %s field %q", err, tc.code, tc.field)
			}
			if !strings.Contains(wardload.ErrorMessage(err), tc.msg) {
				t.Errorf("message %q lacks %q", wardload.ErrorMessage(err), tc.msg)
			}
		})
	}
	if _, n, _ := h.st.FindCensus(ctx, wardload.CensusFilter{}); n != 0 {
		t.Errorf("%d census entries stored by failed saves", n)
	}
	if _, n, _ := h.st.FindProjections(ctx, wardload.ProjectionFilter{}); n != 0 {
		t.Errorf("%d projections stored by failed saves", n)
	}
	if got := countAudit(t, h.st); got != auditBefore {
		t.Errorf("audit rows %d -> %d", auditBefore, got)
	}
}

// A tier with patients and too few observations (none, or one) is not an
// error any more: the projection declines and says how many are missing.
func TestPrepareDeclines(t *testing.T) {
	h := seedHand(t)
	d := &wardload.Tier{WardID: h.ward.ID, Code: "d", Label: "Tier D", DisplayOrder: 4}
	must(t, h.st.CreateTier(ctx, d))
	for _, tc := range []struct {
		counts []wardload.TierCount
		msg    string
	}{
		{[]wardload.TierCount{{TierID: d.ID, Patients: 1}}, fmt.Sprintf("tier d: 0 usable, need about %d more", stats.MinTierObservations)},
		{[]wardload.TierCount{{TierID: h.c.ID, Patients: 1}}, fmt.Sprintf("tier c: 1 usable, need about %d more", stats.MinTierObservations-1)},
	} {
		_, p, err := h.service().Prepare(ctx, h.ward.ID, h.shiftDate, h.early.ID, tc.counts)
		must(t, err)
		if p.DecidedBy != stats.DecidedByInsufficient || p.Recommended != 2 || !strings.Contains(p.Result, tc.msg) {
			t.Errorf("%v: decided by %s, recommended %d; result lacks %q", tc.counts, p.DecidedBy, p.Recommended, tc.msg)
		}
	}
}

// The window's edges are inside it: 14 days back and 2 days ahead. An
// empty census needs no observations, so only the date can fail.
func TestDateWindowEdges(t *testing.T) {
	h := seedHand(t)
	for _, d := range []string{"2026-03-06", "2026-03-22"} {
		_, p, err := h.service().Prepare(ctx, h.ward.ID, day(d), h.early.ID, nil)
		if err != nil {
			t.Fatalf("%s: %v", d, err)
		}
		// No patients: the floor is the nurse in charge alone.
		if p.TotalPatients != 0 || p.ExpectedNurseHours != 0 || p.Recommended != 1 {
			t.Errorf("%s: empty census gave %+v", d, p)
		}
	}
	// "Today" is the ward's: at 23:30 UTC on 20 March it is already the
	// 21st in Auckland, so 23 March is two days ahead there.
	akl := &wardload.Ward{Code: "akl", Name: "Auckland", TimeZone: "Pacific/Auckland"}
	must(t, h.st.CreateWard(ctx, akl))
	sp := &wardload.ShiftPattern{WardID: akl.ID, Name: "Day", StartMinute: 420, NominalHours: 12}
	must(t, h.st.CreateShiftPattern(ctx, sp))
	late := &projector.Service{Store: h.st, Now: func() time.Time { return time.Date(2026, 3, 20, 23, 30, 0, 0, time.UTC) }}
	if _, _, err := late.Prepare(ctx, akl.ID, day("2026-03-23"), sp.ID, nil); err != nil {
		t.Errorf("two days ahead in Auckland: %v", err)
	}
	if _, _, err := late.Prepare(ctx, h.ward.ID, day("2026-03-23"), h.early.ID, nil); wardload.ErrorField(err) != "date" {
		t.Errorf("three days ahead in UTC: %v", err)
	}
}

func countAudit(t *testing.T, st wardload.Store) int {
	t.Helper()
	_, n, err := st.FindAudit(ctx, wardload.AuditFilter{})
	must(t, err)
	return n
}
