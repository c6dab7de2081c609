package sqlite

import (
	"errors"
	"regexp"
	"strings"

	"modernc.org/sqlite"
	sqlite3 "modernc.org/sqlite/lib"

	"wardload/internal/wardload"
)

// uniqueColumns finds "table.column, table.column" in a UNIQUE failure.
var uniqueColumns = regexp.MustCompile(`UNIQUE constraint failed: ([\w.]+(?:, [\w.]+)*)`)

// uniqueRules names, per constrained column list, the domain's unique
// rule, whose error says what a user reads. The service code checks most
// of these first; this catches the race where two writers pass the check
// together, and anything a check forgot.
var uniqueRules = map[string]string{
	"wards.code":                                 wardload.UniqueWardCode,
	"tiers.ward_id,tiers.code":                   wardload.UniqueTierCode,
	"shift_patterns.ward_id,shift_patterns.name": wardload.UniqueShiftName,
	"users.name":                                 wardload.UniqueUserName,
	"api_tokens.name":                            wardload.UniqueTokenName,
	"api_tokens.hash":                            wardload.UniqueTokenHash,
	"census.ward_id,census.date,census.shift_id,census.revision":                             wardload.UniqueCensusRevision,
	"shift_records.ward_id,shift_records.date,shift_records.shift_id,shift_records.revision": wardload.UniqueShiftRecordRevision,
}

// constraintKinds maps SQLite's extended result codes of constraint
// failures to the domain's kinds.
var constraintKinds = map[int]wardload.ConstraintKind{
	sqlite3.SQLITE_CONSTRAINT_UNIQUE:     wardload.ConstraintUnique,
	sqlite3.SQLITE_CONSTRAINT_PRIMARYKEY: wardload.ConstraintUnique,
	sqlite3.SQLITE_CONSTRAINT_FOREIGNKEY: wardload.ConstraintReference,
	sqlite3.SQLITE_CONSTRAINT_CHECK:      wardload.ConstraintRange,
	sqlite3.SQLITE_CONSTRAINT_NOTNULL:    wardload.ConstraintRange,
}

// formatError is the one place driver errors become domain errors. An
// *wardload.Error passes through; a constraint failure becomes a code and
// a message of our own; anything else stays an internal error, whose text
// wardload.ErrorMessage never shows to a user.
func formatError(err error) error {
	var se *sqlite.Error
	// nil, an application error (its code is not EINTERNAL) and anything
	// not from the driver pass through, as do failures other than
	// constraints.
	if wardload.ErrorCode(err) != wardload.EINTERNAL || !errors.As(err, &se) {
		return err
	}
	if se.Code()&0xff == sqlite3.SQLITE_FULL {
		// The disk (or max_page_count) is full: the transaction was
		// rolled back, so nothing of it was saved.
		return wardload.Unavailable(wardload.EFULL, err)
	}
	kind, ok := constraintKinds[se.Code()]
	if !ok {
		return err
	}
	var rule string
	if m := uniqueColumns.FindStringSubmatch(se.Error()); kind == wardload.ConstraintUnique && m != nil {
		rule = uniqueRules[strings.ReplaceAll(m[1], ", ", ",")]
	}
	return wardload.ConstraintError(kind, rule)
}
