package server

import (
	"fmt"
	"maps"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"time"

	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// censusData is what the census page needs from the store.
type censusData struct {
	ward     *wardload.Ward
	shifts   []*wardload.ShiftPattern // in use; new census names only these
	tiers    []*wardload.Tier         // in use
	retired  []*wardload.ShiftPattern // kept for history, refused with their reason
	today    wardload.Date
	settings *wardload.Settings // beds, change-over window, support staff
}

func (s *Server) loadCensusData(r *http.Request) (*censusData, error) {
	ward := principalFrom(r.Context()).Ward
	loc, err := ward.Location()
	if err != nil {
		return nil, err
	}
	d := &censusData{ward: ward, today: projector.Today(s.now(), loc)}
	shifts, tiers, err := s.shiftsAndTiers(r.Context(), ward, "census")
	if err != nil {
		return nil, err
	}
	d.shifts, d.tiers = wardload.ActiveShifts(shifts), wardload.ActiveTiers(tiers)
	for _, p := range shifts {
		if p.Retired() {
			d.retired = append(d.retired, p)
		}
	}
	if d.settings, err = s.store.FindSettings(r.Context(), ward.ID); err != nil {
		return nil, fmt.Errorf("census: settings: %w", err)
	}
	return d, nil
}

// handleCensusForm shows the census form. Without query parameters it
// preselects the first of projector.ShiftChoices in the ward's time zone:
// within the ward's change-over window (Settings.ChangeoverMinutes) of a
// shift's start, that shift, offered
// with the running one as two large choices; otherwise the shift running
// now (or the next one). ?date=&shift= chooses another dated shift. The
// counts start from the newest census of the chosen shift, if there is
// one; otherwise they are carried from the ward's newest census of any
// shift that started no later, marked as carried.
func (s *Server) handleCensusForm(w http.ResponseWriter, r *http.Request) error {
	d, err := s.loadCensusData(r)
	if err != nil {
		return err
	}
	q := r.URL.Query()
	date, shift := q.Get("date"), q.Get("shift")
	var choices []projector.Choice
	if len(d.shifts) > 0 {
		if choices, err = projector.ShiftChoices(d.ward, d.shifts, s.now(), time.Duration(d.settings.ChangeoverMinutes)*time.Minute); err != nil {
			return err
		}
	}
	if date == "" && shift == "" && len(choices) > 0 {
		// The first choice can be the next shift to start, which may lie
		// beyond the window in an odd configuration; the chooser then
		// shows the problem like any other.
		date, shift = choices[0].Date.String(), strconv.FormatInt(choices[0].Shift.ID, 10)
	}
	vm, err := s.censusVM(r, d, date, shift, nil, nil)
	if err != nil {
		return err
	}
	if len(choices) > 1 {
		vm.Choices = shiftChoicesVM(d.ward, choices, s.now(), date, shift)
	}
	status := http.StatusOK
	if len(vm.Errors) > 0 {
		status = http.StatusBadRequest
	}
	return s.render(w, r, status, web.CensusPage(s.layout(r, "Census"), vm))
}

// handleCensusCreate stores a census with its projection and shows the
// projection. Any problem re-renders the form with what was typed, status
// 400, and nothing is stored: parseCensusForm checks the fields,
// projector.Save the rest (date window, beds, enough observations). A
// census for a dated shift that has ended needs confirm_ended=1: without
// it the form comes back with status 409 and a question whose button
// posts the same values with the confirmation.
func (s *Server) handleCensusCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadCensusData(r)
	if err != nil {
		return err
	}
	form := r.PostForm
	date, shift := strings.TrimSpace(form.Get("date")), strings.TrimSpace(form.Get("shift"))
	rerender := func(status int, errs map[string]string) error {
		vm, err := s.censusVM(r, d, date, shift, form, errs)
		if err != nil {
			return err
		}
		vm.ConfirmEnded = status == http.StatusConflict
		return s.render(w, r, status, web.CensusPage(s.layout(r, "Census"), vm))
	}
	day, shiftID, errs := parseShiftChoice(d, date, shift)
	counts, countErrs := parseCensusForm(form, d.tiers)
	maps.Copy(errs, countErrs)
	staff, staffErrs := parseStaffForm(form, d.settings)
	maps.Copy(errs, staffErrs)
	patients := -1 // the planned discharges are checked against the census once it was read
	if len(countErrs) == 0 {
		patients = 0
		for _, tc := range counts {
			patients += tc.Patients
		}
	}
	planned, plannedErrs := parsePlannedForm(form, d.settings, patients)
	maps.Copy(errs, plannedErrs)
	if len(errs) > 0 {
		return rerender(http.StatusBadRequest, errs)
	}
	// A census for a shift that has ended is most likely a slip at the
	// change-over: ask once, keeping what was typed.
	if form.Get(confirmEndedField) != "1" && shiftEnded(d, day, shiftID, s.now()) {
		return rerender(http.StatusConflict, map[string]string{})
	}
	_, p, err := s.projector.Save(r.Context(), d.ward.ID, day, shiftID, counts, staff, planned)
	if wardload.ErrorCode(err) == wardload.EINVALID {
		return rerender(http.StatusBadRequest, map[string]string{censusErrorField(d, wardload.ErrorField(err)): wardload.ErrorMessage(err)})
	} else if err != nil {
		return fmt.Errorf("census create: %w", err)
	}
	return seeOther(w, r, projectionURL(d.ward, p.ID))
}

