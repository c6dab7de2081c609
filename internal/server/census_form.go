package server

import (
	"net/url"
	"strconv"
	"strings"

	"wardload/internal/wardload"
)

// censusField is the form field of a tier's patient count.
func censusField(t *wardload.Tier) string { return "tier_" + t.Code }

// parseCensusForm reads one patient count per tier from a census form:
// field "tier_<code>" for each of tiers, in their order. Only those fields
// are read; anything else in the form is ignored. A count must be a whole
// number from 0 to wardload.MaxCensusCount written with the digits 0–9 only (no
// sign, decimal point or exponent). The second result maps each bad
// field's name to a message for the person at the form; when it is empty
// the counts are complete and valid.
func parseCensusForm(form url.Values, tiers []*wardload.Tier) ([]wardload.TierCount, map[string]string) {
	counts := make([]wardload.TierCount, 0, len(tiers))
	errs := map[string]string{}
	for _, t := range tiers {
		name := censusField(t)
		vals := form[name]
		if len(vals) > 1 {
			errs[name] = "Enter one number."
			continue
		}
		v := ""
		if len(vals) == 1 {
			v = strings.TrimSpace(vals[0])
		}
		switch {
		case v == "":
			errs[name] = "Enter the number of patients (0 if none)."
		case strings.HasPrefix(v, "-"):
			errs[name] = "Patients are counted from 0; a count cannot be negative."
		case strings.Trim(v, "0123456789") != "":
			errs[name] = "Enter a whole number, such as 4."
		default:
			n, err := strconv.Atoi(v)
			// The cap of wardload.Census.Validate, checked here already so
			// the message can name the field.
			if err != nil || n > wardload.MaxCensusCount {
				errs[name] = "That count is not plausible for one ward; please check it."
				continue
			}
			counts = append(counts, wardload.TierCount{TierID: t.ID, Patients: n})
		}
	}
	if len(errs) > 0 {
		return nil, errs
	}
	return counts, errs
}
