package server

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"wardload/internal/wardload"
	"wardload/web"
)

// handleWardSetup shows a ward's set-up checklist: each step marked done
// or not from what the ward has stored (never from a flag that could go
// stale), linked to where it is done. A new ward opens here after it is
// created; the settings page and an unusable census page link here.
func (s *Server) handleWardSetup(w http.ResponseWriter, r *http.Request) error {
	ctx := r.Context()
	ward := principalFrom(ctx).Ward
	shifts, tiers, err := s.shiftsAndTiers(ctx, ward, "setup")
	if err != nil {
		return err
	}
	st, err := s.store.FindSettings(ctx, ward.ID)
	if err != nil {
		return fmt.Errorf("setup: settings: %w", err)
	}
	_, nObs, err := s.store.FindObservations(ctx, wardload.ObservationFilter{WardID: &ward.ID, Lean: true, Limit: 1})
	if err != nil {
		return fmt.Errorf("setup: observations: %w", err)
	}
	_, nCensus, err := s.store.FindCensus(ctx, wardload.CensusFilter{WardID: &ward.ID, Limit: 1})
	if err != nil {
		return fmt.Errorf("setup: census: %w", err)
	}
	shifts, tiers = wardload.ActiveShifts(shifts), wardload.ActiveTiers(tiers)
	base := settingsURL(ward)

	var shiftNames, tierNames []string
	for _, p := range shifts {
		shiftNames = append(shiftNames, p.Name+" "+p.StartClock())
	}
	for _, t := range tiers {
		tierNames = append(tierNames, t.Code)
	}
	settingsStatus := "Defaults in use; beds not set."
	if st.Beds > 0 {
		settingsStatus = strconv.Itoa(st.Beds) + " beds."
	}
	if !st.UpdatedAt.IsZero() {
		settingsStatus += " Last saved " + formatLocal(st.UpdatedAt, ward) + "."
	}
	vm := web.WardSetupPageVM{
		WardName: ward.Name, WardCode: ward.Code, Retired: ward.Retired(),
		Notice:    s.sessions.PopString(ctx, sessFlash),
		Ready:     len(shifts) > 0 && len(tiers) > 0,
		CensusURL: censusURL(ward),
		Steps: []web.SetupStepVM{
			{Title: "Shift patterns", URL: base + "#shifts", Done: len(shifts) > 0, Status: inUse(shiftNames),
				Hint: "Each shift's local start and length, e.g. Day 07:30 for 12 hours."},
			{Title: "Acuity tiers", URL: base + "#tiers", Done: len(tiers) > 0, Status: inUse(tierNames),
				Hint: "The classes of patients the census counts, by how much care they need."},
			{Title: "Ratio floors", URL: base + "#floors", Done: len(st.Floors) > 0,
				Status: plural(len(st.Floors), "floor", "floors") + " set.",
				Hint:   "The fewest nurses per patient each shift may have; every projection shows the floor used."},
			{Title: "Staffing settings", URL: base + "#staffing", Done: !st.UpdatedAt.IsZero(), Status: settingsStatus,
				Hint: "Beds, the share of time spent on direct care, the cover level."},
			{Title: "Timed care observations", URL: importURL(ward), Done: nObs > 0, Optional: true,
				Status: plural(nObs, "observation", "observations") + " stored.",
				Hint:   "Without them a projection recommends the ratio floor only; import a CSV file to estimate care time."},
			{Title: "First census", URL: censusURL(ward), Done: nCensus > 0,
				Status: plural(nCensus, "census entry", "census entries") + " so far."},
		},
	}
	return s.render(w, r, http.StatusOK, web.WardSetupPage(s.layout(r, "Set up · "+ward.Name), vm))
}

// inUse says which shift patterns or tiers are in use.
func inUse(names []string) string {
	if len(names) == 0 {
		return "None yet."
	}
	return strconv.Itoa(len(names)) + " in use: " + strings.Join(names, ", ") + "."
}

// plural is "1 floor", "0 floors", "3 floors".
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}
