package server

import (
	"fmt"
	"net/http"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
	"wardload/web"
)

// handleUsers lists every user with an edit form, and the create form.
func (s *Server) handleUsers(w http.ResponseWriter, r *http.Request) error {
	vm := web.UsersVM{Notice: s.sessions.PopString(r.Context(), sessFlash),
		Form: web.UserFormVM{Role: wardload.RoleChargeNurse}}
	return s.renderUsers(w, r, http.StatusOK, vm, nil, 0, "")
}

// renderUsers renders the page; checked are the create form's wards, and
// rowErr a message for the row of user rowID.
func (s *Server) renderUsers(w http.ResponseWriter, r *http.Request, status int, vm web.UsersVM, checked []int64, rowID int64, rowErr string) error {
	wards, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{})
	if err != nil {
		return fmt.Errorf("users: %w", err)
	}
	users, _, err := s.store.FindUsers(r.Context(), wardload.UserFilter{})
	if err != nil {
		return fmt.Errorf("users: %w", err)
	}
	boxes := func(ids []int64) []web.WardOptionVM {
		out := make([]web.WardOptionVM, 0, len(wards))
		for _, wd := range wards {
			out = append(out, web.WardOptionVM{ID: strconv.FormatInt(wd.ID, 10), Code: wd.Code, Checked: slices.Contains(ids, wd.ID)})
		}
		return out
	}
	vm.Roles = allRoles
	vm.Wards = boxes(checked)
	for _, u := range users {
		row := web.UserRowVM{ID: strconv.FormatInt(u.ID, 10), Name: u.Name, Role: u.Role, Disabled: u.Disabled,
			Wards: boxes(u.WardIDs), CreatedAt: formatAt(u.CreatedAt),
			UpdateURL: fmt.Sprintf("/admin/users/%d", u.ID)}
		if u.ID == rowID {
			row.Error = rowErr
		}
		vm.Users = append(vm.Users, row)
	}
	return s.render(w, r, status, web.UsersPage(s.layout(r, "Users"), vm))
}

// handleUserCreate creates a user with the password the admin typed.
func (s *Server) handleUserCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	name := strings.ToLower(strings.TrimSpace(r.PostForm.Get("name")))
	role := r.PostForm.Get("role")
	wardIDs, err := formWardIDs(r.PostForm)
	form := web.UserFormVM{Name: clip(name, 40), Role: role, Errors: map[string]string{}}
	invalid := func(err error) error {
		field := wardload.ErrorField(err)
		if field == "" {
			field = "name"
		}
		form.Errors[field] = wardload.ErrorMessage(err)
		return s.renderUsers(w, r, http.StatusBadRequest, web.UsersVM{Form: form}, wardIDs, 0, "")
	}
	if err != nil {
		return invalid(err)
	}
	pw := r.PostForm.Get("password")
	u := &wardload.User{Name: name, Role: role, PasswordHash: "pending", WardIDs: wardIDs}
	if err := u.Validate(); err != nil {
		return invalid(err)
	}
	if u.PasswordHash, err = s.cfg.Password.HashNew(pw, u.Name, ""); wardload.ErrorCode(err) == wardload.EINVALID {
		return invalid(err)
	} else if err != nil {
		return fmt.Errorf("user create: %w", err)
	}
	if err := s.store.CreateUser(r.Context(), u); err != nil {
		switch wardload.ErrorCode(err) {
		case wardload.ECONFLICT:
			return invalid(wardload.FieldErrorf(wardload.EINVALID, "name", "There is already a user called %s.", u.Name))
		case wardload.EINVALID, wardload.ENOTFOUND:
			field := wardload.ErrorField(err)
			if field == "wards" { // the store's name for the memberships; the form's is "ward"
				field = "ward"
			}
			return invalid(wardload.FieldErrorf(wardload.EINVALID, field, "%s", wardload.ErrorMessage(err)))
		}
		return fmt.Errorf("user create: %w", err)
	}
	s.sessions.Put(r.Context(), sessFlash, "User "+u.Name+" was created.")
	return seeOther(w, r, "/admin/users")
}

// handleUserUpdate changes a user's role, wards, disabled flag and,
// optionally, password. An admin cannot disable or demote themself, so
// that the last admin cannot lock everybody out by a slip.
func (s *Server) handleUserUpdate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	id, err := idParam(chi.URLParam(r, "id"), "user")
	if err != nil {
		return err
	}
	target, err := s.store.FindUserByID(r.Context(), id)
	if err != nil {
		return err
	}
	rowError := func(err error) error {
		return s.renderUsers(w, r, http.StatusBadRequest, web.UsersVM{Form: web.UserFormVM{Role: wardload.RoleChargeNurse}}, nil, id, wardload.ErrorMessage(err))
	}
	role := r.PostForm.Get("role")
	disabled := r.PostForm.Get("disabled") != ""
	wardIDs, err := formWardIDs(r.PostForm)
	if err != nil {
		return rowError(err)
	}
	if !wardload.ValidRole(role) {
		return rowError(wardload.FieldErrorf(wardload.EINVALID, "role", "Role must be charge_nurse, manager, staffing_office or admin."))
	}
	me := principalFrom(r.Context()).User
	if target.ID == me.ID && (disabled || role != wardload.RoleAdmin) {
		return rowError(wardload.Errorf(wardload.EINVALID, "You cannot disable yourself or give up your own admin role; ask another admin."))
	}
	upd := wardload.UserUpdate{Role: &role, Disabled: &disabled, WardIDs: wardIDs}
	if wardIDs == nil {
		upd.WardIDs = []int64{} // no box ticked: no wards
	}
	flash := "User " + target.Name + " was saved."
	if pw := r.PostForm.Get("password"); pw != "" {
		// An admin's reset is a temporary password: the user must choose
		// their own at next sign-in, and their sessions end. Admins change
		// their own on the account page, which asks for the current one.
		if target.ID == me.ID {
			return rowError(wardload.Errorf(wardload.EINVALID, "Change your own password with the Password link beside your name; it asks for your current one."))
		}
		h, err := s.cfg.Password.HashNew(pw, target.Name, target.PasswordHash)
		if wardload.ErrorCode(err) == wardload.EINVALID {
			return rowError(err)
		} else if err != nil {
			return fmt.Errorf("user update: %w", err)
		}
		upd.PasswordHash, upd.MustChangePassword = &h, new(true)
		flash = "User " + target.Name + " was saved with a temporary password: they were signed out and must choose a new one at their next sign-in."
	}
	if _, err := s.store.UpdateUser(r.Context(), id, upd); err != nil {
		switch wardload.ErrorCode(err) {
		case wardload.EINVALID, wardload.ENOTFOUND:
			return rowError(err)
		}
		return fmt.Errorf("user update: %w", err)
	}
	s.sessions.Put(r.Context(), sessFlash, flash)
	return seeOther(w, r, "/admin/users")
}

// formWardIDs reads the ticked ward boxes.
func formWardIDs(form url.Values) ([]int64, error) {
	var ids []int64
	for _, v := range form["ward"] {
		id, err := strconv.ParseInt(v, 10, 64)
		if err != nil || id <= 0 {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "ward", "Choose wards from the list.")
		}
		ids = append(ids, id)
	}
	if len(ids) > 1000 {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "ward", "Choose wards from the list.")
	}
	return ids, nil
}
