package server

import (
	"net/http"
	"time"

	"wardload/internal/wardload"
)

// drainPoll is how often drainImports looks whether imports have ended.
const drainPoll = 50 * time.Millisecond

// beginImport counts an import in flight until the returned function is
// called, or refuses it with eRestarting once shutdown has begun. It
// counts before it checks, so drainImports, which sets draining before
// it reads the count, cannot miss an import that was let in.
func (s *Server) beginImport() (end func(), err error) {
	s.imports.Add(1)
	end = func() { s.imports.Add(-1) }
	if s.draining.Load() {
		end()
		return nil, &wardload.Error{Code: eRestarting, Message: "wardload is restarting, so this import was not started and nothing was imported. Please send the file again in a minute."}
	}
	return end, nil
}

// drainImports starts the shutdown: /readyz turns not ready, new imports
// are refused, and it waits up to DrainTimeout for the imports in flight
// to finish (each is all or nothing, so one cut short keeps nothing, but
// the person who sent it would get no answer). Other requests are served
// as usual meanwhile.
func (s *Server) drainImports() {
	s.draining.Store(true)
	deadline := time.Now().Add(s.cfg.DrainTimeout) // real time, like the server's other timeouts
	if n := s.imports.Load(); n > 0 {
		s.log.Info("shutting down: waiting for imports", "imports", n, "at_most", s.cfg.DrainTimeout.String())
	}
	for s.imports.Load() > 0 {
		if time.Now().After(deadline) {
			s.log.Warn("shutting down: imports still running after the drain timeout", "imports", s.imports.Load())
			return
		}
		time.Sleep(drainPoll)
	}
}

// ImportsInFlight returns how many observation imports are running, for
// tests of the drain.
func (s *Server) ImportsInFlight() int64 { return s.imports.Load() }

// sessionError is the session manager's ErrorFunc: the session could not
// be read or saved. Saving fails when the session changed, which on a GET
// only means the idle clock (seen_at) was due a refresh: with the disk
// full, that page is still shown, since it saves nothing the person asked
// for, and the failure is counted. Otherwise the request is answered with
// the error (503 when the database is away or full).
func (s *Server) sessionError(w http.ResponseWriter, r *http.Request, err error) {
	if wardload.ErrorCode(err) == wardload.EFULL && (r.Method == http.MethodGet || r.Method == http.MethodHead) {
		s.writes.failed(s.now())
		s.faults.note(wardload.EFULL, err)
		return
	}
	s.renderError(w, r, err)
	if sw, ok := w.(*sessionWriter); ok {
		sw.done = true
	}
}

// withSession loads and saves the session around next (scs). scs saves
// the session just before the response's first byte and, when that
// fails, calls sessionError and then lets the handler write anyway; the
// sessionWriter drops those writes, so the person gets the error page
// alone rather than the page with the handler's answer appended.
func (s *Server) withSession(next http.Handler) http.Handler {
	h := s.sessions.LoadAndSave(next)
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h.ServeHTTP(&sessionWriter{ResponseWriter: w}, r)
	})
}

// sessionWriter passes writes through until sessionError has answered.
type sessionWriter struct {
	http.ResponseWriter
	done bool
}

func (w *sessionWriter) WriteHeader(code int) {
	if !w.done {
		w.ResponseWriter.WriteHeader(code)
	}
}

func (w *sessionWriter) Write(b []byte) (int, error) {
	if w.done {
		return len(b), nil
	}
	return w.ResponseWriter.Write(b)
}

// Unwrap lets http.ResponseController reach the underlying writer.
func (w *sessionWriter) Unwrap() http.ResponseWriter { return w.ResponseWriter }
