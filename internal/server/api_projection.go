package server

import (
	"bytes"
	"fmt"
	"net/http"
	"slices"
	"strings"

	"wardload/internal/export"
	"wardload/internal/wardload"
)

// handleAPIProjections answers GET /api/v1/projections?ward=&from=&to=
// [&format=json|csv] with export.WriteJSON (or WriteCSV) of the ward's
// newest projections in the range: byte for byte what `wardload export
// projections` and the shift list download give for the same data.
//
// Parameters are checked in order ward, format, from, to, so a token
// learns nothing about dates of a ward it may not read. A missing or bad
// parameter is 400 naming it; an unknown ward 404; a ward the token does
// not have 403.
func (s *Server) handleAPIProjections(w http.ResponseWriter, r *http.Request) error {
	q := r.URL.Query()
	code, err := oneParam(q["ward"], "ward", "A ward code is required (ward=CODE).")
	if err != nil {
		return err
	}
	if !wardload.ValidCode(code) {
		return wardload.FieldErrorf(wardload.EINVALID, "ward", "Ward code must be 1–32 lowercase letters, digits, '-' or '_'.")
	}
	ward, err := s.store.FindWardByCode(r.Context(), code)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		return wardload.FieldErrorf(wardload.ENOTFOUND, "ward", "There is no such ward.")
	} else if err != nil {
		return fmt.Errorf("api projections: %w", err)
	}
	if !slices.Contains(principalFrom(r.Context()).Token.WardIDs, ward.ID) {
		return wardload.FieldErrorf(wardload.EFORBIDDEN, "ward", "This token may not read this ward.")
	}
	format := export.JSON
	if _, ok := q["format"]; ok {
		v, err := oneParam(q["format"], "format", "Format must be json or csv.")
		if err != nil {
			return err
		}
		if format, ok = export.ParseFormat(v); !ok {
			return wardload.FieldErrorf(wardload.EINVALID, "format", "Format must be json or csv.")
		}
	}
	from, err := dateParam(q["from"], "from")
	if err != nil {
		return err
	}
	to, err := dateParam(q["to"], "to")
	if err != nil {
		return err
	}
	tiers, rows, err := export.Rows(r.Context(), s.store, ward, from, to)
	if err != nil {
		return err // EINVALID names from or to
	}
	var buf bytes.Buffer
	if err := export.Write(&buf, format, ward, from, to, tiers, rows); err != nil {
		return fmt.Errorf("api projections: %w", err)
	}
	w.Header().Set("Content-Type", format.ContentType())
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(http.StatusOK)
	_, err = w.Write(buf.Bytes())
	return err
}

// oneParam returns the single value of a query parameter; missing, empty
// or repeated is EINVALID naming it.
func oneParam(vals []string, name, missing string) (string, error) {
	if len(vals) == 0 || strings.TrimSpace(vals[0]) == "" {
		return "", wardload.FieldErrorf(wardload.EINVALID, name, "%s", missing)
	}
	if len(vals) > 1 {
		return "", wardload.FieldErrorf(wardload.EINVALID, name, "Give %s once.", name)
	}
	return strings.TrimSpace(vals[0]), nil
}

// dateParam reads a YYYY-MM-DD query parameter.
func dateParam(vals []string, name string) (wardload.Date, error) {
	v, err := oneParam(vals, name, "The date "+name+" is required (YYYY-MM-DD).")
	if err != nil {
		return wardload.Date{}, err
	}
	d, err := wardload.ParseDate(v)
	if err != nil {
		return wardload.Date{}, wardload.FieldErrorf(wardload.EINVALID, name, "The date %s must be a calendar date written YYYY-MM-DD.", name)
	}
	return d, nil
}
