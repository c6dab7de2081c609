package wardload

import (
	"strconv"
	"strings"
	"time"
)

// Wards, shift patterns and tiers are retired rather than deleted: the
// observations, censuses and projections that name them are history and
// stay readable. A retired shift pattern or tier is left out of new census
// forms; a retired ward takes no new census and is hidden from the lists
// of people who are not admins. Retiring is undone by reinstating.

// MaxWardBeds is the most beds a ward may have; more is taken for a
// typing error (the largest wards run to a few dozen beds; common
// practice, no source). Settings.Validate uses the same bound.
const MaxWardBeds = 1000

// CheckWardBeds checks the beds typed when a ward is created or edited:
// a whole number from 1 to MaxWardBeds. (Settings allow 0, "not set"; a
// form that asks for beds and gets 0 or less was mistyped.) It returns
// EINVALID naming "beds".
func CheckWardBeds(beds int) error {
	if beds <= 0 || beds > MaxWardBeds {
		return FieldErrorf(EINVALID, "beds", "Beds must be a whole number from 1 to %d.", MaxWardBeds)
	}
	return nil
}

// ParseWardBeds reads the beds typed for a ward (form field or flag):
// empty is 0, "not set"; anything else must pass CheckWardBeds. It
// returns EINVALID naming "beds".
func ParseWardBeds(s string) (int, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, nil
	}
	n, err := strconv.Atoi(s)
	if err != nil || len(s) > 9 {
		return 0, FieldErrorf(EINVALID, "beds", "Beds must be a whole number from 1 to %d.", MaxWardBeds)
	}
	return n, CheckWardBeds(n)
}

// retireAt returns when something retired at cur is retired after an
// update asking for retired: unchanged when retired is nil or already as
// asked, now when it is retired now, zero when it is reinstated.
func retireAt(cur time.Time, retired *bool, now time.Time) time.Time {
	switch {
	case retired == nil:
		return cur
	case *retired && cur.IsZero():
		return now
	case !*retired:
		return time.Time{}
	}
	return cur
}

// Retired reports whether the ward was retired.
func (w *Ward) Retired() bool { return !w.RetiredAt.IsZero() }

// Retired reports whether the shift pattern was retired.
func (p *ShiftPattern) Retired() bool { return !p.RetiredAt.IsZero() }

// Retired reports whether the tier was retired.
func (t *Tier) Retired() bool { return !t.RetiredAt.IsZero() }

// ActiveShifts returns the patterns of ps that are not retired, in order.
func ActiveShifts(ps []*ShiftPattern) []*ShiftPattern {
	var out []*ShiftPattern
	for _, p := range ps {
		if !p.Retired() {
			out = append(out, p)
		}
	}
	return out
}

// ActiveTiers returns the tiers of ts that are not retired, in order.
func ActiveTiers(ts []*Tier) []*Tier {
	var out []*Tier
	for _, t := range ts {
		if !t.Retired() {
			out = append(out, t)
		}
	}
	return out
}

// CheckShiftRetire is the rule a store applies, inside the transaction,
// before retiring pattern id of a ward whose patterns are ps: a ward must
// keep one active shift pattern, or no census could be entered. It
// returns EINVALID naming "retired".
func CheckShiftRetire(ps []*ShiftPattern, id int64) error {
	for _, p := range ps {
		if p.ID != id && !p.Retired() {
			return nil
		}
	}
	return FieldErrorf(EINVALID, "retired",
		"This is the ward's last active shift pattern: add the shift pattern that replaces it before retiring this one, or no census could be entered.")
}

// CheckTierRetire is CheckShiftRetire for tiers: a ward keeps one active
// acuity tier. It returns EINVALID naming "retired".
func CheckTierRetire(ts []*Tier, id int64) error {
	for _, t := range ts {
		if t.ID != id && !t.Retired() {
			return nil
		}
	}
	return FieldErrorf(EINVALID, "retired",
		"This is the ward's last active acuity tier: add the tier that replaces it before retiring this one, or no census could be entered.")
}

// RetireAction is the audit action of an update that took something of
// kind ("ward", "tier" or "shift") from retired-at before to after: its
// retire or reinstate action when that changed, else its update action.
func RetireAction(kind string, before, after time.Time) string {
	actions := map[string][3]string{ // update, retire, reinstate
		"ward":  {ActionWardUpdate, ActionWardRetire, ActionWardReinstate},
		"tier":  {ActionTierUpdate, ActionTierRetire, ActionTierReinstate},
		"shift": {ActionShiftUpdate, ActionShiftRetire, ActionShiftReinstate},
	}[kind]
	switch {
	case before.IsZero() && !after.IsZero():
		return actions[1]
	case !before.IsZero() && after.IsZero():
		return actions[2]
	}
	return actions[0]
}

// The refusals of a new census that names something retired; the store
// (Census.CountsFor) and the projector both use them.
func errWardRetired() error {
	return FieldErrorf(EINVALID, "ward", "This ward has been retired: no new census can be entered. Its history stays readable.")
}

func errShiftRetired() error {
	return FieldErrorf(EINVALID, "shift", "This shift pattern has been retired: choose one of the ward's current shifts.")
}

// TakesCensus returns nil if a new census may be entered for the ward,
// or EINVALID naming "ward" if it is retired.
func (w *Ward) TakesCensus() error {
	if w.Retired() {
		return errWardRetired()
	}
	return nil
}

// TakesCensus returns nil if a new census may name the pattern, or
// EINVALID naming "shift" if it is retired.
func (p *ShiftPattern) TakesCensus() error {
	if p.Retired() {
		return errShiftRetired()
	}
	return nil
}
