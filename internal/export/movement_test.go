package export

import (
	"strings"
	"testing"

	"wardload/internal/stats"
)

// The movement columns of a version 4 result: counts with two decimals,
// nurse-hours = minutes ÷ 60 ÷ the direct-care fraction (by hand: 120
// minutes at 0.8 is 2.50 nurse-hours; the band 480–960 minutes is
// 10.00–20.00), and all null before version 4.
func TestMovementCells(t *testing.T) {
	two := 2
	res := &stats.Projection{DirectCareFraction: 0.8, Movement: &stats.Movement{
		Modelled: true, FromRates: true, PlannedAdmissions: &two,
		Admissions:      &stats.MovementRate{Mean: 1.25},
		Discharges:      &stats.MovementRate{Mean: 0.5},
		ExpectedMinutes: stats.Defined(120),
		BandsWithout:    []stats.Band{{Level: 0.9, Low: 480, High: 960}},
	}}
	r := Row{Movement: newMovement(res)}
	got := cellText(r.movementCells())
	want := "movement_modelled=true expected_admissions=1.25 expected_discharges=0.50 planned_admissions=2 planned_discharges= " +
		"movement_nurse_hours=2.50 band_low_without_movement_nurse_hours=10.00 band_high_without_movement_nurse_hours=20.00"
	if got != want {
		t.Errorf("cells\n got %s\nwant %s", got, want)
	}
	for _, c := range (&Row{}).movementCells() {
		if c.csv != "" || c.json != nil {
			t.Errorf("before version 4: %s = %q", c.name, c.csv)
		}
	}
}

func cellText(cs []cell) string {
	var parts []string
	for _, c := range cs {
		parts = append(parts, c.name+"="+c.csv)
	}
	return strings.Join(parts, " ")
}
