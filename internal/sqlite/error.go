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

// uniqueConflicts names, per constrained column list, the field and the
// message a user sees. The service code checks most of these first; this
// catches the race where two writers pass the check together, and anything
// a check forgot.
var uniqueConflicts = map[string]*wardload.Error{
	"wards.code":                                 wardload.FieldErrorf(wardload.ECONFLICT, "code", "A ward with this code already exists."),
	"tiers.ward_id,tiers.code":                   wardload.FieldErrorf(wardload.ECONFLICT, "code", "The ward already has a tier with this code."),
	"shift_patterns.ward_id,shift_patterns.name": wardload.FieldErrorf(wardload.ECONFLICT, "name", "The ward already has a shift with this name."),
	"users.name":                                 wardload.FieldErrorf(wardload.ECONFLICT, "name", "A user with this name already exists."),
	"api_tokens.name":                            wardload.FieldErrorf(wardload.ECONFLICT, "name", "A token with this name already exists."),
	"api_tokens.hash":                            wardload.FieldErrorf(wardload.ECONFLICT, "hash", "This token secret is already in use; generate a new one."),
	"census.ward_id,census.date,census.shift_id,census.revision": wardload.Errorf(wardload.ECONFLICT, "Someone else saved this census at the same moment; please try again."),
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
	if se.Code()&0xff == sqlite3.SQLITE_FULL {
		// The disk (or max_page_count) is full: the transaction was
		// rolled back, so nothing of it was saved.
		return wardload.Unavailable(wardload.EFULL, err)
	}
	switch se.Code() {
	case sqlite3.SQLITE_CONSTRAINT_UNIQUE, sqlite3.SQLITE_CONSTRAINT_PRIMARYKEY:
		if m := uniqueColumns.FindStringSubmatch(se.Error()); m != nil {
			if e, ok := uniqueConflicts[strings.ReplaceAll(m[1], ", ", ",")]; ok {
				return e
			}
		}
		return wardload.Errorf(wardload.ECONFLICT, "This entry already exists.")
	case sqlite3.SQLITE_CONSTRAINT_FOREIGNKEY:
		// SQLite does not say which reference failed.
		return wardload.Errorf(wardload.ENOTFOUND, "A ward, tier, shift or user referred to does not exist.")
	case sqlite3.SQLITE_CONSTRAINT_CHECK, sqlite3.SQLITE_CONSTRAINT_NOTNULL:
		return wardload.Errorf(wardload.EINVALID, "A value is missing or out of range.")
	}
	return err
}
