package server

import (
	"fmt"
	"net/http"

	"wardload/internal/wardload"
	"wardload/web"
)

// handleHome lists the wards. Signed out, it lists every ward's code and
// name (organisational names, no staffing figures) with a sign-in link, so
// staff can see they have reached the right service; signed in, everyone
// but an admin sees only the wards they belong to, with links by role.
func (s *Server) handleHome(w http.ResponseWriter, r *http.Request) error {
	u := principalFrom(r.Context()).User
	// Retired wards are listed to admins only (marked), who can
	// reinstate them; their history stays reachable by address.
	f := wardload.WardFilter{ActiveOnly: u == nil || u.Role != wardload.RoleAdmin}
	if u != nil && u.Role != wardload.RoleAdmin {
		f.UserID = &u.ID
	}
	wards, _, err := s.store.FindWards(r.Context(), f)
	if err != nil {
		return fmt.Errorf("home: find wards: %w", err)
	}
	vm := web.HomeVM{SignedOut: u == nil, Wards: make([]web.WardRowVM, 0, len(wards))}
	if u != nil && u.Role == wardload.RoleAdmin {
		vm.NewWardURL = newWardURL
	}
	for _, wd := range wards {
		row := web.WardRowVM{Code: wd.Code, Name: wd.Name, TimeZone: wd.TimeZone, Retired: wd.Retired()}
		if u != nil {
			row.ProjectionsURL = projectionsURL(wd)
		}
		// The staffing office reads only: no census entry, planning or
		// ward pages of managers.
		if u != nil && u.Role != wardload.RoleStaffingOffice {
			row.CensusURL, row.StaffingURL = censusURL(wd), staffingURL(wd, "")
		}
		if row.Retired {
			row.CensusURL, row.StaffingURL = "", ""
		}
		if u != nil && u.Role == wardload.RoleAdmin {
			row.EditURL = wardEditURL(wd)
		}
		if u != nil && u.Role != wardload.RoleChargeNurse && u.Role != wardload.RoleStaffingOffice {
			row.TokensURL = tokensURL(wd)
			row.SettingsURL = settingsURL(wd)
			row.ReviewURL = reviewURL(wd)
		}
		vm.Wards = append(vm.Wards, row)
	}
	return s.render(w, r, http.StatusOK, web.HomePage(s.layout(r, "Wards"), vm))
}
