// Package wardload holds the domain of the wardload service: the types a ward,
// its acuity tiers, care observations and census are made of, the service
// interfaces the stores implement, and the one error type every layer uses.
//
// It imports only the standard library so that every other package can
// depend on it without dragging in a driver or a web framework.
package wardload

import (
	"errors"
	"fmt"
)

// Error codes. The server maps each to one HTTP status in a single table;
// the command line maps them to exit codes. Keep the list short.
const (
	ECONFLICT     = "conflict"     // a unique value is already taken, or a concurrent change won
	EINTERNAL     = "internal"     // anything unexpected; the message is never shown to users
	EINVALID      = "invalid"      // the caller's input is wrong; Field names which input
	ENOTFOUND     = "not_found"    // the thing asked for does not exist (or is not visible)
	EUNAUTHORIZED = "unauthorized" // not signed in, or credentials are wrong
	EFORBIDDEN    = "forbidden"    // signed in, but the role or ward does not allow it
	ETOOMANY      = "too_many"     // throttled; try again later
	EUNAVAILABLE  = "unavailable"  // the database cannot be reached just now; nothing was saved, try again shortly
	EFULL         = "full"         // the database's disk is full; nothing was saved until space is freed
)

// The messages of EUNAVAILABLE and EFULL, the same from every store, so a
// person reads the same words whichever database is behind wardload.
const (
	MessageUnavailable = "The database cannot be reached just now, so nothing was saved. Please try again in a minute."
	MessageFull        = "The database has run out of disk space, so nothing was saved. What was saved before is safe; please tell your administrator."
)

// Unavailable returns an error of code (EUNAVAILABLE or EFULL) with that
// code's message, which keeps cause in its chain for the log.
func Unavailable(code string, cause error) error {
	msg := MessageUnavailable
	if code == EFULL {
		msg = MessageFull
	}
	return fmt.Errorf("%w: %w", &Error{Code: code, Message: msg}, cause)
}

// Error is the application error. Message is written for the person using
// wardload and may be shown to them; Field, when set, names the input that
// was wrong (a form field, a CSV column, a flag) so it can be highlighted.
//
// An error about several inputs at once (a form with three bad fields, a
// file with many bad rows) is still one *Error: Fields holds one *Error
// per problem, each naming its field, and Code, Field and Message are
// those of the whole (see Invalid). Callers that show one message keep
// working; callers that list every problem read ErrorFields.
type Error struct {
	Code    string
	Field   string
	Message string
	Fields  []*Error
}

func (e *Error) Error() string {
	if e.Field != "" {
		return fmt.Sprintf("wardload error: code=%s field=%s message=%s", e.Code, e.Field, e.Message)
	}
	return fmt.Sprintf("wardload error: code=%s message=%s", e.Code, e.Message)
}

// Errorf returns an *Error with the given code and a formatted message.
func Errorf(code string, format string, args ...any) *Error {
	return &Error{Code: code, Message: fmt.Sprintf(format, args...)}
}

// FieldErrorf returns an *Error that names the offending field.
func FieldErrorf(code, field string, format string, args ...any) *Error {
	return &Error{Code: code, Field: field, Message: fmt.Sprintf(format, args...)}
}

// Invalid returns nil when errs holds no error, the one error when it holds
// one, and otherwise an EINVALID *Error whose Fields are every *Error of
// errs in order (an error about several fields is flattened into its
// Fields) and whose Field and Message are the first's, so that a caller
// reading only ErrorMessage still sees a real problem. A non-domain error
// among errs is returned alone: it is not the user's input.
func Invalid(errs ...error) error {
	var out []*Error
	for _, err := range errs {
		if err == nil {
			continue
		}
		var e *Error
		if !errors.As(err, &e) {
			return err
		}
		if len(e.Fields) > 0 {
			out = append(out, e.Fields...)
		} else {
			out = append(out, e)
		}
	}
	switch len(out) {
	case 0:
		return nil
	case 1:
		return out[0]
	}
	return &Error{Code: EINVALID, Field: out[0].Field, Message: out[0].Message, Fields: out}
}

// ErrorFields returns every problem of the first *Error in err's chain:
// its Fields, or the error itself when it has none. It returns nil for nil
// and for an error that is not a *Error.
func ErrorFields(err error) []*Error {
	var e *Error
	if !errors.As(err, &e) {
		return nil
	}
	if len(e.Fields) > 0 {
		return e.Fields
	}
	return []*Error{e}
}

// ErrorCode returns the code of the first *Error in err's chain, EINTERNAL
// for any other non-nil error, and "" for nil.
func ErrorCode(err error) string {
	var e *Error
	if err == nil {
		return ""
	} else if errors.As(err, &e) {
		return e.Code
	}
	return EINTERNAL
}

// ErrorMessage returns the user-facing message of the first *Error in err's
// chain. Any other error yields "Internal error." so that driver or system
// text never reaches a user.
func ErrorMessage(err error) string {
	var e *Error
	if err == nil {
		return ""
	} else if errors.As(err, &e) {
		return e.Message
	}
	return "Internal error."
}

// ErrorField returns the field named by the first *Error in err's chain, or "".
func ErrorField(err error) string {
	var e *Error
	if errors.As(err, &e) {
		return e.Field
	}
	return ""
}

// NotFound returns the ENOTFOUND error of a lookup that found nothing:
// "<what> not found.", e.g. NotFound("Shift pattern"). Both stores word
// their misses with it, so users read the same on either backend.
func NotFound(what string) error {
	return Errorf(ENOTFOUND, "%s not found.", what)
}
