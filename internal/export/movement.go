package export

import (
	"strconv"

	"wardload/internal/stats"
)

// Movement is what a row says of census movement during the shift. Counts
// are per shift; nurse-hours are care minutes ÷ 60 ÷ the direct-care
// fraction, as every nurse-hours column.
type Movement struct {
	Modelled bool // movement is in the band
	// ExpectedAdmissions and ExpectedDischarges are the posterior means of
	// the history's rates (nil when the rates are not used).
	ExpectedAdmissions, ExpectedDischarges *float64
	PlannedAdmissions, PlannedDischarges   *int
	// NurseHours is the mean care movement adds (negative: removes); nil
	// when not modelled or declined.
	NurseHours *float64
	// BandLow/HighWithout are the band with the census held fixed (nil
	// when not modelled or declined).
	BandLowWithout, BandHighWithout *float64
}

// newMovement reads a version 4 result's movement.
func newMovement(res *stats.Projection) *Movement {
	mv := res.Movement
	m := &Movement{Modelled: mv.Modelled, PlannedAdmissions: mv.PlannedAdmissions, PlannedDischarges: mv.PlannedDischarges}
	if mv.Admissions != nil && mv.Discharges != nil {
		a, d := mv.Admissions.Mean, mv.Discharges.Mean
		m.ExpectedAdmissions, m.ExpectedDischarges = &a, &d
	}
	nh := func(minutes float64) *float64 { v := minutes / 60 / res.DirectCareFraction; return &v }
	if mv.ExpectedMinutes.Defined {
		m.NurseHours = nh(mv.ExpectedMinutes.Value)
	}
	if len(mv.BandsWithout) > 0 {
		m.BandLowWithout, m.BandHighWithout = nh(mv.BandsWithout[0].Low), nh(mv.BandsWithout[0].High)
	}
	return m
}

// FormatCount writes an expected count per shift with two decimals.
func FormatCount(v float64) string { return strconv.FormatFloat(v, 'f', 2, 64) }

// movementCells are the movement columns, after the shortfall's: all null
// for a projection made before movement was modelled.
func (r *Row) movementCells() []cell {
	var m Movement
	modelled := ""
	if r.Movement != nil {
		m, modelled = *r.Movement, strconv.FormatBool(r.Movement.Modelled)
	}
	return []cell{
		number("movement_modelled", modelled),
		number("expected_admissions", optional(m.ExpectedAdmissions, FormatCount)),
		number("expected_discharges", optional(m.ExpectedDischarges, FormatCount)),
		number("planned_admissions", optional(m.PlannedAdmissions, strconv.Itoa)),
		number("planned_discharges", optional(m.PlannedDischarges, strconv.Itoa)),
		number("movement_nurse_hours", optional(m.NurseHours, FormatHours)),
		number("band_low_without_movement_nurse_hours", optional(m.BandLowWithout, FormatHours)),
		number("band_high_without_movement_nurse_hours", optional(m.BandHighWithout, FormatHours)),
	}
}
