package server

import (
	"context"
	"net/http"

	"wardload/internal/wardload"
)

// handleHealthz answers 200 while the process runs; it touches nothing, so
// a slow database does not get a healthy process restarted.
func (s *Server) handleHealthz(w http.ResponseWriter, r *http.Request) error {
	writeText(w, http.StatusOK, "ok\n")
	return nil
}

// writeChecker is a store that can tell whether a write would find room
// (internal/sqlite). /readyz asks it once a write has failed for lack of
// space, and is ready again as soon as it passes.
type writeChecker interface {
	CheckWrite(ctx context.Context) error
}

// handleReadyz answers 200 when the database answers a ping within
// ReadyTimeout and takes writes, else 503, so a load balancer stops
// sending traffic to an instance that cannot serve it. It recovers by
// itself: the next call after the database is back answers 200.
func (s *Server) handleReadyz(w http.ResponseWriter, r *http.Request) error {
	ctx, cancel := context.WithTimeout(r.Context(), s.cfg.ReadyTimeout)
	defer cancel()
	if s.draining.Load() {
		writeText(w, http.StatusServiceUnavailable, "not ready: shutting down\n")
		return nil
	}
	if err := s.store.Ping(ctx); err != nil {
		s.faults.note(wardload.EUNAVAILABLE, err)
		writeText(w, http.StatusServiceUnavailable, "not ready: database unreachable\n")
		return nil
	}
	if at := s.writes.since(); !at.IsZero() {
		wc, ok := s.store.(writeChecker)
		switch {
		case ok:
			if err := wc.CheckWrite(ctx); err != nil {
				s.faults.note(wardload.ErrorCode(err), err)
				writeText(w, http.StatusServiceUnavailable, "not ready: database cannot take writes\n")
				return nil
			}
		case s.now().Sub(at) < s.cfg.ReadyHold:
			writeText(w, http.StatusServiceUnavailable, "not ready: database could not take writes\n")
			return nil
		}
		s.writes.recovered(at)
	}
	writeText(w, http.StatusOK, "ok\n")
	return nil
}

func writeText(w http.ResponseWriter, status int, body string) {
	w.Header().Set("Content-Type", "text/plain; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	w.Write([]byte(body))
}
