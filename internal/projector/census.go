package projector

import (
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// checkCounts validates the counts against the ward's tiers and beds and
// returns the census with every tier of the ward, in the tiers' order.
func checkCounts(wardID int64, date wardload.Date, shiftID int64, tiers []*wardload.Tier, counts []wardload.TierCount, beds int) (*wardload.Census, error) {
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
	c := &wardload.Census{WardID: wardID, Date: date, ShiftID: shiftID}
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

// floorSpec builds the model's ratio floor from the ward's floors for
// shiftID, and appends those floors to used. It returns nil when the shift
// has none.
func floorSpec(floors []wardload.RatioFloor, shiftID int64, tiers []*wardload.Tier, used *[]wardload.RatioFloor) *stats.FloorSpec {
	code := map[int64]string{}
	for _, t := range tiers {
		code[t.ID] = t.Code
	}
	var f *stats.FloorSpec
	for _, rf := range floors {
		if rf.ShiftID != shiftID {
			continue
		}
		*used = append(*used, rf)
		if f == nil {
			f = &stats.FloorSpec{ChargeNurseCounts: true}
		}
		// Counting the nurse in charge is the less cautious choice, so
		// it needs every floor of the shift to agree.
		f.ChargeNurseCounts = f.ChargeNurseCounts && rf.ChargeNurseCounts
		if rf.TierID == 0 {
			f.PatientsPerNurse = rf.PatientsPerNurse
			continue
		}
		if f.TierPatientsPerNurse == nil {
			f.TierPatientsPerNurse = map[string]float64{}
		}
		f.TierPatientsPerNurse[code[rf.TierID]] = rf.PatientsPerNurse
	}
	return f
}
