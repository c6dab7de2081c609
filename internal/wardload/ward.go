package wardload

import (
	"context"
	"regexp"
	"strings"
	"sync"
	"time"
)

// codePattern is what ward, tier and factor codes look like: short, lowercase,
// no spaces. Codes are identifiers, not free text, so nothing about a patient
// can be typed into them.
var codePattern = regexp.MustCompile(`^[a-z0-9][a-z0-9_-]{0,31}$`)

// ValidCode reports whether s is a valid ward, tier or factor code.
func ValidCode(s string) bool { return codePattern.MatchString(s) }

// Ward is a nursing unit. Its time zone decides what "today" and "the
// current shift" mean and how long a dated shift really is.
type Ward struct {
	ID       int64
	Code     string // unique, e.g. "w4-north"
	Name     string // display name, e.g. "Ward 4 North (Medicine)"
	TimeZone string // IANA name, e.g. "Europe/Dublin"
	// FactorNames are the numeric patient factors this ward records with
	// an observation (e.g. "dependency_score"). Codes, never free text.
	FactorNames []string
	CreatedAt   time.Time
	// RetiredAt is when an admin retired the ward; zero while it is in
	// use. A retired ward keeps all its history (see retire.go).
	RetiredAt time.Time `json:",omitzero"`
}

// Validate checks the ward's fields. It returns EINVALID naming the field.
func (w *Ward) Validate() error {
	if !ValidCode(w.Code) {
		return FieldErrorf(EINVALID, "code", "Ward code must be 1–32 lowercase letters, digits, '-' or '_'.")
	}
	if strings.TrimSpace(w.Name) == "" || len(w.Name) > 120 {
		return FieldErrorf(EINVALID, "name", "Ward name is required (at most 120 characters).")
	}
	if !plainText(w.Name, "") {
		return FieldErrorf(EINVALID, "name", "Ward name must be one line of text, without control characters.")
	}
	if !startsAlnum(w.Name) {
		return FieldErrorf(EINVALID, "name", "Ward name must begin with a letter or digit.")
	}
	if _, err := w.Location(); err != nil {
		return err
	}
	seen := map[string]bool{}
	for _, f := range w.FactorNames {
		if !ValidCode(f) {
			return FieldErrorf(EINVALID, "factor_names", "Factor name %q must be a lowercase code.", f)
		}
		if seen[f] {
			return FieldErrorf(EINVALID, "factor_names", "Factor name %q is listed twice.", f)
		}
		seen[f] = true
	}
	return nil
}

// Location loads the ward's time zone. It returns EINVALID for an empty or
// unknown IANA name ("Local" is refused: it would depend on the server).
func (w *Ward) Location() (*time.Location, error) {
	if w.TimeZone == "" || w.TimeZone == "Local" {
		return nil, FieldErrorf(EINVALID, "time_zone", "Time zone is required (an IANA name such as Europe/Dublin).")
	}
	if loc, ok := locations.Load(w.TimeZone); ok {
		return loc.(*time.Location), nil
	}
	loc, err := time.LoadLocation(w.TimeZone)
	if err != nil {
		return nil, FieldErrorf(EINVALID, "time_zone", "Unknown time zone %q.", w.TimeZone)
	}
	locations.Store(w.TimeZone, loc)
	return loc, nil
}

// locations caches time.LoadLocation by IANA name: loading reads and
// parses the zone file each time, and pages format several times per
// request. A *time.Location is immutable, and the cache holds at most one
// entry per zone name that loaded successfully, so it stays small.
var locations sync.Map // string → *time.Location

// WardFilter selects wards. Zero fields do not filter.
type WardFilter struct {
	ID     *int64
	Code   *string
	UserID *int64 // only wards this user is a member of
	// ActiveOnly leaves out retired wards.
	ActiveOnly bool
	Offset     int
	Limit      int
}

// WardUpdate holds the fields of a ward that may change. The code never
// changes: it is in addresses, API tokens' scopes and exported files.
type WardUpdate struct {
	Name        *string
	TimeZone    *string
	FactorNames []string // nil leaves them unchanged
	// Retired true retires the ward (from now, unless it already is);
	// false reinstates it.
	Retired *bool
}

