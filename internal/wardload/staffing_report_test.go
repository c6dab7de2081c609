package wardload

import "testing"

// Hand-worked (invented numbers): week 2026-W10 (Monday 2 March to Sunday
// 8 March) has three shifts with a recommendation, two recorded:
//
//	2 Mar Day   12 h  recommended 8, floor 6, planned 7, worked 5, care undone
//	3 Mar Night 12 h  recommended 6, floor 5, planned 6, worked 7
//	8 Mar Day   12 h  recommended 8, no floor, no plan, not recorded
//
// so: shifts 3, recorded 2, below the recommendation 1 (5 < 8), below the
// floor 1 (5 < 6), planned 2 of which 1 below (7 < 8), staff-hours short
// (8 − 5) × 12 = 36, over (7 − 6) × 12 = 12, care undone 1. A shift on 9
// March starts week W11, listed first; a shift without a recommendation
// counts nowhere.
func TestStaffingWeeks(t *testing.T) {
	n := func(v int) *int { return &v }
	weeks := StaffingWeeks([]StaffedShift{
		{Date: Date{2026, 3, 2}, Hours: 12, Recommended: n(8), Floor: n(6), Planned: n(7), Worked: n(5), CareUndone: true},
		{Date: Date{2026, 3, 3}, Hours: 12, Recommended: n(6), Floor: n(5), Planned: n(6), Worked: n(7)},
		{Date: Date{2026, 3, 8}, Hours: 12, Recommended: n(8)},
		{Date: Date{2026, 3, 9}, Hours: 8, Recommended: n(4), Worked: n(4)},
		{Date: Date{2026, 3, 5}, Hours: 12, Worked: n(1)},
	})
	if len(weeks) != 2 || weeks[0].Week != "2026-W11" || weeks[1].Week != "2026-W10" {
		t.Fatalf("weeks %+v", weeks)
	}
	want := StaffingWeek{Week: "2026-W10", From: Date{2026, 3, 2}, To: Date{2026, 3, 8}, Shifts: 3, Recorded: 2, BelowRec: 1, BelowFlr: 1,
		Planned: 2, PlanBelow: 1, HoursShort: 36, HoursOver: 12, CareUndone: 1}
	if weeks[1] != want {
		t.Errorf("W10 %+v\nwant %+v", weeks[1], want)
	}
	if w := weeks[0]; w.Shifts != 1 || w.Recorded != 1 || w.BelowRec != 0 || w.HoursShort != 0 || w.HoursOver != 0 || w.From != (Date{2026, 3, 9}) {
		t.Errorf("W11 %+v", w)
	}
}
