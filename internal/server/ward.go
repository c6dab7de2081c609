package server

import (
	"fmt"
	"net/http"
	"slices"
	"strings"

	"wardload/internal/wardload"
	"wardload/web"
)

// newWardURL is the admin's form to create a ward; it posts to wardsURL
// (both in the route table).
const (
	newWardURL = "/admin/wards/new"
	wardsURL   = "/admin/wards"
)

// WardSettingsPath is the path of the settings page of the ward with
// code, where a new ward gets its shift patterns, tiers and ratio floors.
// The command line prints it after creating a ward.
func WardSettingsPath(code string) string { return settingsURL(&wardload.Ward{Code: code}) }

// WardSetupPath is the path of the set-up checklist of the ward with
// code; the command line prints it after creating a ward.
func WardSetupPath(code string) string { return setupURL(&wardload.Ward{Code: code}) }

// wardFormFields are the inputs of the new-ward form in page order: the
// form field (as the domain's errors name it) and the input's id.
var wardFormFields = []struct{ name, id string }{
	{"code", "ward-code"},
	{"name", "ward-name"},
	{"time_zone", "ward-time-zone"},
	{"beds", "ward-beds"},
}

// handleWardNew shows the empty new-ward form.
func (s *Server) handleWardNew(w http.ResponseWriter, r *http.Request) error {
	return s.renderWardNew(w, r, http.StatusOK, web.WardNewVM{})
}

// renderWardNew renders the new-ward or (vm.Edit) edit-ward form with the
// zones and, when vm has errors, the summary linking to each field.
func (s *Server) renderWardNew(w http.ResponseWriter, r *http.Request, status int, vm web.WardNewVM) error {
	vm.Zones = wardZones
	if vm.TimeZone != "" && !slices.Contains(wardZones, vm.TimeZone) {
		// A stored or typed name outside the list is offered first, so
		// that it is shown and saving leaves it as it is.
		vm.Zones = append([]string{vm.TimeZone}, wardZones...)
	}
	title := "New ward"
	if vm.Edit {
		title = "Edit ward"
	} else {
		vm.ActionURL = wardsURL
	}
	for _, f := range wardFormFields {
		if msg := vm.Errors[f.name]; msg != "" {
			vm.Summary = append(vm.Summary, web.FormErrorVM{Href: "#" + f.id, Message: msg})
		}
	}
	return s.render(w, r, status, web.WardNewPage(s.layout(r, title), vm))
}

// wardForm reads the ward form into ward (code only when creating) and
// returns the form as typed, clipped for showing back, with every message
// the domain has about it by field.
func wardForm(r *http.Request, ward wardload.Ward, create bool) (wardload.Ward, web.WardNewVM, int) {
	f := r.PostForm
	if create {
		ward.Code = strings.TrimSpace(f.Get("code"))
	}
	ward.Name, ward.TimeZone = strings.TrimSpace(f.Get("name")), strings.TrimSpace(f.Get("time_zone"))
	// Checked unclipped; shown back clipped a little past each limit.
	form := web.WardNewVM{Code: clip(ward.Code, 40), Name: clip(ward.Name, 160), TimeZone: clip(ward.TimeZone, 80),
		Beds: clip(f.Get("beds"), 20), Errors: wardFieldErrors(ward)}
	beds, err := wardload.ParseWardBeds(f.Get("beds"))
	addInvalid(form.Errors, err, "beds")
	return ward, form, beds
}

// handleWardCreate creates a ward (audited as the signed-in admin by the
// store) and, when beds were given, saves them in its settings; it then
// opens the ward's set-up checklist.
func (s *Server) handleWardCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	ward, form, beds := wardForm(r, wardload.Ward{}, true)
	if len(form.Errors) > 0 {
		return s.renderWardNew(w, r, http.StatusBadRequest, form)
	}

	if err := s.store.CreateWard(r.Context(), &ward); err != nil {
		switch wardload.ErrorCode(err) {
		case wardload.ECONFLICT, wardload.EINVALID:
			form.Errors[fieldOr(err, "code")] = wardload.ErrorMessage(err)
			return s.renderWardNew(w, r, http.StatusBadRequest, form)
		}
		return fmt.Errorf("ward create: %w", err)
	}
	flash := "Ward " + ward.Code + " was created. Next: its shift patterns and acuity tiers."
	if beds > 0 {
		settings := wardload.DefaultSettings(ward.ID)
		settings.Beds, settings.UpdatedBy = beds, principalFrom(r.Context()).User.ID
		if err := s.store.SaveSettings(r.Context(), settings); err != nil {
			// The ward exists; say so rather than answer with an error
			// page that invites creating it again.
			s.log.Error("ward create: beds not saved", "request_id", RequestID(r.Context()), "ward", ward.Code, "err", err)
			flash = "Ward " + ward.Code + " was created, but its beds could not be saved: enter them on its settings page."
		}
	}
	s.sessions.Put(r.Context(), sessFlash, flash)
	return seeOther(w, r, setupURL(&ward))
}

// wardFieldErrors returns every message the domain's Validate has about
// w, by field. Validate stops at the first bad field, so the field it
// names is replaced by a value that passes and w is checked again: the
// form then lists every problem at once while the rules and their wording
// stay the domain's.
func wardFieldErrors(w wardload.Ward) map[string]string {
	errs := map[string]string{}
	for range len(wardFormFields) {
		err := w.Validate()
		if err == nil {
			break
		}
		field := fieldOr(err, "code")
		if _, seen := errs[field]; seen {
			break // the stand-in did not pass either; keep the first message
		}
		errs[field] = wardload.ErrorMessage(err)
		switch field {
		case "code":
			w.Code = "x"
		case "name":
			w.Name = "x"
		case "time_zone":
			w.TimeZone = "UTC"
		default:
			return errs
		}
	}
	return errs
}

// wardSetupVM is the settings page's set-up checklist for ward, or nil
// once it has both shift patterns and tiers (a census can be entered).
func wardSetupVM(ward *wardload.Ward, hasShifts, hasTiers bool) *web.WardSetupVM {
	if hasShifts && hasTiers {
		return nil
	}
	return &web.WardSetupVM{HasShifts: hasShifts, HasTiers: hasTiers, CensusURL: censusURL(ward), SetupURL: setupURL(ward)}
}
