package server

import (
	"fmt"
	"net/http"
	"slices"

	"wardload/internal/wardload"
)

// apiWard is a ward as the API shows it.
type apiWard struct {
	Code     string `json:"code"`
	Name     string `json:"name"`
	TimeZone string `json:"time_zone"`
}

// handleAPIWards lists the wards the request's token may read, by code.
func (s *Server) handleAPIWards(w http.ResponseWriter, r *http.Request) error {
	t := principalFrom(r.Context()).Token
	// Retired wards are left out: nothing new is planned for them; their
	// projections stay readable by code.
	ws, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{ActiveOnly: true})
	if err != nil {
		return fmt.Errorf("api wards: %w", err)
	}
	out := []apiWard{}
	for _, wd := range ws {
		if slices.Contains(t.WardIDs, wd.ID) {
			out = append(out, apiWard{Code: wd.Code, Name: wd.Name, TimeZone: wd.TimeZone})
		}
	}
	return writeJSON(w, http.StatusOK, map[string]any{"wards": out})
}
