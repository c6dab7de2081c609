package server

import (
	_ "embed"
	"net/http"
)

// openAPIDoc is the hand-written OpenAPI 3 description of the /api/
// routes. A test checks that it lists exactly the API routes of the table
// and that real responses conform to its schemas.
//
//go:embed openapi.json
var openAPIDoc []byte

// handleOpenAPI serves openAPIDoc. It is public: it describes the API and
// holds no ward data, and a planner's tooling needs it before it has a
// token configured.
func (s *Server) handleOpenAPI(w http.ResponseWriter, r *http.Request) error {
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.Header().Set("Cache-Control", "no-cache")
	w.WriteHeader(http.StatusOK)
	_, err := w.Write(openAPIDoc)
	return err
}
