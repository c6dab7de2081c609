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

// tierInput reads a tier form. Code is read only when adding.
func tierInput(r *http.Request, d *settingsData, adding bool) (web.TierFormVM, int) {
	f := r.PostForm
	form := web.TierFormVM{Label: clip(strings.TrimSpace(f.Get("label")), 80), Description: clip(strings.TrimSpace(f.Get("description")), 600),
		Order: clip(f.Get("order"), 20), Errors: map[string]string{}}
	if adding {
		form.Code = clip(strings.TrimSpace(f.Get("code")), 40)
	}
	order := formParser{errs: form.Errors}.whole("order", form.Order, true)
	if strings.TrimSpace(form.Order) == "" {
		// Empty: after the last tier.
		order = 0
		for _, t := range d.tiers {
			order = max(order, t.DisplayOrder+1)
		}
	}
	return form, order
}

// renderTierError re-renders the page with a tier form as typed.
func (s *Server) renderTierError(w http.ResponseWriter, r *http.Request, d *settingsData, form web.TierFormVM, id string) error {
	vm, err := s.settingsVM(r, d)
	if err != nil {
		return err
	}
	if id == "" {
		form.ID, form.URL, form.New = vm.NewTier.ID, vm.NewTier.URL, true
		vm.NewTier = form
	}
	for i := range vm.Tiers {
		if vm.Tiers[i].ID == id {
			form.ID, form.URL, form.Code, form.Retire = vm.Tiers[i].ID, vm.Tiers[i].URL, vm.Tiers[i].Code, vm.Tiers[i].Retire
			vm.Tiers[i] = form
		}
	}
	return s.renderSettings(w, r, http.StatusBadRequest, vm)
}

func tierStoreError(err error, form web.TierFormVM) (bool, error) {
	switch wardload.ErrorCode(err) {
	case wardload.ECONFLICT:
		form.Errors["code"] = "This ward already has a tier with that code."
		return true, nil
	case wardload.EINVALID:
		form.Errors[fieldOr(err, "label")] = wardload.ErrorMessage(err)
		return true, nil
	}
	return false, err
}

// handleTierCreate adds an acuity tier to the ward.
func (s *Server) handleTierCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	form, order := tierInput(r, d, true)
	t := &wardload.Tier{WardID: d.ward.ID, Code: form.Code, Label: form.Label, Description: form.Description, DisplayOrder: order}
	addInvalid(form.Errors, t.Validate(), "label")
	if len(form.Errors) > 0 {
		return s.renderTierError(w, r, d, form, "")
	}
	if err := s.store.CreateTier(r.Context(), t); err != nil {
		if shown, err := tierStoreError(err, form); !shown {
			return fmt.Errorf("tier create: %w", err)
		}
		return s.renderTierError(w, r, d, form, "")
	}
	return s.settingsSaved(w, r, "tier "+t.Code, web.TierAnchor(strconv.FormatInt(t.ID, 10)))
}

// handleTierUpdate changes a tier's label, description and order; its
// code stays, since census and observations refer to it.
func (s *Server) handleTierUpdate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return err
	}
	id, err := idParam(chi.URLParam(r, "id"), "tier")
	if err != nil {
		return err
	}
	cur, err := d.tier(id)
	if err != nil {
		return err
	}
	idText := strconv.FormatInt(id, 10)
	form, order := tierInput(r, d, false)
	if strings.TrimSpace(form.Order) == "" {
		order = cur.DisplayOrder // empty keeps the tier where it is
	}
	next := *cur
	next.Label, next.Description, next.DisplayOrder = form.Label, form.Description, order
	addInvalid(form.Errors, next.Validate(), "label")
	if len(form.Errors) > 0 {
		return s.renderTierError(w, r, d, form, idText)
	}
	upd := wardload.TierUpdate{Label: &form.Label, Description: &form.Description, DisplayOrder: &order}
	if _, err := s.store.UpdateTier(r.Context(), id, upd); err != nil {
		if shown, err := tierStoreError(err, form); !shown {
			return fmt.Errorf("tier update: %w", err)
		}
		return s.renderTierError(w, r, d, form, idText)
	}
	return s.settingsSaved(w, r, "tier "+cur.Code, web.TierAnchor(idText))
}
