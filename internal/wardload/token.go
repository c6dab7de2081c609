package wardload

import (
	"context"
	"time"
)

// APIToken lets a roster planner read projections of some wards over the
// API. Only a hash of the secret is stored; the secret is shown once.
type APIToken struct {
	ID      int64
	Name    string // unique, e.g. "roster-planner"
	Hash    string // hex SHA-256 of the secret
	WardIDs []int64
	// WriteStaffing lets the token also send the planned staff of its
	// wards' shifts (PlannedStaffService); nothing else it can change.
	// Tokens are read-only without it, as every token made before it was.
	WriteStaffing bool
	CreatedBy     int64 // user ID, 0 for the command line
	CreatedAt     time.Time
	LastUsedAt    time.Time // zero if never used
	RevokedAt     time.Time // zero if active
}

// Active reports whether the token may still be used.
func (t *APIToken) Active() bool { return t.RevokedAt.IsZero() }

// Revoked returns a copy of t revoked at at, or ECONFLICT if t is already
// revoked. t is not changed.
func (t *APIToken) Revoked(at time.Time) (*APIToken, error) {
	if !t.Active() {
		return nil, Errorf(ECONFLICT, "This token is already revoked.")
	}
	out := *t
	out.RevokedAt = at
	return &out, nil
}

// Validate checks the token's own fields.
func (t *APIToken) Validate() error {
	// The name itself, not a trimmed copy: the name is stored as given.
	if !ValidCode(t.Name) {
		return FieldErrorf(EINVALID, "name", "Token name must be 1–32 lowercase letters, digits, '-' or '_'.")
	}
	if len(t.Hash) != 64 {
		return FieldErrorf(EINVALID, "hash", "Token hash is missing.")
	}
	if len(t.WardIDs) == 0 {
		return FieldErrorf(EINVALID, "wards", "A token needs at least one ward.")
	}
	return nil
}

// TokenService manages API tokens.
type TokenService interface {
	// CreateToken returns EINVALID, ENOTFOUND (a ward) or ECONFLICT (name taken).
	CreateToken(ctx context.Context, t *APIToken) error
	// FindTokenByHash returns the token with that hash, revoked or not, or ENOTFOUND.
	FindTokenByHash(ctx context.Context, hash string) (*APIToken, error)
	// FindTokenByName returns ENOTFOUND if there is no such token.
	FindTokenByName(ctx context.Context, name string) (*APIToken, error)
	// FindTokens returns tokens ordered by Name; wardID 0 returns all.
	FindTokens(ctx context.Context, wardID int64) ([]*APIToken, error)
	// RevokeToken sets RevokedAt. Returns ENOTFOUND, or ECONFLICT if already revoked.
	RevokeToken(ctx context.Context, id int64) error
	// TouchToken records a use at time at. Not audited.
	TouchToken(ctx context.Context, id int64, at time.Time) error
}
