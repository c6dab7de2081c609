// Reading what a request carries: IDs from the path, forms, and text
// that is shown back to the user.

package server

import (
	"errors"
	"net/http"
	"strconv"
	"strings"

	"wardload/internal/wardload"
)

// idParam reads a positive ID from the URL; anything else is ENOTFOUND.
func idParam(v, what string) (int64, error) {
	id, err := strconv.ParseInt(v, 10, 64)
	if err != nil || id <= 0 {
		return 0, wardload.Errorf(wardload.ENOTFOUND, "There is no such %s.", what)
	}
	return id, nil
}

// formError turns a form that cannot be read into a plain refusal; an
// oversized body keeps its *http.MaxBytesError so the adapter says 413.
func formError(err error) error {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return err
	}
	return wardload.Errorf(wardload.EINVALID, "The form could not be read.")
}

// clip shortens user input that is shown back, so a huge field cannot
// blow up a page.
func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return strings.ToValidUTF8(s[:n], "")
}
