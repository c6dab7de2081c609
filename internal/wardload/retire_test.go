package wardload

import (
	"testing"
	"time"
)

func TestParseWardBeds(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want int
		ok   bool
	}{
		{"", 0, true}, {" 24 ", 24, true}, {"1", 1, true}, {"1000", 1000, true},
		{"0", 0, false}, {"-3", 0, false}, {"1001", 0, false}, {"ten", 0, false}, {"2.5", 0, false},
		{"99999999999999999999", 0, false},
	} {
		got, err := ParseWardBeds(tc.in)
		if (err == nil) != tc.ok || (tc.ok && got != tc.want) {
			t.Errorf("ParseWardBeds(%q) = %d, %v; want %d, ok %v", tc.in, got, err, tc.want, tc.ok)
		}
		if err != nil && (ErrorCode(err) != EINVALID || ErrorField(err) != "beds") {
			t.Errorf("ParseWardBeds(%q) error = %v; want EINVALID naming beds", tc.in, err)
		}
	}
}

func TestRetireAtAndAction(t *testing.T) {
	then := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	now := then.Add(time.Hour)
	yes, no := true, false
	for _, tc := range []struct {
		name    string
		cur     time.Time
		retired *bool
		want    time.Time
		action  string
	}{
		{"unchanged active", time.Time{}, nil, time.Time{}, "shift.update"},
		{"retire", time.Time{}, &yes, now, "shift.retire"},
		{"retire again keeps the first time", then, &yes, then, "shift.update"},
		{"reinstate", then, &no, time.Time{}, "shift.reinstate"},
		{"reinstate active", time.Time{}, &no, time.Time{}, "shift.update"},
	} {
		p := &ShiftPattern{ID: 1, WardID: 1, Name: "Day", NominalHours: 12, RetiredAt: tc.cur}
		got, err := ShiftPatternUpdate{Retired: tc.retired}.Apply(p, now)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if !got.RetiredAt.Equal(tc.want) || RetireAction("shift", tc.cur, got.RetiredAt) != tc.action {
			t.Errorf("%s: RetiredAt %v action %s; want %v %s", tc.name, got.RetiredAt, RetireAction("shift", tc.cur, got.RetiredAt), tc.want, tc.action)
		}
		if !p.RetiredAt.Equal(tc.cur) {
			t.Errorf("%s: Apply changed its input", tc.name)
		}
	}
}

func TestCheckShiftRetireKeepsOneActive(t *testing.T) {
	day := &ShiftPattern{ID: 1}
	night := &ShiftPattern{ID: 2}
	if err := CheckShiftRetire([]*ShiftPattern{day, night}, 2); err != nil {
		t.Errorf("retiring one of two: %v", err)
	}
	day.RetiredAt = time.Unix(1, 0)
	if err := CheckShiftRetire([]*ShiftPattern{day, night}, 2); ErrorCode(err) != EINVALID || ErrorField(err) != "retired" {
		t.Errorf("retiring the last active = %v; want EINVALID naming retired", err)
	}
	if err := CheckTierRetire([]*Tier{{ID: 5}}, 5); ErrorCode(err) != EINVALID {
		t.Errorf("retiring the only tier = %v", err)
	}
}
