package wardload_test

import (
	"testing"
	"time"

	"wardload/internal/wardload"
)

// TestStaffBounds checks the plausibility bound of staff counts: twice the
// beds, at most 200, 200 when beds are not set (issue 11 "Bad input";
// common practice, no source).
func TestStaffBounds(t *testing.T) {
	for _, tc := range []struct {
		beds, n int
		field   string // "" when accepted
	}{
		{30, 60, ""}, {30, 61, "nurses_on_duty"}, {0, 200, ""}, {0, 201, "nurses_on_duty"},
		{150, 200, ""}, {150, 201, "nurses_on_duty"}, {4, 8, ""}, {4, 9, "nurses_on_duty"},
		{30, 0, ""}, {30, -1, "nurses_on_duty"},
	} {
		err := wardload.StaffOnDuty{Nurses: new(tc.n)}.Check(tc.beds)
		if wardload.ErrorField(err) != tc.field || (tc.field != "" && wardload.ErrorCode(err) != wardload.EINVALID) {
			t.Errorf("%d nurses, %d beds: %v, want field %q", tc.n, tc.beds, err, tc.field)
		}
	}
	if err := (wardload.StaffOnDuty{Support: new(-1)}).Check(10); wardload.ErrorField(err) != "support_on_duty" {
		t.Errorf("negative support: %v", err)
	}
	if err := (wardload.StaffOnDuty{}).Check(10); err != nil {
		t.Errorf("nothing entered: %v", err)
	}
}

// TestShiftRecordCheckShift: the record waits for the dated shift's real
// end in the ward's zone, across the spring change too (London, 29 March
// 2026: a 19:30 night of 12 nominal hours ends 07:30 BST = 06:30 UTC).
func TestShiftRecordCheckShift(t *testing.T) {
	w := &wardload.Ward{ID: 1, Code: "w", Name: "W", TimeZone: "Europe/London"}
	night := &wardload.ShiftPattern{ID: 2, WardID: 1, Name: "Night", StartMinute: 19*60 + 30, NominalHours: 12}
	r := &wardload.ShiftRecord{WardID: 1, ShiftID: 2, Date: wardload.Date{Year: 2026, Month: time.March, Day: 28}}
	end := time.Date(2026, 3, 29, 6, 30, 0, 0, time.UTC)
	if err := r.CheckShift(w, night, end.Add(-time.Second)); wardload.ErrorField(err) != "shift" || wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("a second before the end: %v", err)
	}
	if err := r.CheckShift(w, night, end); err != nil {
		t.Errorf("at the end: %v", err)
	}
	other := *night
	other.WardID = 9
	if err := r.CheckShift(w, &other, end); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("another ward's shift: %v", err)
	}
	if err := r.CheckShift(w, nil, end); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("no shift: %v", err)
	}
}
