package server

import (
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"net/http"
	"slices"
	"strings"

	"wardload/internal/wardload"
)

// tokenPrefix marks wardload API token secrets, so that a secret pasted
// into the wrong place (a ticket, a log) is recognisable and can be revoked.
const tokenPrefix = "wlk_"

// NewTokenSecret returns a fresh API token secret (32 random bytes,
// base64url, after tokenPrefix) and the hash the store keeps of it.
func NewTokenSecret() (secret, hash string) {
	var b [32]byte
	rand.Read(b[:]) // never fails (crypto/rand panics instead)
	secret = tokenPrefix + base64.RawURLEncoding.EncodeToString(b[:])
	return secret, TokenHash(secret)
}

// TokenHash is the hex SHA-256 of a token secret. A fast hash is enough
// here: the secret has 256 random bits, so there is nothing to guess.
func TokenHash(secret string) string {
	sum := sha256.Sum256([]byte(secret))
	return hex.EncodeToString(sum[:])
}

// requireToken is the guard of API routes: a bearer token only, never a
// session cookie, so a browser cannot be tricked into calling the API.
// Missing, malformed, unknown and revoked tokens are all 401 with
// WWW-Authenticate; a token without the route's ward, or without the
// staffing write permission a WriteStaffing route needs, is 403.
func (s *Server) requireToken(rt Route, next http.Handler) http.Handler {
	return s.handle(func(w http.ResponseWriter, r *http.Request) error {
		refuse := func() error {
			w.Header().Set("WWW-Authenticate", `Bearer realm="wardload", error="invalid_token"`)
			return wardload.Errorf(wardload.EUNAUTHORIZED, "A valid API token is required (Authorization: Bearer <token>).")
		}
		auth := r.Header.Get("Authorization")
		scheme, secret, ok := strings.Cut(auth, " ")
		secret = strings.TrimSpace(secret)
		if !ok || !strings.EqualFold(scheme, "Bearer") || !strings.HasPrefix(secret, tokenPrefix) || len(secret) > 100 {
			return refuse()
		}
		t, err := s.store.FindTokenByHash(r.Context(), TokenHash(secret))
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return refuse()
		} else if err != nil {
			return err
		}
		if !t.Active() {
			// A revoked token still in use is worth a look: the planner
			// was not updated, or the secret went somewhere it should not.
			s.auditEvent(r, wardload.Actor{Name: "token:" + t.Name}, "api.refused", "token", t.ID, 0, map[string]string{"reason": "revoked"})
			return refuse()
		}
		p := &principal{Token: t}
		if rt.Access.WardScoped {
			if p.Ward, err = s.scopedWard(r); err != nil {
				return err
			}
			if !slices.Contains(t.WardIDs, p.Ward.ID) {
				return wardload.Errorf(wardload.EFORBIDDEN, "This token may not read this ward.")
			}
		}
		if rt.Access.WriteStaffing && !t.WriteStaffing {
			return wardload.Errorf(wardload.EFORBIDDEN, "This token may only read; a token that may send planned staff is needed.")
		}
		if err := s.store.TouchToken(r.Context(), t.ID, s.now()); err != nil {
			return err
		}
		ctx := wardload.WithActor(withPrincipal(r.Context(), p), wardload.Actor{Name: "token:" + t.Name})
		next.ServeHTTP(w, r.WithContext(ctx))
		return nil
	})
}
