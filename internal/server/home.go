package server

import (
	"fmt"
	"net/http"

	"wardload/internal/wardload"
	"wardload/web"
)

// handleHome lists the wards.
func (s *Server) handleHome(w http.ResponseWriter, r *http.Request) error {
	// Everyone but an admin sees only the wards they belong to.
	var f wardload.WardFilter
	if u := principalFrom(r.Context()).User; u != nil && u.Role != wardload.RoleAdmin {
		f.UserID = &u.ID
	}
	wards, _, err := s.store.FindWards(r.Context(), f)
	if err != nil {
		return fmt.Errorf("home: find wards: %w", err)
	}
	vm := web.HomeVM{Wards: make([]web.WardRowVM, 0, len(wards))}
	for _, wd := range wards {
		row := web.WardRowVM{Code: wd.Code, Name: wd.Name, TimeZone: wd.TimeZone,
			CensusURL: censusURL(wd), ProjectionsURL: projectionsURL(wd)}
		if u := principalFrom(r.Context()).User; u != nil && u.Role != wardload.RoleChargeNurse {
			row.TokensURL = "/wards/" + wd.Code + "/tokens"
			row.SettingsURL = "/wards/" + wd.Code + "/settings"
			row.ReviewURL = reviewURL(wd)
		}
		vm.Wards = append(vm.Wards, row)
	}
	return s.render(w, r, http.StatusOK, web.HomePage(s.layout(r, "Wards"), vm))
}