// censusErrorField is the form field that shows a projector refusal. The
// form shows date, shift, one field per tier and the counts as a whole
// ("patients", "tier"); a refusal about anything else (care minutes or
// windows of the stored observations, settings such as draws or the cover
// level) would otherwise be a 400 page with no message, so it is shown
// with the counts.
func censusErrorField(d *censusData, field string) string {
	switch field {
	case "date", "shift", "patients", "tier", nursesOnDutyField, supportOnDutyField, plannedAdmissionsField, plannedDischargesField:
		return field
	}
	for _, t := range d.tiers {
		if field == censusField(t) {
			return field
		}
	}
	return "patients"
}

// parseShiftChoice reads the date and shift of the chooser. The date
// window itself is the projector's to check (it says so with EINVALID
// "date"); here only the form is checked.
func parseShiftChoice(d *censusData, date, shift string) (wardload.Date, int64, map[string]string) {
	errs := map[string]string{}
	day, err := wardload.ParseDate(date)
	if date == "" {
		errs["date"] = "Enter the date of the shift."
	} else if err != nil {
		errs["date"] = "Enter a date such as " + d.today.String() + "."
	}
	id, err := strconv.ParseInt(shift, 10, 64)
	found := false
	for _, p := range d.shifts {
		found = found || (err == nil && p.ID == id)
	}
	if !found {
		errs["shift"] = "Choose one of this ward's shifts."
		for _, p := range d.retired {
			if err == nil && p.ID == id {
				errs["shift"] = wardload.ErrorMessage(p.TakesCensus())
			}
		}
	}
	return day, id, errs
}

