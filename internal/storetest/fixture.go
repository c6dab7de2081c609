package storetest

import (
	"time"

	"wardload/internal/wardload"
)

// seededWard is a ward with three tiers and two shifts, enough for every
// observation, census and settings case.
type seededWard struct {
	ward  *wardload.Ward
	tiers []*wardload.Tier // in creation order: t1, t2, t3
	day   *wardload.ShiftPattern
	night *wardload.ShiftPattern
}

// seedWard creates a ward with code, factor "dependency", tiers t1..t3
// (display orders 2, 1, 3 so that display order differs from creation
// order) and Night 19:30 / Day 07:30 shifts (created night first so that
// start order differs from creation order).
func (f *fixture) seedWard(code string) *seededWard {
	f.t.Helper()
	w := &wardload.Ward{Code: code, Name: "Ward " + code, TimeZone: "Europe/Dublin", FactorNames: []string{"dependency"}}
	noErr(f.t, f.store.CreateWard(f.ctx, w))
	sw := &seededWard{ward: w}
	for i, order := range []int{2, 1, 3} {
		tr := &wardload.Tier{WardID: w.ID, Code: []string{"t1", "t2", "t3"}[i], Label: "Tier " + []string{"1", "2", "3"}[i], DisplayOrder: order}
		noErr(f.t, f.store.CreateTier(f.ctx, tr))
		sw.tiers = append(sw.tiers, tr)
	}
	sw.night = &wardload.ShiftPattern{WardID: w.ID, Name: "Night", StartMinute: 19*60 + 30, NominalHours: 12}
	noErr(f.t, f.store.CreateShiftPattern(f.ctx, sw.night))
	sw.day = &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 7*60 + 30, NominalHours: 12}
	noErr(f.t, f.store.CreateShiftPattern(f.ctx, sw.day))
	return sw
}

// obs returns a valid observation of sw on date d, day shift, first tier.
func (sw *seededWard) obs(d wardload.Date, minutes float64) *wardload.Observation {
	return &wardload.Observation{
		WardID: sw.ward.ID, TierID: sw.tiers[0].ID, ShiftID: sw.day.ID, Date: d,
		WindowHours: 4, CareMinutes: minutes, EnteredBy: testActor.UserID,
	}
}

// date builds a wardload.Date.
func date(y, m, d int) wardload.Date { return wardload.Date{Year: y, Month: time.Month(m), Day: d} }
