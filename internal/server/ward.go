package server

import (
	"fmt"
	"net/http"
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

// renderWardNew renders the form with the zone suggestions and, when vm
// has errors, the summary linking to each field.
func (s *Server) renderWardNew(w http.ResponseWriter, r *http.Request, status int, vm web.WardNewVM) error {
	vm.ActionURL, vm.Zones = wardsURL, wardZones
	for _, f := range wardFormFields {
		if msg := vm.Errors[f.name]; msg != "" {
			vm.Summary = append(vm.Summary, web.FormErrorVM{Href: "#" + f.id, Message: msg})
		}
	}
	return s.render(w, r, status, web.WardNewPage(s.layout(r, "New ward"), vm))
}

// handleWardCreate creates a ward (audited as the signed-in admin by the
// store) and, when beds were given, saves them in its settings; it then
// opens the ward's settings page, where set-up continues.
func (s *Server) handleWardCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	f := r.PostForm
	ward := wardload.Ward{Code: strings.TrimSpace(f.Get("code")), Name: strings.TrimSpace(f.Get("name")),
		TimeZone: strings.TrimSpace(f.Get("time_zone"))}
	// Checked unclipped; shown back clipped a little past each limit.
	form := web.WardNewVM{Code: clip(ward.Code, 40), Name: clip(ward.Name, 160), TimeZone: clip(ward.TimeZone, 80),
		Beds: clip(f.Get("beds"), 20), Errors: wardFieldErrors(ward)}
	settings := wardload.DefaultSettings(1) // any non-zero ID: the ward has none yet
	settings.Beds = formParser{errs: form.Errors}.whole("beds", form.Beds, true)
	addInvalid(form.Errors, settings.Validate(), "beds")
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
	flash := "Ward " + ward.Code + " was created. Next: add its shift patterns and acuity tiers below."
	if settings.Beds > 0 {
		settings.WardID, settings.UpdatedBy = ward.ID, principalFrom(r.Context()).User.ID
		if err := s.store.SaveSettings(r.Context(), settings); err != nil {
			// The ward exists; say so rather than answer with an error
			// page that invites creating it again.
			s.log.Error("ward create: beds not saved", "request_id", RequestID(r.Context()), "ward", ward.Code, "err", err)
			flash = "Ward " + ward.Code + " was created, but its beds could not be saved: enter them under Staffing below."
		}
	}
	s.sessions.Put(r.Context(), sessFlash, flash)
	return seeOther(w, r, settingsURL(&ward))
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
	return &web.WardSetupVM{HasShifts: hasShifts, HasTiers: hasTiers, CensusURL: censusURL(ward)}
}
