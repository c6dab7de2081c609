package server

import (
	"fmt"
	"net/http"
	"strconv"

	"wardload/internal/wardload"
	"wardload/web"
)

// The admin edits a ward's name, time zone and beds, and retires or
// reinstates it, at wardEditURL; the code never changes (it is in
// addresses, API token scopes and exported files). Every change is
// audited by the store.

// wardEditVM is the edit form showing what is stored.
func (s *Server) wardEditVM(r *http.Request, ward *wardload.Ward) (web.WardNewVM, error) {
	st, err := s.store.FindSettings(r.Context(), ward.ID)
	if err != nil {
		return web.WardNewVM{}, fmt.Errorf("ward edit: settings: %w", err)
	}
	vm := web.WardNewVM{Edit: true, Code: ward.Code, Name: ward.Name, TimeZone: ward.TimeZone, Errors: map[string]string{}}
	if st.Beds > 0 {
		vm.Beds = strconv.Itoa(st.Beds)
	}
	return withWardLinks(vm, ward), nil
}

// withWardLinks adds the edit page's addresses and its retire form.
func withWardLinks(vm web.WardNewVM, ward *wardload.Ward) web.WardNewVM {
	vm.Edit, vm.Code, vm.ActionURL, vm.SetupURL = true, ward.Code, wardAdminURL(ward), setupURL(ward)
	vm.Retire = retireVM("ward", wardAdminURL(ward), "ward "+ward.Code, ward.RetiredAt, ward)
	vm.Retire.Confirm = true
	return vm
}

// handleWardEdit shows the admin's form for the ward.
func (s *Server) handleWardEdit(w http.ResponseWriter, r *http.Request) error {
	vm, err := s.wardEditVM(r, principalFrom(r.Context()).Ward)
	if err != nil {
		return err
	}
	vm.Notice = s.sessions.PopString(r.Context(), sessFlash)
	return s.renderWardNew(w, r, http.StatusOK, vm)
}

// handleWardUpdate saves the ward's name and time zone (store: audited
// ward.update) and, when they changed, its beds (audited settings.save).
// Everything is checked first, so a refusal changes nothing.
func (s *Server) handleWardUpdate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	cur := principalFrom(r.Context()).Ward
	next, form, beds := wardForm(r, *cur, false)
	form = withWardLinks(form, cur)
	if len(form.Errors) > 0 {
		return s.renderWardNew(w, r, http.StatusBadRequest, form)
	}
	st, err := s.store.FindSettings(r.Context(), cur.ID)
	if err != nil {
		return fmt.Errorf("ward update: settings: %w", err)
	}
	// Only what changed is written, so the audit log holds no empty
	// changes.
	if next.Name != cur.Name || next.TimeZone != cur.TimeZone {
		if _, err := s.store.UpdateWard(r.Context(), cur.ID, wardload.WardUpdate{Name: &next.Name, TimeZone: &next.TimeZone}); err != nil {
			if wardload.ErrorCode(err) == wardload.EINVALID {
				form.Errors[fieldOr(err, "name")] = wardload.ErrorMessage(err)
				return s.renderWardNew(w, r, http.StatusBadRequest, form)
			}
			return fmt.Errorf("ward update: %w", err)
		}
	}
	flash := "Saved: ward " + cur.Code + "."
	if beds != st.Beds {
		st.Beds, st.UpdatedBy = beds, principalFrom(r.Context()).User.ID
		if err := s.store.SaveSettings(r.Context(), st); err != nil {
			s.log.Error("ward update: beds not saved", "request_id", RequestID(r.Context()), "ward", cur.Code, "err", err)
			flash = "Saved: ward " + cur.Code + ", but not its beds: enter them on its settings page."
		}
	}
	s.sessions.Put(r.Context(), sessFlash, flash)
	return seeOther(w, r, wardEditURL(cur))
}

// handleWardRetire retires the ward once the admin ticked the
// confirmation: no new census, hidden from lists but the admins'; nothing
// is deleted.
func (s *Server) handleWardRetire(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	ward := principalFrom(r.Context()).Ward
	if r.PostForm.Get("confirm") != "yes" {
		vm, err := s.wardEditVM(r, ward)
		if err != nil {
			return err
		}
		vm.Retire.Error = "Tick \"Yes, retire ward " + ward.Code + "\" to confirm. Nothing was changed."
		return s.renderWardNew(w, r, http.StatusBadRequest, vm)
	}
	return s.setWardRetired(w, r, ward, true)
}

// handleWardReinstate puts a retired ward back in use.
func (s *Server) handleWardReinstate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	return s.setWardRetired(w, r, principalFrom(r.Context()).Ward, false)
}

func (s *Server) setWardRetired(w http.ResponseWriter, r *http.Request, ward *wardload.Ward, retired bool) error {
	if _, err := s.store.UpdateWard(r.Context(), ward.ID, wardload.WardUpdate{Retired: &retired}); err != nil {
		return fmt.Errorf("ward retire: %w", err)
	}
	msg := "Ward " + ward.Code + " was reinstated: it takes census again."
	if retired {
		msg = "Ward " + ward.Code + " was retired. Its history stays readable; it can be reinstated here."
	}
	s.sessions.Put(r.Context(), sessFlash, msg)
	return seeOther(w, r, wardEditURL(ward))
}
