package wardload

import "slices"

// WardRefs is what the rows of one ward may refer to: its tiers, its shift
// patterns and the factor names it records. A store loads it inside the
// transaction of a change (returning WardNotFound for an unknown ward), and
// the checks below decide, once for every store, which references are
// refused and with which words.
type WardRefs struct {
	WardID  int64
	Tiers   []int64 // by DisplayOrder, then Code; retired ones included
	Shifts  []int64 // retired ones included
	Factors []string
	// Retired is true for a retired ward; RetiredTiers and RetiredShifts
	// are the retired ones of Tiers and Shifts. A new census names none
	// of them; older rows still do.
	Retired       bool
	RetiredTiers  []int64
	RetiredShifts []int64
}

// WardNotFound is the error for a change naming a ward that does not
// exist: ENOTFOUND naming the field "ward".
func WardNotFound() error {
	return FieldErrorf(ENOTFOUND, "ward", "Ward not found.")
}

// CountsFor returns the counts a store keeps of c: one per active tier of
// r, in r's order, a tier that c leaves out counted as 0. It returns
// ENOTFOUND naming "shift" or "tier" if c names a shift or tier not of
// this ward, and EINVALID naming "ward", "shift" or "tier" for a retired
// ward, a retired shift pattern or patients in a retired tier.
func (c *Census) CountsFor(r *WardRefs) ([]TierCount, error) {
	if r.Retired {
		return nil, errWardRetired()
	}
	if !slices.Contains(r.Shifts, c.ShiftID) {
		return nil, FieldErrorf(ENOTFOUND, "shift", "Shift not found for this ward.")
	}
	if slices.Contains(r.RetiredShifts, c.ShiftID) {
		return nil, errShiftRetired()
	}
	given := map[int64]int{}
	for _, tc := range c.Counts {
		if !slices.Contains(r.Tiers, tc.TierID) {
			return nil, FieldErrorf(ENOTFOUND, "tier", "Tier not found for this ward.")
		}
		if tc.Patients != 0 && slices.Contains(r.RetiredTiers, tc.TierID) {
			return nil, FieldErrorf(EINVALID, "tier", "An acuity tier in this census has been retired: count its patients in the ward's current tiers.")
		}
		given[tc.TierID] = tc.Patients
	}
	var counts []TierCount
	for _, id := range r.Tiers {
		if !slices.Contains(r.RetiredTiers, id) {
			counts = append(counts, TierCount{TierID: id, Patients: given[id]})
		}
	}
	return counts, nil
}

// CheckRefs returns ENOTFOUND naming "floors" if a ratio floor names a
// shift or tier that is not of this ward.
func (s *Settings) CheckRefs(r *WardRefs) error {
	for _, f := range s.Floors {
		if !slices.Contains(r.Shifts, f.ShiftID) {
			return FieldErrorf(ENOTFOUND, "floors", "A ratio floor names a shift that is not one of this ward's.")
		}
		if f.TierID != 0 && !slices.Contains(r.Tiers, f.TierID) {
			return FieldErrorf(ENOTFOUND, "floors", "A ratio floor names a tier that is not one of this ward's.")
		}
	}
	return nil
}
