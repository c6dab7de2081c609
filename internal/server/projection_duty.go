package server

import (
	"fmt"
	"net/http"
	"strconv"

	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// nursesText is "1 nurse" or "6 nurses".
func nursesText(n int) string {
	if n == 1 {
		return "1 nurse"
	}
	return strconv.Itoa(n) + " nurses"
}

// gapText says n against a wanted headcount: "2 short", "as many" or
// "1 more".
func gapText(n, want int) string {
	switch {
	case n < want:
		return strconv.Itoa(want-n) + " short"
	case n == want:
		return "as many"
	}
	return strconv.Itoa(n-want) + " more"
}

// dutyGap compares the nurses on duty with the projection's recommendation
// and ratio floor in plain words, e.g. "You have 6 nurses on duty; the
// estimate is 8 — 2 short; the ratio floor needs 7 — 1 short." It reports
// below when the nurses on duty are fewer than the recommendation or the
// floor.
func dutyGap(p *wardload.Projection, n int) (text string, below bool) {
	text = "You have " + nursesText(n) + " on duty; "
	noEstimate := p.DecidedBy == stats.DecidedByInsufficient
	switch {
	case noEstimate && p.Floor == nil:
		text += "there is no estimate (too few observations and no ratio floor)"
	case noEstimate:
		text += fmt.Sprintf("the estimate is the ratio floor alone, %d — %s", p.Recommended, gapText(n, p.Recommended))
		below = n < p.Recommended
	default:
		text += fmt.Sprintf("the estimate is %d — %s", p.Recommended, gapText(n, p.Recommended))
		below = n < p.Recommended
	}
	switch {
	case p.Floor == nil:
		text += "; no ratio floor is configured for this shift."
	case noEstimate:
		text += "."
	default:
		text += fmt.Sprintf("; the ratio floor needs %d", *p.Floor)
		if n < *p.Floor {
			text += " — " + gapText(n, *p.Floor)
			below = true
		}
		text += "."
	}
	return text, below
}

// dutyChance says the chance of a shortfall with the nurses on duty, read
// from the page's shortfall table (so sentence and table agree), never as
// a bare 0 or 1 (the table's texts never are). Outside the table's range
// it leans to the unsafe side: fewer nurses than the table's first row
// have a chance higher than that row's; more than its last, a chance at
// most that row's. "" when the table is empty (a declined projection).
func dutyChance(rows []web.ShortfallRowVM, n int) string {
	if len(rows) == 0 {
		return ""
	}
	first, errF := strconv.Atoi(rows[0].Nurses)
	last, errL := strconv.Atoi(rows[len(rows)-1].Nurses)
	if errF != nil || errL != nil {
		return ""
	}
	with := "Chance of a shortfall with the " + nursesText(n) + " on duty: "
	switch {
	case n < first:
		return with + "higher than with " + nursesText(first) + ", which is " + rows[0].Chance + "."
	case n > last:
		return with + "at most that with " + nursesText(last) + ", which is " + rows[len(rows)-1].Chance + "."
	}
	for _, r := range rows {
		if r.Nurses == strconv.Itoa(n) {
			return with + r.Chance + "."
		}
	}
	return ""
}

// dutyVM is the staff-on-duty block of the projection page, from the
// staff entered with the projection's census revision; nil when none were
// entered. Below the recommendation or the floor it shows the ward's
// escalation text (read only then), or says there is none.
func (s *Server) dutyVM(r *http.Request, ward *wardload.Ward, p *wardload.Projection, staff wardload.StaffOnDuty, vm *web.ProjectionVM) error {
	if staff.Nurses == nil {
		return nil
	}
	n := *staff.Nurses
	d := &web.DutyVM{}
	d.Gap, d.Below = dutyGap(p, n)
	if !vm.Declined {
		d.Chance = dutyChance(vm.Shortfall, n)
	}
	if staff.Support != nil {
		d.Support = fmt.Sprintf("%d support staff on duty; the estimate counts nurses only.", *staff.Support)
	}
	if d.Below {
		st, err := s.store.FindSettings(r.Context(), ward.ID)
		if err != nil {
			return fmt.Errorf("projection %d: settings: %w", p.ID, err)
		}
		d.Escalation = st.Escalation
		d.SettingsURL = vm.SettingsURL
	}
	vm.Duty = d
	return nil
}
