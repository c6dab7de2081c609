package wardload

import "slices"

// WardRefs is what the rows of one ward may refer to: its tiers, its shift
// patterns and the factor names it records. A store loads it inside the
// transaction of a change (returning WardNotFound for an unknown ward), and
// the checks below decide, once for every store, which references are
// refused and with which words.
type WardRefs struct {
	WardID  int64
	Tiers   []int64 // by DisplayOrder, then Code
	Shifts  []int64
	Factors []string
}

// WardNotFound is the error for a change naming a ward that does not
// exist: ENOTFOUND naming the field "ward".
func WardNotFound() error {
	return FieldErrorf(ENOTFOUND, "ward", "Ward not found.")
}

// CountsFor returns the counts a store keeps of c: one per tier of r, in
// r's order, a tier that c leaves out counted as 0. It returns ENOTFOUND
// naming "shift" or "tier" if c names a shift or tier not of this ward.
func (c *Census) CountsFor(r *WardRefs) ([]TierCount, error) {
	if !slices.Contains(r.Shifts, c.ShiftID) {
		return nil, FieldErrorf(ENOTFOUND, "shift", "Shift not found for this ward.")
	}
	given := map[int64]int{}
	for _, tc := range c.Counts {
		if !slices.Contains(r.Tiers, tc.TierID) {
			return nil, FieldErrorf(ENOTFOUND, "tier", "Tier not found for this ward.")
		}
		given[tc.TierID] = tc.Patients
	}
	counts := make([]TierCount, len(r.Tiers))
	for i, id := range r.Tiers {
		counts[i] = TierCount{TierID: id, Patients: given[id]}
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
