package server

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"wardload/internal/export"
	"wardload/internal/wardload"
	"wardload/web"
)

// quartileOptions explains each convention in one line, in the order the
// page lists them. The default is wardload.DefaultSettings's.
var quartileOptions = []web.QuartileOptionVM{
	{Value: wardload.QuartilesHinges, Label: "Tukey's hinges",
		Explanation: "medians of the lower and upper halves, the middle value counted in both when n is odd (as R's fivenum and boxplot)."},
	{Value: wardload.QuartilesHF6, Label: "Hyndman & Fan type 6",
		Explanation: "interpolated at position p(n+1), the rule of the NIST/SEMATECH e-Handbook."},
	{Value: wardload.QuartilesHF7, Label: "Hyndman & Fan type 7",
		Explanation: "interpolated at position 1+p(n−1), the default of R's quantile and of NumPy."},
	{Value: wardload.QuartilesHalves, Label: "Medians of halves",
		Explanation: "median of each half with the middle value left out when n is odd (a common textbook method)."},
}

// settingsData is what the settings page shows from the store.
type settingsData struct {
	ward     *wardload.Ward
	settings *wardload.Settings
	shifts   []*wardload.ShiftPattern
	tiers    []*wardload.Tier
}

// loadSettings reads the ward's settings, shift patterns and tiers.
func (s *Server) loadSettings(r *http.Request) (*settingsData, error) {
	ward := principalFrom(r.Context()).Ward
	d := &settingsData{ward: ward}
	var err error
	if d.settings, err = s.store.FindSettings(r.Context(), ward.ID); err != nil {
		return nil, fmt.Errorf("settings: %w", err)
	}
	if d.shifts, d.tiers, err = s.shiftsAndTiers(r.Context(), ward, "settings"); err != nil {
		return nil, err
	}
	return d, nil
}

// shiftsAndTiers reads a ward's shift patterns and acuity tiers, which the
// census, settings, review and import pages all need; page names the page
// in a wrapped error.
func (s *Server) shiftsAndTiers(ctx context.Context, ward *wardload.Ward, page string) ([]*wardload.ShiftPattern, []*wardload.Tier, error) {
	shifts, err := s.store.FindShiftPatterns(ctx, ward.ID)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: shifts: %w", page, err)
	}
	tiers, err := s.store.FindTiers(ctx, ward.ID)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: tiers: %w", page, err)
	}
	return shifts, tiers, nil
}

// settingsVM shows every form with what is stored. A failed post then
// replaces its own form with the input as typed.
func (s *Server) settingsVM(r *http.Request, d *settingsData) (web.SettingsVM, error) {
	base := settingsURL(d.ward)
	st := d.settings
	vm := web.SettingsVM{
		WardName:   d.ward.Name,
		GeneralURL: base, FloorsURL: base + "/floors",
		General: web.GeneralFormVM{
			DirectCareFraction: export.FormatLevel(st.DirectCareFraction),
			CoverLevel:         export.FormatLevel(st.CoverLevel),
			LookbackWeeks:      strconv.Itoa(st.LookbackWeeks),
			Quartiles:          st.Quartiles,
			Beds:               strconv.Itoa(st.Beds),
			ChangeoverMinutes:  strconv.Itoa(st.ChangeoverMinutes),
			SupportStaff:       st.SupportStaff,
			Escalation:         st.Escalation,
		},
		FloorShifts: floorShiftsVM(d, nil, nil),
		NewShift:    web.ShiftFormVM{URL: base + "/shifts", ID: "new"},
		NewTier:     web.TierFormVM{URL: base + "/tiers", ID: "new", New: true},
	}
	def := wardload.DefaultSettings(0).Quartiles
	for _, q := range quartileOptions {
		q.Default = q.Value == def
		vm.Quartiles = append(vm.Quartiles, q)
	}
	if !st.UpdatedAt.IsZero() {
		vm.Updated = "Last saved " + formatAt(st.UpdatedAt)
		if st.UpdatedBy != 0 {
			if u, err := s.store.FindUserByID(r.Context(), st.UpdatedBy); err == nil {
				vm.Updated += " by " + u.Name
			} else if wardload.ErrorCode(err) != wardload.ENOTFOUND {
				return vm, fmt.Errorf("settings: %w", err)
			}
		}
		vm.Updated += "."
	}
	for _, p := range d.shifts {
		id := strconv.FormatInt(p.ID, 10)
		vm.Shifts = append(vm.Shifts, web.ShiftFormVM{ID: id, URL: base + "/shifts/" + id,
			Name: p.Name, Start: p.StartClock(), Hours: formatDecimal(p.NominalHours),
			Retire: retireVM("sh-"+id, base+"/shifts/"+id, "shift pattern "+p.Name, p.RetiredAt, d.ward)})
	}
	for _, t := range d.tiers {
		id := strconv.FormatInt(t.ID, 10)
		vm.Tiers = append(vm.Tiers, web.TierFormVM{ID: id, URL: base + "/tiers/" + id,
			Code: t.Code, Label: t.Label, Description: t.Description, Order: strconv.Itoa(t.DisplayOrder),
			Retire: retireVM("t-"+id, base+"/tiers/"+id, "tier "+t.Code, t.RetiredAt, d.ward)})
	}
	return vm, nil
}

func (s *Server) renderSettings(w http.ResponseWriter, r *http.Request, status int, vm web.SettingsVM) error {
	shifts, tiers := 0, 0
	for _, f := range vm.Shifts {
		if f.Retire == nil || !f.Retire.Retired {
			shifts++
		}
	}
	for _, f := range vm.Tiers {
		if f.Retire == nil || !f.Retire.Retired {
			tiers++
		}
	}
	setup := wardSetupVM(principalFrom(r.Context()).Ward, shifts > 0, tiers > 0)
	return s.render(w, r, status, web.SettingsPage(s.layout(r, "Settings · "+vm.WardName), vm, setup))
}

