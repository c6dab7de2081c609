package server

import (
	"fmt"
	"net/http"
	"strconv"
	"time"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
	"wardload/web"
)

// retireVM is the retire (or reinstate) button of something retired at
// retiredAt (zero: in use) whose update form posts to url; the buttons
// post to url+"/retire" and url+"/reinstate".
func retireVM(id, url, what string, retiredAt time.Time, ward *wardload.Ward) *web.RetireVM {
	vm := &web.RetireVM{ID: id, URL: url + "/retire", What: what, Retired: !retiredAt.IsZero()}
	if vm.Retired {
		vm.URL, vm.RetiredOn = url+"/reinstate", formatLocal(retiredAt, ward)
	}
	return vm
}

// handleShiftRetire retires a shift pattern of the ward: kept with its
// history, left out of new census forms. The store refuses the ward's
// last active pattern; the page then says so beside the button.
func (s *Server) handleShiftRetire(w http.ResponseWriter, r *http.Request) error {
	return s.shiftRetired(w, r, true)
}

// handleShiftReinstate puts a retired shift pattern back in use.
func (s *Server) handleShiftReinstate(w http.ResponseWriter, r *http.Request) error {
	return s.shiftRetired(w, r, false)
}

func (s *Server) shiftRetired(w http.ResponseWriter, r *http.Request, retired bool) error {
	d, id, err := s.settingsItem(r, "shift pattern")
	if err != nil {
		return err
	}
	cur, err := d.shift(id)
	if err != nil {
		return err
	}
	_, err = s.store.UpdateShiftPattern(r.Context(), id, wardload.ShiftPatternUpdate{Retired: &retired})
	if wardload.ErrorCode(err) == wardload.EINVALID {
		vm, verr := s.settingsVM(r, d)
		if verr != nil {
			return verr
		}
		for i := range vm.Shifts {
			if vm.Shifts[i].ID == strconv.FormatInt(id, 10) {
				vm.Shifts[i].Retire.Error = wardload.ErrorMessage(err)
			}
		}
		return s.renderSettings(w, r, http.StatusBadRequest, vm)
	} else if err != nil {
		return fmt.Errorf("shift retire: %w", err)
	}
	return s.settingsSaved(w, r, retiredWord(retired)+" shift pattern "+cur.Name, "shifts")
}

// handleTierRetire retires an acuity tier of the ward: kept with its
// history, left out of new census forms. The ward's last active tier is
// refused beside the button.
func (s *Server) handleTierRetire(w http.ResponseWriter, r *http.Request) error {
	return s.tierRetired(w, r, true)
}

// handleTierReinstate puts a retired tier back in use.
func (s *Server) handleTierReinstate(w http.ResponseWriter, r *http.Request) error {
	return s.tierRetired(w, r, false)
}

func (s *Server) tierRetired(w http.ResponseWriter, r *http.Request, retired bool) error {
	d, id, err := s.settingsItem(r, "tier")
	if err != nil {
		return err
	}
	cur, err := d.tier(id)
	if err != nil {
		return err
	}
	_, err = s.store.UpdateTier(r.Context(), id, wardload.TierUpdate{Retired: &retired})
	if wardload.ErrorCode(err) == wardload.EINVALID {
		vm, verr := s.settingsVM(r, d)
		if verr != nil {
			return verr
		}
		for i := range vm.Tiers {
			if vm.Tiers[i].ID == strconv.FormatInt(id, 10) {
				vm.Tiers[i].Retire.Error = wardload.ErrorMessage(err)
			}
		}
		return s.renderSettings(w, r, http.StatusBadRequest, vm)
	} else if err != nil {
		return fmt.Errorf("tier retire: %w", err)
	}
	return s.settingsSaved(w, r, retiredWord(retired)+" tier "+cur.Code, "tiers")
}

// settingsItem reads the form (the buttons send none, but a body must
// still be read within its limit), the ward's settings data and the {id}
// of the route.
func (s *Server) settingsItem(r *http.Request, what string) (*settingsData, int64, error) {
	if err := r.ParseForm(); err != nil {
		return nil, 0, formError(err)
	}
	d, err := s.loadSettings(r)
	if err != nil {
		return nil, 0, err
	}
	id, err := idParam(chi.URLParam(r, "id"), what)
	return d, id, err
}

func retiredWord(retired bool) string {
	if retired {
		return "retired"
	}
	return "reinstated"
}
