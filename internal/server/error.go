package server

import (
	"bytes"
	"encoding/json"
	"errors"
	"net/http"
	"strings"

	"wardload/internal/wardload"
	"wardload/web"
)

// Codes the HTTP layer needs beyond the domain's. They live in the same
// table so that there is still one place deciding statuses.
const (
	eMethod   = "method_not_allowed"
	eTooLarge = "too_large"
)

// codes maps every error code to its HTTP status. It is the only place a
// status is chosen for an error.
var codes = map[string]int{
	wardload.EINVALID:      http.StatusBadRequest,
	wardload.EUNAUTHORIZED: http.StatusUnauthorized,
	wardload.EFORBIDDEN:    http.StatusForbidden,
	wardload.ENOTFOUND:     http.StatusNotFound,
	wardload.ECONFLICT:     http.StatusConflict,
	wardload.ETOOMANY:      http.StatusTooManyRequests,
	wardload.EINTERNAL:     http.StatusInternalServerError,
	eMethod:                http.StatusMethodNotAllowed,
	eTooLarge:              http.StatusRequestEntityTooLarge,
}

// ErrorStatus returns the HTTP status for err's code; unknown codes are 500.
func ErrorStatus(err error) int {
	if st, ok := codes[wardload.ErrorCode(err)]; ok {
		return st
	}
	return http.StatusInternalServerError
}

// handle adapts a handlerFunc to http.Handler: a returned error is
// rendered by renderError. It is the one adapter every route goes through.
func (s *Server) handle(h handlerFunc) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		tw := &trackingWriter{ResponseWriter: w}
		if err := h(tw, r); err != nil {
			if tw.wrote {
				// Too late to change the status; the buffered renderers
				// make this rare. Log so it is not silent.
				s.log.Error("handler failed after writing", "request_id", RequestID(r.Context()),
					"method", r.Method, "path", r.URL.Path, "err", err)
				return
			}
			s.renderError(w, r, err)
		}
	}
}

// renderError answers with err: JSON under /api/, an HTML page elsewhere.
// Users see only wardload.ErrorMessage; anything internal is logged with
// the request ID, which the error page shows so staff can quote it.
func (s *Server) renderError(w http.ResponseWriter, r *http.Request, err error) {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		err = &wardload.Error{Code: eTooLarge, Message: "The request is too large."}
	}
	code, msg, status := wardload.ErrorCode(err), wardload.ErrorMessage(err), ErrorStatus(err)
	id := RequestID(r.Context())
	if status >= 500 {
		s.log.Error("internal error", "request_id", id, "method", r.Method, "path", r.URL.Path, "err", err)
	}
	if isAPI(r) {
		writeJSONError(w, status, code, msg, wardload.ErrorField(err))
		return
	}
	vm := web.ErrorVM{Status: status, Title: errorTitle(status), Message: msg, RequestID: id}
	page := web.ErrorPage(s.layout(r, vm.Title), vm)
	var buf bytes.Buffer
	if rerr := page.Render(r.Context(), &buf); rerr != nil {
		// The error page itself failed: fall back to plain text, still
		// without internal detail.
		s.log.Error("error page failed", "request_id", id, "err", rerr)
		w.Header().Set("Content-Type", "text/plain; charset=utf-8")
		w.WriteHeader(status)
		w.Write([]byte(msg + "\n"))
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	w.Write(buf.Bytes())
}

// apiError is the JSON body of a failed API request.
type apiError struct {
	Error apiErrorBody `json:"error"`
}

type apiErrorBody struct {
	Code    string `json:"code"`
	Message string `json:"message"`
	Field   string `json:"field,omitempty"`
}

func writeJSONError(w http.ResponseWriter, status int, code, msg, field string) {
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	json.NewEncoder(w).Encode(apiError{apiErrorBody{Code: code, Message: msg, Field: field}})
}

func isAPI(r *http.Request) bool {
	return r.URL.Path == "/api" || strings.HasPrefix(r.URL.Path, "/api/")
}

func errorTitle(status int) string {
	switch status {
	case http.StatusBadRequest:
		return "Please check what you entered"
	case http.StatusUnauthorized:
		return "Please sign in"
	case http.StatusForbidden:
		return "Not allowed"
	case http.StatusNotFound:
		return "Not found"
	case http.StatusConflict:
		return "That clashes with something already saved"
	case http.StatusTooManyRequests:
		return "Too many attempts"
	case http.StatusInternalServerError:
		return "Something went wrong"
	}
	return http.StatusText(status)
}

// trackingWriter remembers whether anything was written, so the adapter
// knows if it may still send an error status.
type trackingWriter struct {
	http.ResponseWriter
	wrote bool
}

func (t *trackingWriter) WriteHeader(code int) {
	t.wrote = true
	t.ResponseWriter.WriteHeader(code)
}

func (t *trackingWriter) Write(b []byte) (int, error) {
	t.wrote = true
	return t.ResponseWriter.Write(b)
}

// Unwrap lets http.ResponseController reach the underlying writer.
func (t *trackingWriter) Unwrap() http.ResponseWriter { return t.ResponseWriter }
