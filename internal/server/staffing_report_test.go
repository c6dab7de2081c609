package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"wardload/internal/projector"
	"wardload/internal/wardload"
)

// Two Day shifts of ward A projected and recorded (census fixture: floor
// on Day of 5 patients per nurse, plus the nurse in charge): on 26
// February the nurses who worked are one below the floor, on 27 February
// the recommendation plus two. The week row (2026-W09) must say 2
// shifts, 2 recorded, 1 below the recommendation, 1 below the floor, the
// plan below the recommendation once, staff-hours short (rec − worked) ×
// 12 and over 2 × 12, worked out here from the stored projections.
func TestStaffingReport(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	svc := &projector.Service{Store: f.st, Now: f.clock.Now, Draws: 2000}
	day := f.a.day
	n := func(v int) *int { return &v }
	var recs, floors [2]int
	for i, d := range []wardload.Date{{Year: 2026, Month: 2, Day: 26}, {Year: 2026, Month: 2, Day: 27}} {
		counts := []wardload.TierCount{{TierID: f.a.tiers[0].ID, Patients: 8}, {TierID: f.a.tiers[1].ID, Patients: 6}, {TierID: f.a.tiers[2].ID, Patients: 3}}
		_, p, err := svc.Save(ctx, f.wardA.ID, d, day.ID, counts, wardload.StaffOnDuty{}, wardload.PlannedMovement{})
		if err != nil {
			t.Fatal(err)
		}
		recs[i], floors[i] = p.Recommended, *p.Floor
		worked := floors[i] - 1
		if i == 1 {
			worked = recs[i] + 2
		}
		if err := f.st.CreateShiftRecord(ctx, &wardload.ShiftRecord{WardID: f.wardA.ID, Date: d, ShiftID: day.ID, Worked: wardload.StaffOnDuty{Nurses: n(worked)}}); err != nil {
			t.Fatal(err)
		}
		if _, err := f.st.SetPlannedStaff(ctx, &wardload.PlannedStaff{WardID: f.wardA.ID, Date: d, ShiftID: day.ID, Nurses: recs[i] - 1 + i}); err != nil {
			t.Fatal(err)
		}
	}
	res, body := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/staffing-report", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	if rows := byTestID(t, body, "staffing-report-week"); len(rows) != 1 {
		t.Fatalf("%d week rows, want 1", len(rows))
	}
	short := float64(recs[0]-(floors[0]-1)) * 12
	want := []string{"2026-W09", "2", "2", "1", "1", "2", "1", fmt.Sprintf("%.1f", short), "24.0", "0"}
	if got := byTestID(t, body, "staffing-report-cell"); !slices.Equal(got, want) {
		t.Errorf("week cells %q, want %q", got, want)
	}
	below := byTestID(t, body, "staffing-report-below")
	if len(below) != 1 || !strings.Contains(below[0], fmt.Sprintf("2026-02-26 Day: worked %d, floor %d", floors[0]-1, floors[0])) {
		t.Errorf("below the floor %q", below)
	}
	if floorsText := byTestID(t, body, "staffing-report-floors"); len(floorsText) != 1 || !strings.Contains(floorsText[0], fmt.Sprintf("Day: %d nurses", floors[0])) {
		t.Errorf("floors %q", floorsText)
	}
	if len(byTestID(t, body, "caution")) != 1 {
		t.Error("no standing caution")
	}
	_, list := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/projections", nil)))
	if got := byTestIDAttr(t, list, "staffing-report-link"); got != "/wards/w-a/staffing-report" {
		t.Errorf("shift list links to %q", got)
	}
	if res, _ := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/staffing-report?weeks=0", nil))); res.StatusCode == 200 {
		t.Error("weeks=0 accepted")
	}
}
