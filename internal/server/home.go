package server

import (
	"fmt"
	"net/http"

	"wardload/internal/wardload"
	"wardload/web"
)

// handleHome lists the wards.
func (s *Server) handleHome(w http.ResponseWriter, r *http.Request) error {
	wards, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{})
	if err != nil {
		return fmt.Errorf("home: find wards: %w", err)
	}
	vm := web.HomeVM{Wards: make([]web.WardRowVM, 0, len(wards))}
	for _, wd := range wards {
		vm.Wards = append(vm.Wards, web.WardRowVM{Code: wd.Code, Name: wd.Name, TimeZone: wd.TimeZone})
	}
	return s.render(w, r, http.StatusOK, web.HomePage(s.layout(r, "Wards"), vm))
}
