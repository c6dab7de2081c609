package server

import (
	"context"
	"net/http"
)

// handleHealthz answers 200 while the process runs; it touches nothing, so
// a slow database does not get a healthy process restarted.
func (s *Server) handleHealthz(w http.ResponseWriter, r *http.Request) error {
	writeText(w, http.StatusOK, "ok\n")
	return nil
}

// handleReadyz answers 200 when the database answers a ping within
// ReadyTimeout, else 503, so a load balancer stops sending traffic to an
// instance that cannot serve it.
func (s *Server) handleReadyz(w http.ResponseWriter, r *http.Request) error {
	ctx, cancel := context.WithTimeout(r.Context(), s.cfg.ReadyTimeout)
	defer cancel()
	if err := s.store.Ping(ctx); err != nil {
		s.log.Warn("not ready", "request_id", RequestID(r.Context()), "err", err)
		writeText(w, http.StatusServiceUnavailable, "not ready\n")
		return nil
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