// Apply returns a copy of w with upd applied at now, or EINVALID naming
// the field if the result is not a valid ward. w is not changed.
func (upd WardUpdate) Apply(w *Ward, now time.Time) (*Ward, error) {
	out := *w
	setIf(&out.Name, upd.Name)
	setIf(&out.TimeZone, upd.TimeZone)
	out.RetiredAt = retireAt(out.RetiredAt, upd.Retired, now)
	if upd.FactorNames != nil {
		out.FactorNames = append([]string(nil), upd.FactorNames...)
	}
	return validated(&out)
}

// WardService manages wards.
type WardService interface {
	// CreateWard stores a new ward and sets its ID and CreatedAt.
	// Returns EINVALID for bad fields and ECONFLICT if the code is taken.
	CreateWard(ctx context.Context, w *Ward) error
	// FindWardByID returns ENOTFOUND if there is no such ward.
	FindWardByID(ctx context.Context, id int64) (*Ward, error)
	// FindWardByCode returns ENOTFOUND if there is no such ward.
	FindWardByCode(ctx context.Context, code string) (*Ward, error)
	// FindWards returns matching wards ordered by code, and the total count
	// ignoring Offset and Limit.
	FindWards(ctx context.Context, f WardFilter) ([]*Ward, int, error)
	// UpdateWard applies upd and returns the new ward. It is audited as
	// RetireAction("ward", before.RetiredAt, after.RetiredAt).
	// Returns ENOTFOUND or EINVALID.
	UpdateWard(ctx context.Context, id int64, upd WardUpdate) (*Ward, error)
}

// Tier is one acuity tier of a ward: a class of patients with similar care
// needs. Codes are unique within a ward.
type Tier struct {
	ID           int64
	WardID       int64
	Code         string // e.g. "t1"
	Label        string // short label shown on forms
	Description  string // what a patient in this tier typically needs
	DisplayOrder int
	RetiredAt    time.Time `json:",omitzero"` // zero while in use; see retire.go
}

// Validate checks the tier's own fields (not that the ward exists).
func (t *Tier) Validate() error {
	if t.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if !ValidCode(t.Code) {
		return FieldErrorf(EINVALID, "code", "Tier code must be 1–32 lowercase letters, digits, '-' or '_'.")
	}
	if strings.TrimSpace(t.Label) == "" || len(t.Label) > 60 {
		return FieldErrorf(EINVALID, "label", "Tier label is required (at most 60 characters).")
	}
	if len(t.Description) > 500 {
		return FieldErrorf(EINVALID, "description", "Tier description is at most 500 characters.")
	}
	if !plainText(t.Label, "") {
		return FieldErrorf(EINVALID, "label", "Tier label must be one line of text, without control characters.")
	}
	if !startsAlnum(t.Label) {
		return FieldErrorf(EINVALID, "label", "Tier label must begin with a letter or digit.")
	}
	if !plainText(t.Description, "\n\r\t") {
		return FieldErrorf(EINVALID, "description", "Tier description must be text without control characters.")
	}
	return nil
}

// TierUpdate holds the fields of a tier that may change.
type TierUpdate struct {
	Label        *string
	Description  *string
	DisplayOrder *int
	Retired      *bool // true retires the tier, false reinstates it
}

// Apply returns a copy of t with upd applied at now, or EINVALID naming
// the field if the result is not a valid tier. t is not changed.
func (upd TierUpdate) Apply(t *Tier, now time.Time) (*Tier, error) {
	out := *t
	out.RetiredAt = retireAt(out.RetiredAt, upd.Retired, now)
	setIf(&out.Label, upd.Label)
	setIf(&out.Description, upd.Description)
	setIf(&out.DisplayOrder, upd.DisplayOrder)
	return validated(&out)
}

// TierService manages the acuity tiers of wards.
type TierService interface {
	// CreateTier returns EINVALID, ENOTFOUND (ward) or ECONFLICT (code taken in the ward).
	CreateTier(ctx context.Context, t *Tier) error
	// FindTierByID returns ENOTFOUND if there is no such tier.
	FindTierByID(ctx context.Context, id int64) (*Tier, error)
	// FindTiers returns the ward's tiers, retired ones included, by
	// DisplayOrder then Code. Unknown ward: empty list.
	FindTiers(ctx context.Context, wardID int64) ([]*Tier, error)
	// UpdateTier returns ENOTFOUND or EINVALID; retiring the ward's last
	// active tier is EINVALID naming "retired" (CheckTierRetire).
	UpdateTier(ctx context.Context, id int64, upd TierUpdate) (*Tier, error)
}
