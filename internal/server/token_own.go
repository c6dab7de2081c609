package server

import (
	"fmt"
	"net/http"
	"slices"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
	"wardload/web"
)

// The reader's own API tokens (issue 10): a manager, the staffing office
// or an admin makes tokens for one or more of their wards in the browser,
// read-only or also allowed to send planned staff, and revokes the ones
// they made. The ward token pages (token.go) stay for managers.

// handleOwnTokens lists the tokens the signed-in person made. Right after
// a create it shows the new secret once, as handleTokens does.
func (s *Server) handleOwnTokens(w http.ResponseWriter, r *http.Request) error {
	vm := web.OwnTokensVM{}
	ctx := r.Context()
	vm.Notice = s.sessions.PopString(ctx, sessFlash)
	vm.NewName, vm.NewSecret, vm.SecretLost = s.popTokenSecret(ctx)
	return s.renderOwnTokens(w, r, http.StatusOK, vm, nil)
}

func (s *Server) renderOwnTokens(w http.ResponseWriter, r *http.Request, status int, vm web.OwnTokensVM, checked []int64) error {
	u := principalFrom(r.Context()).User
	wards, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{})
	if err != nil {
		return fmt.Errorf("own tokens: %w", err)
	}
	codes := make(map[int64]string, len(wards))
	for _, wd := range wards {
		codes[wd.ID] = wd.Code
		if u.MemberOf(wd.ID) {
			vm.Wards = append(vm.Wards, web.WardOptionVM{ID: strconv.FormatInt(wd.ID, 10), Code: wd.Code, Checked: slices.Contains(checked, wd.ID)})
		}
	}
	ts, err := s.store.FindTokens(r.Context(), 0)
	if err != nil {
		return fmt.Errorf("own tokens: %w", err)
	}
	for _, t := range ts {
		if t.CreatedBy != u.ID {
			continue
		}
		row := web.OwnTokenRowVM{Name: t.Name, CreatedAt: formatAt(t.CreatedAt), LastUsed: "never", Permission: "read",
			RevokeURL: fmt.Sprintf("/tokens/%d/revoke", t.ID)}
		if t.WriteStaffing {
			row.Permission = "read, send planned staff"
		}
		var ws []string
		for _, id := range t.WardIDs {
			ws = append(ws, codes[id])
		}
		row.Wards = strings.Join(ws, ", ")
		if !t.LastUsedAt.IsZero() {
			row.LastUsed = formatAt(t.LastUsedAt)
		}
		if !t.Active() {
			row.Revoked = formatAt(t.RevokedAt)
		}
		vm.Tokens = append(vm.Tokens, row)
	}
	return s.render(w, r, status, web.OwnTokensPage(s.layout(r, "Your API tokens"), vm))
}

// handleOwnTokenCreate makes a token for the wards ticked, each one the
// person may see; the secret goes to the next page view sealed in the
// session, the store gets only its hash.
func (s *Server) handleOwnTokenCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	u := principalFrom(r.Context()).User
	name := strings.TrimSpace(r.PostForm.Get("name"))
	write := r.PostForm.Get("write_staffing") == "1"
	var ids []int64
	refuse := func(msg string) error {
		return s.renderOwnTokens(w, r, http.StatusBadRequest, web.OwnTokensVM{FormName: clip(name, 32), FormWrite: write, Error: msg}, ids)
	}
	for _, v := range r.PostForm["ward"] {
		id, err := strconv.ParseInt(v, 10, 64)
		if err != nil || id <= 0 || !u.MemberOf(id) {
			return refuse("Choose only wards you belong to.")
		}
		ids = append(ids, id)
	}
	if len(ids) == 0 {
		return refuse("Choose at least one ward for the token.")
	}
	secret, hash := NewTokenSecret()
	t := &wardload.APIToken{Name: name, Hash: hash, WardIDs: ids, CreatedBy: u.ID, WriteStaffing: write}
	if err := s.store.CreateToken(r.Context(), t); err != nil {
		switch wardload.ErrorCode(err) {
		case wardload.ECONFLICT:
			return refuse("A token with this name exists already (names are unique across wards).")
		case wardload.EINVALID, wardload.ENOTFOUND:
			return refuse(wardload.ErrorMessage(err))
		}
		return fmt.Errorf("own token create: %w", err)
	}
	s.putTokenSecret(r.Context(), t.Name, secret)
	return seeOther(w, r, "/tokens")
}

// handleOwnTokenRevoke revokes a token the person made; anyone else's is
// not found.
func (s *Server) handleOwnTokenRevoke(w http.ResponseWriter, r *http.Request) error {
	u := principalFrom(r.Context()).User
	id, err := idParam(chi.URLParam(r, "id"), "token")
	if err != nil {
		return err
	}
	ts, err := s.store.FindTokens(r.Context(), 0)
	if err != nil {
		return fmt.Errorf("own token revoke: %w", err)
	}
	i := slices.IndexFunc(ts, func(t *wardload.APIToken) bool { return t.ID == id && t.CreatedBy == u.ID })
	if i < 0 {
		return wardload.Errorf(wardload.ENOTFOUND, "You have no such token.")
	}
	if err := s.store.RevokeToken(r.Context(), id); err != nil && wardload.ErrorCode(err) != wardload.ECONFLICT {
		return fmt.Errorf("own token revoke: %w", err)
	}
	s.sessions.Put(r.Context(), sessFlash, "Token "+ts[i].Name+" is revoked.")
	return seeOther(w, r, "/tokens")
}
