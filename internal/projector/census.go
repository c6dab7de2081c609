package projector

import (
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// checkCounts validates the counts against the ward's tiers and beds and
// returns the census with every tier of the ward, in the tiers' order.
func checkCounts(wardID int64, date wardload.Date, shiftID int64, tiers []*wardload.Tier, counts []wardload.TierCount, staff wardload.StaffOnDuty, beds int) (*wardload.Census, error) {
	byID := map[int64]*wardload.Tier{}
	for _, t := range tiers {
		byID[t.ID] = t
	}
	given := map[int64]int{}
	for _, tc := range counts {
		t, ok := byID[tc.TierID]
		if !ok {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "tier", "A counted tier is not a tier of this ward.")
		}
		if _, dup := given[tc.TierID]; dup {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "tier", "%s is counted twice.", t.Label)
		}
		if tc.Patients < 0 || tc.Patients > stats.MaxPatients {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "tier_"+t.Code, "%s: the count must be a whole number from 0 to %d.", t.Label, stats.MaxPatients)
		}
		if beds > 0 && tc.Patients > beds {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "tier_"+t.Code, "%s: %d patients is more than the ward's %d beds.", t.Label, tc.Patients, beds)
		}
		given[tc.TierID] = tc.Patients
	}
	if err := staff.Check(beds); err != nil {
		return nil, err
	}
	c := &wardload.Census{WardID: wardID, Date: date, ShiftID: shiftID, Staff: staff}
	for _, t := range tiers {
		c.Counts = append(c.Counts, wardload.TierCount{TierID: t.ID, Patients: given[t.ID]})
	}
	if beds > 0 && c.Total() > beds {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "patients", "The census adds up to %d patients, more than the ward's %d beds.", c.Total(), beds)
	}
	if err := c.Validate(); err != nil {
		return nil, err
	}
	return c, nil
}

// floorSpec builds the model's ratio floor for shiftID with
// stats.FloorFor (the same reading the web layer uses) and appends the
// ward's floors for that shift to used. It returns nil when the shift has
// none.
func floorSpec(floors []wardload.RatioFloor, shiftID int64, tiers []*wardload.Tier, used *[]wardload.RatioFloor) *stats.FloorSpec {
	code := map[int64]string{}
	for _, t := range tiers {
		code[t.ID] = t.Code
	}
	for _, rf := range floors {
		if rf.ShiftID == shiftID {
			*used = append(*used, rf)
		}
	}
	return stats.FloorFor(floors, shiftID, code)
}