// censusVM builds the page. form is the posted form (nil on a GET): its
// counts are shown again as typed. errs maps field names (date, shift,
// tier_<code>, patients, tier) to messages.
func (s *Server) censusVM(r *http.Request, d *censusData, date, shift string, form url.Values, errs map[string]string) (web.CensusVM, error) {
	vm := web.CensusVM{
		WardName: d.ward.Name, TimeZone: d.ward.TimeZone,
		Today:   d.today.String(),
		PageURL: censusURL(d.ward), ActionURL: censusURL(d.ward),
		Date: clip(date, 10), ShiftID: clip(shift, 20),
		MinDate:  d.today.AddDays(-projector.MaxDaysBack).String(),
		MaxDate:  d.today.AddDays(projector.MaxDaysAhead).String(),
		NoShifts: len(d.shifts) == 0, NoTiers: len(d.tiers) == 0,
	}
	if err := d.ward.TakesCensus(); err != nil {
		vm.Closed = wardload.ErrorMessage(err)
		return vm, nil
	}
	if vm.NoShifts || vm.NoTiers {
		// Managers and admins are sent to the set-up; a charge nurse
		// cannot do it and is told who can.
		if role := principalFrom(r.Context()).User.Role; role == wardload.RoleManager || role == wardload.RoleAdmin {
			vm.SetupURL = setupURL(d.ward)
		}
		return vm, nil
	}
	if errs == nil {
		// On a GET the choice is checked here, window included, so that
		// a date out of range is explained before anything is typed.
		day, _, choiceErrs := parseShiftChoice(d, date, shift)
		errs = choiceErrs
		if _, ok := errs["date"]; !ok && (day.Before(d.today.AddDays(-projector.MaxDaysBack)) || day.After(d.today.AddDays(projector.MaxDaysAhead))) {
			errs["date"] = fmt.Sprintf("A census can be entered from %s to %s.", vm.MinDate, vm.MaxDate)
		}
	}
	var chosen *wardload.ShiftPattern
	for _, p := range d.shifts {
		id := strconv.FormatInt(p.ID, 10)
		sel := id == shift
		if sel {
			chosen = p
		}
		vm.Shifts = append(vm.Shifts, web.ShiftOptionVM{ID: id, Label: shiftLabel(p), Selected: sel})
	}
	if chosen == nil && form != nil {
		// A shift retired between showing the form and posting it: keep
		// the counts and ask for a current shift in the same form.
		for _, p := range d.retired {
			if strconv.FormatInt(p.ID, 10) == shift {
				chosen, vm.Rechoose = p, true
			}
		}
	}
	vm.DateError, vm.ShiftError = errs["date"], errs["shift"]
	if vm.DateError != "" {
		vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#census-date", Message: vm.DateError})
	}
	if vm.ShiftError != "" {
		vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#census-shift", Message: vm.ShiftError})
	}
	// The counts form is for one dated shift: shown when the choice is
	// valid, or after a post (whose counts must not be lost).
	vm.Chosen = chosen != nil && (vm.DateError == "" || form != nil)
	if !vm.Chosen {
		return vm, nil
	}
	vm.ShiftLabel = shiftLabel(chosen)
	saveTarget(&vm, d.ward, chosen, date, s.now())
	latest, err := s.latestCensus(r, d, date, chosen.ID)
	if err != nil {
		return vm, err
	}
	prefill := map[int64]int{}
	vm.NextRevision = 1
	var carried *wardload.Census
	if latest == nil && form == nil {
		if day, err := wardload.ParseDate(date); err == nil {
			if carried, err = s.carriedCensus(r, d, day, chosen); err != nil {
				return vm, err
			}
		}
	}
	if carried != nil {
		vm.Carried = carriedVM(carried, d)
		for _, tc := range carried.Counts {
			prefill[tc.TierID] = tc.Patients
		}
	}
	if latest != nil {
		vm.Latest = &web.LatestCensusVM{Revision: latest.census.Revision, EnteredAt: formatLocal(latest.census.EnteredAt, d.ward), Total: latest.census.Total()}
		if latest.projectionID != 0 {
			vm.Latest.ProjectionURL = projectionURL(d.ward, latest.projectionID)
		}
		vm.NextRevision = latest.census.Revision + 1
		for _, tc := range latest.census.Counts {
			prefill[tc.TierID] = tc.Patients
		}
	}
	for _, t := range d.tiers {
		f := web.TierFieldVM{Name: censusField(t), InputID: "tier-" + t.Code, Label: t.Label, Description: t.Description, Error: errs[censusField(t)]}
		switch {
		case form != nil:
			f.Value = clip(strings.TrimSpace(form.Get(f.Name)), 12)
		case latest != nil || carried != nil:
			f.Value = strconv.Itoa(prefill[t.ID])
			f.Carried = carried != nil
		}
		if f.Error != "" {
			vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#" + f.InputID, Message: t.Label + ": " + f.Error})
		}
		vm.Tiers = append(vm.Tiers, f)
	}
	var latestCensus *wardload.Census
	if latest != nil {
		latestCensus = latest.census
	}
	staffFieldsVM(&vm, d.settings, form, latestCensus, errs)
	plannedFieldsVM(&vm, form, latestCensus, errs)
	vm.Beds = d.settings.Beds
	_, vm.TotalText, vm.TotalOver = censusTotal(vm.Tiers, d.settings.Beds)
	vm.ScriptURL = s.assets.URL("census.js")
	for _, k := range []string{"patients", "tier"} {
		if msg := errs[k]; msg != "" {
			vm.CountError = msg
			vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#" + vm.Tiers[0].InputID, Message: msg})
		}
	}
	return vm, nil
}

// latestCensusOf is the newest census of a dated shift and the ID of its
// projection (0 when it has none).
type latestCensusOf struct {
	census       *wardload.Census
	projectionID int64
}

func (s *Server) latestCensus(r *http.Request, d *censusData, date string, shiftID int64) (*latestCensusOf, error) {
	day, err := wardload.ParseDate(date)
	if err != nil {
		return nil, nil
	}
	cs, _, err := s.store.FindCensus(r.Context(), wardload.CensusFilter{WardID: &d.ward.ID, ShiftID: &shiftID, From: &day, To: &day, LatestOnly: true, Limit: 1})
	if err != nil {
		return nil, fmt.Errorf("census: latest: %w", err)
	}
	if len(cs) == 0 {
		return nil, nil
	}
	l := &latestCensusOf{census: cs[0]}
	ps, _, err := s.store.FindProjections(r.Context(), wardload.ProjectionFilter{WardID: &d.ward.ID, ShiftID: &shiftID, From: &day, To: &day})
	if err != nil {
		return nil, fmt.Errorf("census: projections: %w", err)
	}
	for _, p := range ps {
		if p.CensusID == l.census.ID {
			l.projectionID = p.ID
		}
	}
	return l, nil
}

// shiftLabel names a shift pattern in the chooser, e.g. "Night, from
// 19:30, 12 hours".
func shiftLabel(p *wardload.ShiftPattern) string {
	return fmt.Sprintf("%s, from %s, %s hours", p.Name, p.StartClock(), strconv.FormatFloat(p.NominalHours, 'f', -1, 64))
}
