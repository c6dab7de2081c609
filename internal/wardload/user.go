package wardload

import (
	"context"
	"regexp"
	"slices"
	"time"
)

// Roles. A charge nurse enters and corrects census and sees projections of
// their wards; a manager does everything on their wards; an admin does
// everything everywhere. The staffing office reads the shift lists,
// projections, the board and exports of its wards (an admin gives it
// every ward for a hospital-wide office) and manages its own API tokens;
// it changes no census, settings or observations.
const (
	RoleChargeNurse    = "charge_nurse"
	RoleManager        = "manager"
	RoleAdmin          = "admin"
	RoleStaffingOffice = "staffing_office"
)

// Roles lists every role, in the order forms offer them.
var Roles = []string{RoleChargeNurse, RoleManager, RoleStaffingOffice, RoleAdmin}

// ValidRole reports whether r is a known role.
func ValidRole(r string) bool {
	return slices.Contains(Roles, r)
}

var userNamePattern = regexp.MustCompile(`^[a-z0-9][a-z0-9._-]{1,39}$`)

// User is a person who signs in to wardload. Staff accounts only; patients
// never appear here.
type User struct {
	ID           int64
	Name         string // sign-in name, lowercase, e.g. "a.murphy"
	Role         string
	PasswordHash string // argon2id/bcrypt encoded hash; never the password
	Disabled     bool
	WardIDs      []int64 // ward memberships, ascending
	CreatedAt    time.Time
	// MustChangePassword is set by an administrator's reset: after signing
	// in, the user may only choose a new password (API tokens are not
	// affected).
	MustChangePassword bool
	// PasswordChanges counts the changes and resets of the password. A
	// session remembers the count it was signed in under, and ends when
	// the count has moved on (SessionCurrent): a change ends every other
	// session.
	PasswordChanges int64
}

// Validate checks the user's own fields.
func (u *User) Validate() error {
	if !userNamePattern.MatchString(u.Name) {
		return FieldErrorf(EINVALID, "name", "User name must be 2–40 lowercase letters, digits, '.', '-' or '_'.")
	}
	if !ValidRole(u.Role) {
		return FieldErrorf(EINVALID, "role", "Role must be charge_nurse, manager, staffing_office or admin.")
	}
	if u.PasswordHash == "" {
		return FieldErrorf(EINVALID, "password", "A password is required.")
	}
	return nil
}

// MemberOf reports whether the user may see ward id: admins see every ward.
func (u *User) MemberOf(wardID int64) bool {
	if u.Role == RoleAdmin {
		return true
	}
	for _, id := range u.WardIDs {
		if id == wardID {
			return true
		}
	}
	return false
}

// UserFilter selects users. Zero fields do not filter.
type UserFilter struct {
	ID     *int64
	Name   *string
	Role   *string
	WardID *int64
	Offset int
	Limit  int
}

// UserUpdate holds the fields of a user that may change.
type UserUpdate struct {
	Role         *string
	PasswordHash *string
	Disabled     *bool
	WardIDs      []int64 // nil leaves memberships unchanged; empty clears them
	// MustChangePassword sets or clears the user's flag (an admin reset
	// sets it; the user's own change clears it).
	MustChangePassword *bool
}

// Apply returns a copy of u with upd applied, its ward memberships as
// WardIDSet gives them, or EINVALID naming the field if the result is not
// a valid user. u is not changed; the store checks that the wards exist.
//
// Setting a password counts as a password change (PasswordChanges goes up
// by one, which ends the user's other sessions), and is refused with
// EINVALID on "password" for an account that is disabled and stays so:
// enable it in the same update, or first.
func (upd UserUpdate) Apply(u *User) (*User, error) {
	out := *u
	setIf(&out.Role, upd.Role)
	setIf(&out.PasswordHash, upd.PasswordHash)
	setIf(&out.Disabled, upd.Disabled)
	setIf(&out.MustChangePassword, upd.MustChangePassword)
	if upd.WardIDs != nil {
		out.WardIDs = WardIDSet(upd.WardIDs)
	}
	if upd.PasswordHash != nil {
		if u.Disabled && out.Disabled {
			return nil, FieldErrorf(EINVALID, "password", "The account %s is disabled: enable it before setting a new password.", u.Name)
		}
		out.PasswordChanges++
	}
	return validated(&out)
}

// SessionCurrent reports whether a session signed in when the user's
// PasswordChanges was changes is still valid: no password change or reset
// has happened since. Sessions from before the count existed hold 0, as
// do users whose password never changed.
func (u *User) SessionCurrent(changes int64) bool {
	return changes == u.PasswordChanges
}

// WardIDSet returns the ward IDs a user or token is linked to: ascending
// and without repeats; nil stays nil and empty stays empty. ids is not
// changed.
func WardIDSet(ids []int64) []int64 {
	out := slices.Clone(ids)
	slices.Sort(out)
	return slices.Compact(out)
}

// UnknownWard is the error for a membership naming a ward that does not
// exist: ENOTFOUND naming the field "wards".
func UnknownWard(id int64) error {
	return FieldErrorf(ENOTFOUND, "wards", "Ward %d not found.", id)
}

// UserService manages staff accounts.
type UserService interface {
	// CreateUser returns EINVALID, ENOTFOUND (a ward) or ECONFLICT (name taken).
	CreateUser(ctx context.Context, u *User) error
	// FindUserByID returns ENOTFOUND if there is no such user.
	FindUserByID(ctx context.Context, id int64) (*User, error)
	// FindUserByName returns ENOTFOUND if there is no such user.
	FindUserByName(ctx context.Context, name string) (*User, error)
	// FindUsers returns matches ordered by Name and the total count.
	FindUsers(ctx context.Context, f UserFilter) ([]*User, int, error)
	// UpdateUser returns ENOTFOUND or EINVALID.
	UpdateUser(ctx context.Context, id int64, upd UserUpdate) (*User, error)
}
