package server

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
	"wardload/web"
)

// shiftInput reads a shift pattern form: name, start "HH:MM" and nominal
// hours. The form as typed and any messages by field come back with it.
func shiftInput(r *http.Request) (web.ShiftFormVM, string, int, float64) {
	f := r.PostForm
	form := web.ShiftFormVM{Name: clip(strings.TrimSpace(f.Get("name")), 60), Start: clip(f.Get("start"), 20),
		Hours: clip(f.Get("hours"), 20), Errors: map[string]string{}}
	p := formParser{errs: form.Errors}
	start, err := wardload.ParseClock(form.Start)
	if err != nil {
		form.Errors["start"] = "Enter the start as HH:MM, 24-hour (e.g. 07:30 or 19:30)."
	}
	hours := p.decimal("hours", form.Hours, false)
	return form, form.Name, start, hours
}

// renderShiftError re-renders the page with form (the add form when id is
// "", else the edit form of pattern id) as typed and its messages.
func (s *Server) renderShiftError(w http.ResponseWriter, r *http.Request, d *settingsData, form web.ShiftFormVM, id string) error {
	vm, err := s.settingsVM(r, d)
	if err != nil {
		return err
	}
	if id == "" {
		form.ID, form.URL = vm.NewShift.ID, vm.NewShift.URL
		vm.NewShift = form
	}
	for i := range vm.Shifts {
		if vm.Shifts[i].ID == id {
			form.ID, form.URL, form.Retire = vm.Shifts[i].ID, vm.Shifts[i].URL, vm.Shifts[i].Retire
			vm.Shifts[i] = form
		}
	}
	return s.renderSettings(w, r, http.StatusBadRequest, vm)
}

// shiftStoreError puts a store's refusal next to its field; anything else
// is returned as it is.
func shiftStoreError(err error, form web.ShiftFormVM) (bool, error) {
	switch wardload.ErrorCode(err) {
	case wardload.ECONFLICT:
		form.Errors["name"] = "This ward already has a shift pattern with that name."
		return true, nil
	case wardload.EINVALID:
		form.Errors[fieldOr(err, "name")] = wardload.ErrorMessage(err)
		return true, nil
	}
	return false, err
}

// handleShiftCreate adds a shift pattern to the ward.
func (s *Server) handleShiftCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	form, name, start, hours := shiftInput(r)
	p := &wardload.ShiftPattern{WardID: d.ward.ID, Name: name, StartMinute: start, NominalHours: hours}
	addInvalid(form.Errors, p.Validate(), "name")
	if len(form.Errors) > 0 {
		return s.renderShiftError(w, r, d, form, "")
	}
	if err := s.store.CreateShiftPattern(r.Context(), p); err != nil {
		if shown, err := shiftStoreError(err, form); !shown {
			return fmt.Errorf("shift create: %w", err)
		}
		return s.renderShiftError(w, r, d, form, "")
	}
	return s.settingsSaved(w, r, "shift pattern "+p.Name, web.ShiftAnchor(strconv.FormatInt(p.ID, 10)))
}

// handleShiftUpdate changes a shift pattern of the ward. Stored
// projections keep the name and window they were made with.
func (s *Server) handleShiftUpdate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	id, err := idParam(chi.URLParam(r, "id"), "shift pattern")
	if err != nil {
		return err
	}
	cur, err := d.shift(id)
	if err != nil {
		return err
	}
	idText := strconv.FormatInt(id, 10)
	form, name, start, hours := shiftInput(r)
	next := *cur
	next.Name, next.StartMinute, next.NominalHours = name, start, hours
	addInvalid(form.Errors, next.Validate(), "name")
	if len(form.Errors) > 0 {
		return s.renderShiftError(w, r, d, form, idText)
	}
	upd := wardload.ShiftPatternUpdate{Name: &name, StartMinute: &start, NominalHours: &hours}
	if _, err := s.store.UpdateShiftPattern(r.Context(), id, upd); err != nil {
		if shown, err := shiftStoreError(err, form); !shown {
			return fmt.Errorf("shift update: %w", err)
		}
		return s.renderShiftError(w, r, d, form, idText)
	}
	return s.settingsSaved(w, r, "shift pattern "+name, web.ShiftAnchor(idText))
}

// addInvalid adds each problem of a Validate error to errs under its
// field (def when it names none), unless that field already has a message
// from parsing.
func addInvalid(errs map[string]string, err error, def string) {
	for _, e := range wardload.ErrorFields(err) {
		f := fieldOr(e, def)
		if _, ok := errs[f]; !ok {
			errs[f] = wardload.ErrorMessage(e)
		}
	}
}
