package wardload

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// StorableText reports whether s can be stored and searched for on every
// backend: valid UTF-8 without NUL. PostgreSQL refuses both in text
// values (SQLSTATE 22021), so a lookup or save with them failed as an
// internal error instead of a plain refusal. Check typed text that goes to
// the store with it.
func StorableText(s string) bool {
	return utf8.ValidString(s) && !strings.ContainsRune(s, 0)
}

// plainText reports whether s is storable and has no control characters
// (C0, DEL, C1) other than those in allow. Names are one line of text
// shown on pages, in the census chooser and in exports, where a tab or a
// carriage return is invisible and a newline breaks the line.
func plainText(s, allow string) bool {
	if !StorableText(s) {
		return false
	}
	for _, r := range s {
		if unicode.IsControl(r) && !strings.ContainsRune(allow, r) {
			return false
		}
		// Bidirectional overrides and isolates (U+202A–U+202E, U+2066–U+2069)
		// can make a name display as something else, e.g. in the audit log.
		if (r >= 0x202A && r <= 0x202E) || (r >= 0x2066 && r <= 0x2069) {
			return false
		}
	}
	return true
}

// startsAlnum reports whether s begins with a letter or a digit (any
// script, so "Ärztliche" and "３病棟" pass). Names and labels are shown in
// exports that spreadsheets open; a name starting with '=', '+', '-', '@',
// a space or a full-width form of these could be read as a formula there
// (OWASP "CSV Injection"), so names may not start that way. The export
// still neutralises such cells for data stored before this rule.
func startsAlnum(s string) bool {
	r, _ := utf8.DecodeRuneInString(s)
	return unicode.IsLetter(r) || unicode.IsDigit(r)
}
