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
	"census.ward_id,census.date,census.shift_id,census.revision": wardload.UniqueCensusRevision,
}

// formatError is the one place driver errors become domain errors. An
// *wardload.Error passes through; a constraint failure becomes a code and
// a message of our own; anything else stays an internal error, whose text
// wardload.ErrorMessage never shows to a user.
func formatError(err error) error {
	if err == nil {
		return nil
	}
	var we *wardload.Error
	if errors.As(err, &we) {
		return err
	}
	var se *sqlite.Error
	if !errors.As(err, &se) {
		return err
	}
	switch se.Code() {
	case sqlite3.SQLITE_CONSTRAINT_UNIQUE, sqlite3.SQLITE_CONSTRAINT_PRIMARYKEY:
		var rule string
		if m := uniqueColumns.FindStringSubmatch(se.Error()); m != nil {
			rule = uniqueRules[strings.ReplaceAll(m[1], ", ", ",")]
		}
		return wardload.UniqueError(rule)
	case sqlite3.SQLITE_CONSTRAINT_FOREIGNKEY:
		// SQLite does not say which reference failed.
		return wardload.ReferenceError()
	case sqlite3.SQLITE_CONSTRAINT_CHECK, sqlite3.SQLITE_CONSTRAINT_NOTNULL:
		return wardload.RangeError()
	}
	return err
}