// handleSettings shows the settings page.
func (s *Server) handleSettings(w http.ResponseWriter, r *http.Request) error {
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	vm, err := s.settingsVM(r, d)
	if err != nil {
		return err
	}
	vm.Notice = s.sessions.PopString(r.Context(), sessFlash)
	if vm.Notice != "" {
		markSaved(&vm, s.sessions.PopString(r.Context(), sessSavedAt))
	}
	return s.renderSettings(w, r, http.StatusOK, vm)
}

// sessSavedAt is the session key of the anchor of the settings form the
// last post saved, for its "Saved" line.
const sessSavedAt = "saved_at"

// markSaved puts vm's notice next to the form with anchor: the staffing
// or floors form, or a shift pattern or tier form. An anchor that names
// no form on the page (a form removed meanwhile) leaves the notice at the
// top.
func markSaved(vm *web.SettingsVM, anchor string) {
	switch anchor {
	case web.StaffingAnchor, web.FloorsAnchor:
		vm.SavedAt = anchor
		return
	}
	for i := range vm.Shifts {
		if web.ShiftAnchor(vm.Shifts[i].ID) == anchor {
			vm.Shifts[i].Saved, vm.SavedAt = vm.Notice, anchor
		}
	}
	for i := range vm.Tiers {
		if web.TierAnchor(vm.Tiers[i].ID) == anchor {
			vm.Tiers[i].Saved, vm.SavedAt = vm.Notice, anchor
		}
	}
}

// settingsSaved ends a successful settings post: flash and 303 back to
// the form that was saved (anchor, one of web's settings anchors), where
// the page then says "Saved".
func (s *Server) settingsSaved(w http.ResponseWriter, r *http.Request, what, anchor string) error {
	s.sessions.Put(r.Context(), sessFlash, "Saved: "+what+".")
	s.sessions.Put(r.Context(), sessSavedAt, anchor)
	return seeOther(w, r, settingsURL(principalFrom(r.Context()).Ward)+"#"+anchor)
}

// handleSettingsSave saves the staffing settings; the ratio floors stay
// as stored.
func (s *Server) handleSettingsSave(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	f := r.PostForm
	form := web.GeneralFormVM{
		DirectCareFraction: clip(f.Get("direct_care_fraction"), 40),
		CoverLevel:         clip(f.Get("cover_level"), 40),
		LookbackWeeks:      clip(f.Get("lookback_weeks"), 40),
		Quartiles:          clip(f.Get("quartiles"), 40),
		Beds:               clip(f.Get("beds"), 40),
		ChangeoverMinutes:  clip(f.Get("changeover_minutes"), 40),
		SupportStaff:       f.Get("support_staff") == "1",
		// Kept as typed (to a bound) so a refusal shows it back; the
		// domain checks the length and the characters.
		Escalation: clip(strings.TrimSpace(strings.ReplaceAll(f.Get("escalation"), "\r\n", "\n")), 4*wardload.MaxEscalationText+4),
		Errors:     map[string]string{},
	}
	next := *d.settings
	next.WardID = d.ward.ID
	next.UpdatedBy = principalFrom(r.Context()).User.ID
	p := formParser{errs: form.Errors}
	next.DirectCareFraction = p.decimal("direct_care_fraction", form.DirectCareFraction, false)
	next.CoverLevel = p.decimal("cover_level", form.CoverLevel, false)
	next.LookbackWeeks = p.whole("lookback_weeks", form.LookbackWeeks, false)
	next.Beds = p.whole("beds", form.Beds, true)
	next.ChangeoverMinutes = p.whole("changeover_minutes", form.ChangeoverMinutes, false)
	next.SupportStaff, next.Escalation = form.SupportStaff, form.Escalation
	next.Quartiles = form.Quartiles
	if !wardload.ValidQuartiles(next.Quartiles) {
		form.Errors["quartiles"] = "Choose one of the quartile conventions."
	}
	invalid := func() error {
		vm, err := s.settingsVM(r, d)
		if err != nil {
			return err
		}
		vm.General = form
		return s.renderSettings(w, r, http.StatusBadRequest, vm)
	}
	// The domain's checks run even when a field could not be read, so
	// that every mistake is listed at once; a field keeps the message of
	// its reading.
	addInvalid(form.Errors, next.Validate(), "direct_care_fraction")
	if len(form.Errors) > 0 {
		return invalid()
	}
	if err := s.store.SaveSettings(r.Context(), &next); err != nil {
		if wardload.ErrorCode(err) == wardload.EINVALID {
			addInvalid(form.Errors, err, "direct_care_fraction")
			return invalid()
		}
		return fmt.Errorf("settings save: %w", err)
	}
	return s.settingsSaved(w, r, "staffing settings", web.StaffingAnchor)
}

// fieldOr returns the field err names, or def when it names none.
func fieldOr(err error, def string) string {
	if f := wardload.ErrorField(err); f != "" {
		return f
	}
	return def
}

// shift returns the ward's shift pattern id, ENOTFOUND if it has none.
func (d *settingsData) shift(id int64) (*wardload.ShiftPattern, error) {
	for _, p := range d.shifts {
		if p.ID == id {
			return p, nil
		}
	}
	return nil, wardload.Errorf(wardload.ENOTFOUND, "This ward has no such shift pattern.")
}

// tier returns the ward's tier id, ENOTFOUND if it has none.
func (d *settingsData) tier(id int64) (*wardload.Tier, error) {
	for _, t := range d.tiers {
		if t.ID == id {
			return t, nil
		}
	}
	return nil, wardload.Errorf(wardload.ENOTFOUND, "This ward has no such tier.")
}
