package server

import (
	"fmt"
	"net/http"
	"net/url"
	"strings"

	"wardload/internal/wardload"
	"wardload/web"
)

// Field names of the floors form, by shift pattern and tier ID.
func floorField(shiftID int64) string { return fmt.Sprintf("floor_%d", shiftID) }
func floorTierField(shiftID, tierID int64) string {
	return fmt.Sprintf("floor_%d_%d", shiftID, tierID)
}
func chargeField(shiftID int64) string { return fmt.Sprintf("charge_%d", shiftID) }

// floorShiftsVM builds the floors form, one fieldset per shift pattern.
// With form nil it shows the stored floors; otherwise the input as typed
// with errs beside the fields.
func floorShiftsVM(d *settingsData, form url.Values, errs map[string]string) []web.FloorShiftVM {
	stored := map[string]string{}
	charge := map[int64]bool{}
	for _, f := range d.settings.Floors {
		name := floorField(f.ShiftID)
		if f.TierID != 0 {
			name = floorTierField(f.ShiftID, f.TierID)
		}
		stored[name] = formatDecimal(f.PatientsPerNurse)
		// As stats.FloorFor: the nurse in charge counts only if every
		// floor of the shift says so.
		c, seen := charge[f.ShiftID]
		charge[f.ShiftID] = f.ChargeNurseCounts && (c || !seen)
	}
	value := func(name string) string {
		if form != nil {
			return clip(form.Get(name), 20)
		}
		return stored[name]
	}
	out := make([]web.FloorShiftVM, 0, len(d.shifts))
	for _, p := range d.shifts {
		vm := web.FloorShiftVM{ShiftName: p.Name, WardField: floorField(p.ID), ChargeField: chargeField(p.ID),
			ChargeNurseCounts: charge[p.ID], Errors: errs}
		if form != nil {
			vm.ChargeNurseCounts = form.Get(vm.ChargeField) != ""
		}
		vm.WardValue = value(vm.WardField)
		for _, t := range d.tiers {
			f := floorTierField(p.ID, t.ID)
			vm.Tiers = append(vm.Tiers, web.FloorTierVM{Field: f, Code: t.Code, Label: t.Label, Value: value(f)})
		}
		out = append(out, vm)
	}
	return out
}

// handleFloorsSave replaces the ward's ratio floors with the form's: per
// shift pattern an optional ward-wide floor and optional per-tier floors,
// and whether the nurse in charge counts towards them. The other
// settings stay as stored.
func (s *Server) handleFloorsSave(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	errs := map[string]string{}
	p := formParser{errs: errs}
	var floors []wardload.RatioFloor
	read := func(field string, shiftID, tierID int64, counts bool) {
		raw := r.PostForm.Get(field)
		if strings.TrimSpace(raw) == "" {
			return // no floor
		}
		v := p.decimal(field, raw, false)
		if _, bad := errs[field]; bad {
			return
		}
		if !(v >= wardload.MinPatientsPerNurse && v <= wardload.MaxPatientsPerNurse) {
			errs[field] = fmt.Sprintf("Patients per nurse must be between %g (two nurses per patient) and %d.",
				wardload.MinPatientsPerNurse, wardload.MaxPatientsPerNurse)
			return
		}
		floors = append(floors, wardload.RatioFloor{ShiftID: shiftID, TierID: tierID, PatientsPerNurse: v, ChargeNurseCounts: counts})
	}
	for _, sh := range d.shifts {
		counts := r.PostForm.Get(chargeField(sh.ID)) != ""
		read(floorField(sh.ID), sh.ID, 0, counts)
		for _, t := range d.tiers {
			read(floorTierField(sh.ID, t.ID), sh.ID, t.ID, counts)
		}
	}
	next := *d.settings
	next.WardID = d.ward.ID
	next.Floors = floors
	next.UpdatedBy = principalFrom(r.Context()).User.ID
	invalid := func(msg string) error {
		vm, err := s.settingsVM(r, d)
		if err != nil {
			return err
		}
		vm.FloorShifts = floorShiftsVM(d, r.PostForm, errs)
		vm.FloorsError = msg
		return s.renderSettings(w, r, http.StatusBadRequest, vm)
	}
	if len(errs) > 0 {
		return invalid("") // the summary lists each field's message
	}
	if err := next.Validate(); err != nil {
		return invalid(wardload.ErrorMessage(err))
	}
	if err := s.store.SaveSettings(r.Context(), &next); err != nil {
		switch wardload.ErrorCode(err) {
		case wardload.EINVALID, wardload.ENOTFOUND:
			// A shift or tier removed or changed meanwhile.
			return invalid(wardload.ErrorMessage(err))
		}
		return fmt.Errorf("floors save: %w", err)
	}
	return s.settingsSaved(w, r, "ratio floors", web.FloorsAnchor)
}
