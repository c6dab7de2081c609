package server

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
	"time"

	"github.com/go-chi/chi/v5/middleware"

	"wardload/internal/wardload"
)

type requestIDKey struct{}

// RequestID returns the ID the server gave the request, or "".
func RequestID(ctx context.Context) string {
	id, _ := ctx.Value(requestIDKey{}).(string)
	return id
}

// requestID gives each request a random ID, returned in X-Request-Id and
// attached to every log line about it. An incoming X-Request-Id is ignored:
// a client could otherwise forge entries that look like other requests.
func (s *Server) requestID(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		var b [8]byte
		rand.Read(b[:]) // never fails (crypto/rand panics instead)
		id := hex.EncodeToString(b[:])
		w.Header().Set("X-Request-Id", id)
		next.ServeHTTP(w, r.WithContext(context.WithValue(r.Context(), requestIDKey{}, id)))
	})
}

// requestNote is what the handlers tell the request's log line: the
// error of a failed request and how it ended.
type requestNote struct {
	err     error
	outcome string
}

type requestNoteKey struct{}

// outcomeClientGone marks a request whose client went away before the
// answer (its context was cancelled): not a server failure. The log line
// shows status 499, as nginx does, since no answer was sent.
const (
	outcomeClientGone = "client_gone"
	statusClientGone  = 499
)

// noteRequest records err and outcome for r's log line. Outside
// logRequests (tests that call a handler directly) it does nothing.
func noteRequest(r *http.Request, err error, outcome string) {
	if n, ok := r.Context().Value(requestNoteKey{}).(*requestNote); ok {
		n.err, n.outcome = err, outcome
	}
}

// logRequests writes one structured line per request, at ERROR when the
// request failed with an internal error (the error in the line), else at
// INFO: refusals, client disconnects and failures the fault log counts
// (the database away or full) are not errors of this request.
func (s *Server) logRequests(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		start := time.Now() // for the log only; never shown or stored
		ww := middleware.NewWrapResponseWriter(w, r.ProtoMajor)
		note := &requestNote{}
		r = r.WithContext(context.WithValue(r.Context(), requestNoteKey{}, note))
		next.ServeHTTP(ww, r)
		status, level := ww.Status(), slog.LevelInfo
		if note.outcome == "" && errors.Is(r.Context().Err(), context.Canceled) {
			note.outcome = outcomeClientGone
		}
		attrs := []any{
			"request_id", RequestID(r.Context()),
			"method", r.Method,
			"path", r.URL.Path,
		}
		switch {
		case note.outcome == outcomeClientGone:
			status = statusClientGone
		case note.err != nil:
			level = slog.LevelError
			attrs = append(attrs, "err", note.err)
		}
		if note.outcome != "" {
			attrs = append(attrs, "outcome", note.outcome)
		}
		attrs = append(attrs, "status", status, "bytes", ww.BytesWritten(),
			"duration_ms", time.Since(start).Milliseconds())
		s.log.Log(r.Context(), level, "request", attrs...)
	})
}

// recoverPanics turns a panic in a handler into a logged internal error and
// a 500 page that says nothing about the cause.
func (s *Server) recoverPanics(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		defer func() {
			rec := recover()
			if rec == nil {
				return
			}
			if rec == http.ErrAbortHandler {
				// net/http's own way to abort a response; let it through.
				panic(rec)
			}
			s.log.Error("panic", "request_id", RequestID(r.Context()), "method", r.Method,
				"path", r.URL.Path, "panic", fmt.Sprint(rec), "stack", string(debug.Stack()))
			if st, ok := w.(interface{ Status() int }); ok && st.Status() != 0 {
				return // headers already sent; nothing sensible left to do
			}
			s.renderError(w, r, wardload.Errorf(wardload.EINTERNAL, "Internal error."))
		}()
		next.ServeHTTP(w, r)
	})
}

// contentSecurityPolicy allows only same-origin resources and no inline
// script or style, so templates must not use either.
const contentSecurityPolicy = "default-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'"

// securityHeaders sets the headers every response carries.
func securityHeaders(next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		h.Set("Content-Security-Policy", contentSecurityPolicy)
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "same-origin")
		h.Set("X-Frame-Options", "DENY")
		h.Set("Cross-Origin-Opener-Policy", "same-origin")
		next.ServeHTTP(w, r)
	})
}

// limitBody caps request bodies at limit bytes. A declared length over the
// cap is refused at once; an undeclared one fails when read past the cap,
// and the adapter turns that *http.MaxBytesError into a 413.
func (s *Server) limitBody(limit int64, next http.Handler) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.ContentLength > limit {
			s.renderError(w, r, tooLarge(r, limit))
			return
		}
		if r.Body != nil {
			r.Body = http.MaxBytesReader(w, r.Body, limit)
		}
		next.ServeHTTP(w, r)
	})
}

// crossOrigin refuses state-changing requests from other sites (Go's
// Sec-Fetch-Site / Origin check), answering through the error adapter so the
// refusal looks like every other 403.
func (s *Server) crossOrigin(next http.Handler) http.Handler {
	return s.cop.Handler(next)
}

func (s *Server) newCrossOriginProtection() (*http.CrossOriginProtection, error) {
	cop := http.NewCrossOriginProtection()
	for _, o := range s.cfg.TrustedOrigins {
		if err := cop.AddTrustedOrigin(o); err != nil {
			return nil, fmt.Errorf("trusted origin %q: %w", o, err)
		}
	}
	cop.SetDenyHandler(s.handle(func(http.ResponseWriter, *http.Request) error {
		return wardload.Errorf(wardload.EFORBIDDEN, "This request came from another site and was refused.")
	}))
	return cop, nil
}
