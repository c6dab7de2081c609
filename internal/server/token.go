package server

import (
	"context"
	"fmt"
	"net/http"
	"strings"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
	"wardload/web"
)

// handleTokens lists the ward's API tokens. Right after a create it shows
// the new secret, once: the sealed secret is popped from the session, so a
// reload no longer has it.
func (s *Server) handleTokens(w http.ResponseWriter, r *http.Request) error {
	vm := web.TokensVM{}
	ctx := r.Context()
	vm.Notice = s.sessions.PopString(ctx, sessFlash)
	vm.NewName, vm.NewSecret, vm.SecretLost = s.popTokenSecret(ctx)
	return s.renderTokens(w, r, http.StatusOK, vm)
}

func (s *Server) renderTokens(w http.ResponseWriter, r *http.Request, status int, vm web.TokensVM) error {
	ward := principalFrom(r.Context()).Ward
	ts, err := s.store.FindTokens(r.Context(), ward.ID)
	if err != nil {
		return fmt.Errorf("tokens: %w", err)
	}
	codes, err := s.wardCodes(r)
	if err != nil {
		return err
	}
	vm.WardName = ward.Name
	vm.CreateURL = tokensURL(ward)
	for _, t := range ts {
		row := web.TokenRowVM{
			Name:      t.Name,
			CreatedAt: formatAt(t.CreatedAt),
			LastUsed:  "never",
			RevokeURL: fmt.Sprintf("/wards/%s/tokens/%d/revoke", ward.Code, t.ID),
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
	return s.render(w, r, status, web.TokensPage(s.layout(r, "API tokens"), vm))
}

// handleTokenCreate makes a token for this ward. The secret goes to the
// next page view sealed in the session; the store gets only its hash.
func (s *Server) handleTokenCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	p := principalFrom(r.Context())
	name := strings.TrimSpace(r.PostForm.Get("name"))
	secret, hash := NewTokenSecret()
	t := &wardload.APIToken{Name: name, Hash: hash, WardIDs: []int64{p.Ward.ID}, CreatedBy: p.User.ID}
	if err := s.store.CreateToken(r.Context(), t); err != nil {
		switch wardload.ErrorCode(err) {
		case wardload.EINVALID, wardload.ECONFLICT:
			msg := wardload.ErrorMessage(err)
			if wardload.ErrorCode(err) == wardload.ECONFLICT {
				msg = "A token with this name exists already (names are unique across wards)."
			}
			return s.renderTokens(w, r, http.StatusBadRequest, web.TokensVM{FormName: clip(name, 32), Error: msg})
		}
		return fmt.Errorf("token create: %w", err)
	}
	s.putTokenSecret(r.Context(), t.Name, secret)
	return seeOther(w, r, tokensURL(p.Ward))
}

// handleTokenRevoke revokes a token of this ward.
func (s *Server) handleTokenRevoke(w http.ResponseWriter, r *http.Request) error {
	ward := principalFrom(r.Context()).Ward
	id, err := idParam(chi.URLParam(r, "id"), "token")
	if err != nil {
		return err
	}
	ts, err := s.store.FindTokens(r.Context(), ward.ID)
	if err != nil {
		return fmt.Errorf("token revoke: %w", err)
	}
	var t *wardload.APIToken
	for _, x := range ts {
		if x.ID == id {
			t = x
		}
	}
	if t == nil {
		return wardload.Errorf(wardload.ENOTFOUND, "There is no such token on this ward.")
	}
	if err := s.store.RevokeToken(r.Context(), t.ID); err != nil && wardload.ErrorCode(err) != wardload.ECONFLICT {
		return fmt.Errorf("token revoke: %w", err)
	}
	s.sessions.Put(r.Context(), sessFlash, "Token "+t.Name+" is revoked.")
	return seeOther(w, r, tokensURL(ward))
}

// wardCodes maps every ward's ID to its code.
func (s *Server) wardCodes(r *http.Request) (map[int64]string, error) {
	ws, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{})
	if err != nil {
		return nil, fmt.Errorf("find wards: %w", err)
	}
	m := make(map[int64]string, len(ws))
	for _, w := range ws {
		m[w.ID] = w.Code
	}
	return m, nil
}

// putTokenSecret keeps a new token's secret, sealed, in the session for
// the one page that shows it after the create's redirect.
func (s *Server) putTokenSecret(ctx context.Context, name, secret string) {
	s.sessions.Put(ctx, sessSecret, name+":"+s.sealer.Seal(secret))
}

// popTokenSecret takes the secret putTokenSecret kept, once; lost is true
// when it was kept but cannot be unsealed.
func (s *Server) popTokenSecret(ctx context.Context) (name, secret string, lost bool) {
	sealed := s.sessions.PopString(ctx, sessSecret)
	if sealed == "" {
		return "", "", false
	}
	name, secretSealed, _ := strings.Cut(sealed, ":")
	secret, err := s.sealer.Unseal(secretSealed)
	if err != nil {
		return "", "", true
	}
	return name, secret, false
}
