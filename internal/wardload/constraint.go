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
	// UniqueShiftRecordRevision: one end-of-shift record per ward, date, shift and revision.
	UniqueShiftRecordRevision = "shift_record.revision"
)

var uniqueErrors = map[string]struct{ field, msg string }{
	UniqueWardCode:            {"code", "A ward with this code already exists."},
	UniqueTierCode:            {"code", "The ward already has a tier with this code."},
	UniqueShiftName:           {"name", "The ward already has a shift with this name."},
	UniqueUserName:            {"name", "A user with this name already exists."},
	UniqueTokenName:           {"name", "A token with this name already exists."},
	UniqueTokenHash:           {"hash", "This token secret is already in use; generate a new one."},
	UniqueCensusRevision:      {"", "Someone else saved this census at the same moment; please try again."},
	UniqueRatioFloor:          {"floors", "A shift has two ratio floors for the same tier."},
	UniqueShiftRecordRevision: {"", "Someone else saved this end-of-shift record at the same moment; please try again."},
}

// ConstraintKind is a kind of database constraint failure.
type ConstraintKind int

// Kinds of constraint failure a store reports with ConstraintError.
const (
	ConstraintUnique      ConstraintKind = iota + 1 // a unique rule was broken
	ConstraintReference                             // a referenced row does not exist
	ConstraintRange                                 // a value is missing or out of range
	ConstraintConcurrency                           // a concurrent change won
)

// ConstraintError returns the error a user reads for a database
// constraint failure of kind (a Constraint* constant). For a unique
// failure, rule is the Unique* rule broken, naming the field that clashed;
// "" or an unknown rule gives a general message.
func ConstraintError(kind ConstraintKind, rule string) error {
	switch kind {
	case ConstraintUnique:
		if u, ok := uniqueErrors[rule]; ok {
			return FieldErrorf(ECONFLICT, u.field, "%s", u.msg)
		}
		return Errorf(ECONFLICT, "This entry already exists.")
	case ConstraintReference:
		// The database does not always say which reference failed.
		return Errorf(ENOTFOUND, "A ward, tier, shift or user referred to does not exist.")
	case ConstraintRange:
		return Errorf(EINVALID, "A value is missing or out of range.")
	case ConstraintConcurrency:
		return Errorf(ECONFLICT, "A concurrent change won; please try again.")
	}
	return Errorf(EINTERNAL, "Internal error.")
}
