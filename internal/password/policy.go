package password

import (
	"math"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/trustelem/zxcvbn"
	"github.com/trustelem/zxcvbn/match"
	"golang.org/x/text/unicode/norm"

	"wardload/internal/wardload"
)

// The password policy follows NIST SP 800-63B-4, "Digital Identity
// Guidelines: Authentication and Authenticator Management" (final, August
// 2025), section 3.1.1.2 (password verifiers):
//
//   - a password used as the only authentication factor SHALL be at least
//     15 characters long (MinLength), and verifiers SHOULD permit at least
//     64 (MaxLength is 256);
//   - verifiers SHALL NOT impose composition rules (no "one digit, one
//     symbol"), so there are none here;
//   - all printing ASCII characters, the space and Unicode characters
//     SHOULD be accepted, each Unicode code point counting as one
//     character, and Unicode SHOULD be normalised (NFKC or NFKD) before
//     hashing, so that the same password typed differently still matches;
//   - a new password SHALL be compared with a blocklist of commonly used,
//     expected or compromised values, and refused when it is on it
//     (weakness below, with the user name as an expected value).
//
// wardload passwords are the only factor, hence 15.
const (
	// MinLength is the shortest password HashNew accepts, in characters
	// (Unicode code points) after NFKC normalisation.
	MinLength = 15
	// MaxLength is the longest, in the same characters: long passphrases
	// are welcome, an essay is not.
	MaxLength = 256
	// maxInputBytes caps the input before normalisation, so that a huge
	// request cannot make NFKC or the strength estimate do a lot of work;
	// 256 characters of four bytes each fit.
	maxInputBytes = 4 * MaxLength
	// minGuesses is the strength estimate below which a password is
	// refused: 10^8 guesses is where zxcvbn's score 3 begins ("safely
	// unguessable: moderate protection from an offline slow-hash
	// scenario"). A common password, word, name, date, repeat, sequence
	// or keyboard walk counts as about as many guesses as its rank, so a
	// password built from a few of them falls short however long it is,
	// while two or three unrelated words pass.
	minGuesses = 1e8
	// chunkRunes is the length the estimate looks at in one go: its cost
	// grows faster than linearly (about 0.3 s for 256 characters), so a
	// long password is estimated in pieces of this many characters whose
	// guesses multiply. A piece alone is never stronger than in context,
	// except where one pattern spans two pieces, which errs towards
	// accepting a passphrase of more than 64 characters.
	chunkRunes = 64
)

// Normalize returns pw in Unicode normalisation form KC (UAX #15): a
// full-width "Ａ" becomes "A", "e" followed by a combining acute accent
// becomes "é". Hash and Verify apply it, as SP 800-63B-4 asks.
func Normalize(pw string) string {
	return norm.NFKC.String(pw)
}

// Check applies the policy to pw as a new password for the user called
// name, and returns it normalised. It fails with EINVALID on the field
// "password" when pw is not valid UTF-8, is shorter than MinLength or
// longer than MaxLength characters once normalised, is the user name (or
// only that name repeated, in any case, with or without punctuation), or
// is too easy to guess (weakness). Its messages never repeat the password.
func Check(pw, name string) (string, error) {
	invalid := func(format string, args ...any) (string, error) {
		return "", wardload.FieldErrorf(wardload.EINVALID, "password", format, args...)
	}
	if !utf8.ValidString(pw) {
		return invalid("The password must be text (valid UTF-8).")
	}
	if len(pw) > maxInputBytes {
		return invalid("The password must be at most %d characters long.", MaxLength)
	}
	n := Normalize(pw)
	switch count := utf8.RuneCountInString(n); {
	case count < MinLength:
		return invalid("The password must be at least %d characters long; a few unrelated words make a good one.", MinLength)
	case count > MaxLength:
		return invalid("The password must be at most %d characters long.", MaxLength)
	}
	if onlyName(n, name) {
		return invalid("The password must not be the user name.")
	}
	if w := weakness(n, name); w != "" {
		return invalid("This password is too easy to guess: %s. Choose a longer passphrase of unrelated words.", w)
	}
	return n, nil
}

