package server

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net"
	"net/http"
	"strconv"
	"strings"
	"time"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
	"wardload/web"
)

// Codes the HTTP layer needs beyond the domain's. They live in the same
// table so that there is still one place deciding statuses.
const (
	eMethod     = "method_not_allowed"
	eTooLarge   = "too_large"
	eTimeout    = "timeout"    // the request body did not arrive within ReadTimeout
	eRestarting = "restarting" // shutting down: long work is not started
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
	wardload.EUNAVAILABLE:  http.StatusServiceUnavailable,
	wardload.EFULL:         http.StatusServiceUnavailable,
	eMethod:                http.StatusMethodNotAllowed,
	eTooLarge:              http.StatusRequestEntityTooLarge,
	eTimeout:               http.StatusRequestTimeout,
	eRestarting:            http.StatusServiceUnavailable,
}

// retryAfter is the Retry-After, in seconds, of the codes that mean "try
// again later": long enough for the database's usual restart or the
// connection back-off, short enough that a person retrying by hand does
// not wait for nothing.
var retryAfter = map[string]int{
	wardload.EUNAVAILABLE: 10,
	wardload.EFULL:        60,
	eRestarting:           30,
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
				// make this rare. The request's log line carries it.
				noteRequest(r, err, "failed after writing")
				return
			}
			s.renderError(w, r, err)
		}
	}
}

// renderError answers with err: JSON under /api/, an HTML page elsewhere.
// Users see only wardload.ErrorMessage; anything internal goes to the
// request's log line with the request ID, which the error page shows so
// staff can quote it. A failure that repeats for every request while it
// lasts (the database away or full) is counted by the fault log instead,
// and a request whose client has gone gets no answer at all.
func (s *Server) renderError(w http.ResponseWriter, r *http.Request, err error) {
	err = s.classify(r, err)
	code, msg, status := wardload.ErrorCode(err), wardload.ErrorMessage(err), ErrorStatus(err)
	id := RequestID(r.Context())
	switch {
	case code == eTimeout:
		// net/http cancels the request's context when a body read
		// times out, but the client may well still be reading.
		noteRequest(r, nil, code)
	case errors.Is(r.Context().Err(), context.Canceled):
		noteRequest(r, err, outcomeClientGone)
		return
	}
	switch code {
	case wardload.EFULL:
		s.writes.failed(s.now())
		fallthrough
	case wardload.EUNAVAILABLE:
		s.faults.note(code, err)
		noteRequest(r, nil, code)
	default:
		if status >= 500 {
			noteRequest(r, err, "")
		}
	}
	if sec, ok := retryAfter[code]; ok {
		w.Header().Set("Retry-After", strconv.Itoa(sec))
	}
	if isAPI(r) {
		writeJSONError(w, status, code, msg, wardload.ErrorField(err))
		return
	}
	vm := web.ErrorVM{Status: status, Title: errorTitle(status, code), Message: msg, RequestID: id}
	l := s.layout(r, vm.Title)
	if _, later := retryAfter[code]; later && l.UserName == "" && hasSessionCookie(r, s.sessions.Cookie.Name) {
		// The session could not be read because the database is away:
		// the person is not signed out, so do not offer to sign in.
		vm.StillSignedIn, l.Nav = true, nil
	}
	page := web.ErrorPage(l, vm)
	var buf bytes.Buffer
	// Without the request's cancellation: a timed-out body read cancels
	// it, and this page is still worth sending.
	if rerr := page.Render(context.WithoutCancel(r.Context()), &buf); rerr != nil {
		// The error page itself failed: fall back to plain text, still
		// without internal detail.
		noteRequest(r, fmt.Errorf("error page failed: %w (for %w)", rerr, err), "")
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

// classify turns the HTTP layer's own failures into codes: a body over
// its route's limit (413, naming the limit) and a body that did not
// arrive within ReadTimeout (408, naming the time).
func (s *Server) classify(r *http.Request, err error) error {
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return tooLarge(r, mbe.Limit)
	}
	var ne net.Error
	if errors.As(err, &ne) && ne.Timeout() && wardload.ErrorCode(err) == wardload.EINTERNAL {
		msg := fmt.Sprintf("The upload did not arrive within the time limit of %s, so nothing was saved. "+
			"On a slow connection, split the file by date and send the parts one by one", s.cfg.ReadTimeout.Round(time.Second))
		if ward := chi.URLParam(r, "ward"); strings.HasSuffix(r.URL.Path, "/observations/import") && ward != "" {
			msg += ", or have an administrator import it on the server: " + cliImport(ward)
		}
		return &wardload.Error{Code: eTimeout, Message: msg + "."}
	}
	return err
}

// tooLarge is the 413 of a body over limit bytes, naming the limit; on
// the import route it says how to bring in a bigger file.
func tooLarge(r *http.Request, limit int64) error {
	if ward := chi.URLParam(r, "ward"); strings.HasSuffix(r.URL.Path, "/observations/import") && ward != "" {
		return &wardload.Error{Code: eTooLarge, Message: fmt.Sprintf(
			"The file is larger than the web import's limit of %s, so nothing was imported. "+
				"Split it by date into smaller files, or have an administrator import it on the server: %s.",
			byteSize(maxImportBytes), cliImport(ward))}
	}
	return &wardload.Error{Code: eTooLarge, Message: fmt.Sprintf("The request is larger than the limit of %s, so nothing was saved.", byteSize(limit))}
}

// cliImport is the command that imports a file of any size for ward.
func cliImport(ward string) string {
	return "wardload observations import --ward " + ward + " FILE.csv"
}

// byteSize writes n bytes in binary units for people: "4 MiB", "16 KiB".
func byteSize(n int64) string {
	switch {
	case n >= 1<<20:
		return strconv.FormatFloat(float64(n)/(1<<20), 'f', -1, 64) + " MiB"
	case n >= 1<<10:
		return strconv.FormatFloat(float64(n)/(1<<10), 'f', -1, 64) + " KiB"
	}
	return strconv.FormatInt(n, 10) + " bytes"
}

// hasSessionCookie reports whether r carries a session cookie.
func hasSessionCookie(r *http.Request, name string) bool {
	c, err := r.Cookie(name)
	return err == nil && c.Value != ""
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

func errorTitle(status int, code string) string {
	switch code {
	case wardload.EUNAVAILABLE:
		return "The database cannot be reached"
	case wardload.EFULL:
		return "Nothing was saved: the disk is full"
	case eRestarting:
		return "wardload is restarting"
	}
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
	case http.StatusRequestEntityTooLarge:
		return "Too large"
	case http.StatusRequestTimeout:
		return "The upload took too long"
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
