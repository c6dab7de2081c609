package wardload

// Unique rules the stores enforce with database constraints. Each store
// maps its own constraint names to these, in its one error-mapping
// function; what a user reads when a rule is broken is written here, once.
const (
	UniqueWardCode       = "ward.code"       // a ward code is unique
	UniqueTierCode       = "tier.code"       // a tier code is unique within its ward
	UniqueShiftName      = "shift.name"      // a shift name is unique within its ward
	UniqueUserName       = "user.name"       // a user name is unique
	UniqueTokenName      = "token.name"      // a token name is unique
	UniqueTokenHash      = "token.hash"      // a token secret is unique
	UniqueCensusRevision = "census.revision" // one census per ward, date, shift and revision
	UniqueRatioFloor     = "settings.floor"  // one ratio floor per shift and tier
)

var uniqueErrors = map[string]struct{ field, msg string }{
	UniqueWardCode:       {"code", "A ward with this code already exists."},
	UniqueTierCode:       {"code", "The ward already has a tier with this code."},
	UniqueShiftName:      {"name", "The ward already has a shift with this name."},
	UniqueUserName:       {"name", "A user with this name already exists."},
	UniqueTokenName:      {"name", "A token with this name already exists."},
	UniqueTokenHash:      {"hash", "This token secret is already in use; generate a new one."},
	UniqueCensusRevision: {"", "Someone else saved this census at the same moment; please try again."},
	UniqueRatioFloor:     {"floors", "A shift has two ratio floors for the same tier."},
}

// UniqueError returns the ECONFLICT error for a broken unique rule (a
// Unique* constant), naming the field that clashed; "" or an unknown rule
// gives a general message.
func UniqueError(rule string) error {
	if u, ok := uniqueErrors[rule]; ok {
		return FieldErrorf(ECONFLICT, u.field, "%s", u.msg)
	}
	return Errorf(ECONFLICT, "This entry already exists.")
}

// ReferenceError is the error for a row referring to a ward, tier, shift
// or user that does not exist, when the database cannot say which.
func ReferenceError() error {
	return Errorf(ENOTFOUND, "A ward, tier, shift or user referred to does not exist.")
}

// RangeError is the error for a value a database check refused: missing
// or out of range.
func RangeError() error {
	return Errorf(EINVALID, "A value is missing or out of range.")
}

// ConcurrencyError is the error for a change that lost to a concurrent one.
func ConcurrencyError() error {
	return Errorf(ECONFLICT, "A concurrent change won; please try again.")
}