// onlyName reports whether pw is name, or name repeated, once case,
// spaces and punctuation are set aside ("A.Murphy a.murphy" for
// "a.murphy").
func onlyName(pw, name string) bool {
	letters := func(s string) string {
		return strings.Map(func(r rune) rune {
			if unicode.IsLetter(r) || unicode.IsDigit(r) {
				return unicode.ToLower(r)
			}
			return -1
		}, s)
	}
	p, n := letters(pw), letters(name)
	if n == "" || p == "" || len(p)%len(n) != 0 {
		return false
	}
	return p == strings.Repeat(n, len(p)/len(n))
}

// weakness returns why pw is too easy to guess, or "" when it is not. It
// asks the zxcvbn estimator (github.com/trustelem/zxcvbn v1.0.1, a Go port
// giving the same results as Dropbox's zxcvbn 4.4.2, MIT licence), whose
// lists are the 30,000 most common passwords of the Xato "10 million
// passwords" corpus, English Wikipedia and film and television words, and
// US census names, plus patterns (repeats, sequences, keyboard walks,
// dates, l33t substitutions). The user name and its parts count as known
// words. The estimate is a pure function of its input: the same password
// always gets the same answer.
func weakness(pw, name string) string {
	inputs := []string{name, "wardload"}
	inputs = append(inputs, strings.FieldsFunc(name, func(r rune) bool { return r == '.' || r == '-' || r == '_' })...)
	var seq []*match.Match
	log10 := 0.0
	for _, piece := range chunks(pw, chunkRunes) {
		res := zxcvbn.PasswordStrength(piece, inputs)
		log10 += math.Log10(max(res.Guesses, 1))
		seq = append(seq, res.Sequence...)
	}
	if log10 >= math.Log10(minGuesses) {
		return ""
	}
	// Name the longest pattern found, in words the person can act on.
	kind, longest := "", -1
	for _, m := range seq {
		if l := m.J - m.I; l > longest && m.Pattern != "bruteforce" {
			kind, longest = describe(m.Pattern, m.DictionaryName), l
		}
	}
	if kind == "" {
		kind = "it is short for the kinds of characters it uses"
	}
	return kind
}

// chunks splits s into pieces of n runes (the last may be shorter).
func chunks(s string, n int) []string {
	var out []string
	for s != "" {
		i, count := 0, 0
		for i < len(s) && count < n {
			_, size := utf8.DecodeRuneInString(s[i:])
			i += size
			count++
		}
		out = append(out, s[:i])
		s = s[i:]
	}
	return out
}

// describe says in plain words what a zxcvbn match is.
func describe(pattern, dictionary string) string {
	switch pattern {
	case "dictionary":
		switch dictionary {
		case "passwords":
			return "it is or contains a commonly used password"
		case "user_inputs":
			return "it is built from the user name"
		case "male_names", "female_names", "surnames":
			return "it is built from a common name"
		}
		return "it is built from common words"
	case "repeat":
		return "it repeats the same characters"
	case "sequence":
		return "it contains a sequence such as abcd or 1234"
	case "spatial":
		return "it contains a keyboard pattern such as qwerty"
	case "date", "regex":
		return "it is built from a date or year"
	}
	return "it follows a common pattern"
}

// HashNew checks pw as the new password of the user called name (Check),
// refuses it when it is that user's current password (current is the
// stored hash of it; "" for a new account) with EINVALID on "password",
// and returns the hash of the normalised password. Every way of setting a
// password (the account page, the admin form, the command line, user
// creation) goes through it, so the rule is applied once.
func (p Params) HashNew(pw, name, current string) (string, error) {
	n, err := Check(pw, name)
	if err != nil {
		return "", err
	}
	if current != "" {
		// An unreadable stored hash cannot match: the new one replaces it.
		if same, _ := Verify(pw, current); same {
			return "", wardload.FieldErrorf(wardload.EINVALID, "password", "The new password must differ from the current one.")
		}
	}
	return p.Hash(n)
}
