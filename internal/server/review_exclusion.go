package server

import (
	"fmt"
	"net/http"
	"slices"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
)

// wardObservation returns the {id} observation if it belongs to the
// request's ward; any other is ENOTFOUND, so that IDs of other wards'
// observations cannot be probed.
func (s *Server) wardObservation(r *http.Request) (*wardload.Observation, error) {
	id, err := idParam(chi.URLParam(r, "id"), "observation")
	if err != nil {
		return nil, err
	}
	o, err := s.store.FindObservationByID(r.Context(), id)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && o.WardID != principalFrom(r.Context()).Ward.ID) {
		return nil, wardload.Errorf(wardload.ENOTFOUND, "This ward has no such observation.")
	}
	return o, err
}

// exclusionReason checks the chosen reason. Only the offered reasons are
// stored: a free-text note would invite clinical details about a patient,
// which wardload never stores, so the form has none and the server reads
// no other field.
func exclusionReason(choice string) (string, error) {
	if !slices.Contains(exclusionReasons, choice) {
		return "", wardload.FieldErrorf(wardload.EINVALID, "reason", "Choose one of the listed reasons.")
	}
	if err := wardload.ValidExclusionReason(choice); err != nil {
		return "", err
	}
	return choice, nil
}

// handleObservationExclude excludes an observation from the model with a
// reason. The store keeps it and audits the change.
func (s *Server) handleObservationExclude(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	o, err := s.wardObservation(r)
	if err != nil {
		return err
	}
	f := r.PostForm
	ward, u := principalFrom(r.Context()).Ward, principalFrom(r.Context()).User
	choice := clip(f.Get("reason"), 60)
	reason, err := exclusionReason(choice)
	if err == nil {
		_, err = s.store.ExcludeObservation(r.Context(), o.ID, reason, u.ID)
	}
	switch wardload.ErrorCode(err) {
	case "":
		s.sessions.Put(r.Context(), sessFlash, fmt.Sprintf("Observation of %s excluded (%s). It can be restored below.", o.Date, reason))
		return seeOther(w, r, reviewQuery(ward, f.Get("shift"), f.Get("weeks")))
	case wardload.EINVALID:
		return s.reviewWithExcludeError(w, r, o, wardload.ErrorMessage(err), choice)
	}
	return err
}

// reviewWithExcludeError re-renders the review (same window and shift as
// the form came from) with the message next to the observation's form.
// If the observation is not listed in that view, the message goes to the
// top of the page instead.
func (s *Server) reviewWithExcludeError(w http.ResponseWriter, r *http.Request, o *wardload.Observation, msg, choice string) error {
	d, err := s.loadReview(r, r.PostForm.Get("shift"), r.PostForm.Get("weeks"))
	if wardload.ErrorCode(err) == wardload.EINVALID {
		d, err = s.loadReview(r, "", "")
	}
	if err != nil {
		return err
	}
	// The list page holding the observation, in the default order, so
	// that its message stands beside its form.
	vm, err := s.reviewVM(r, d, flaggedPaging{show: o.ID})
	if err != nil {
		return err
	}
	shown := false
	for i := range vm.Flagged {
		if vm.Flagged[i].ID == fmt.Sprint(o.ID) {
			vm.Flagged[i].Error, vm.Flagged[i].Choice = msg, choice
			shown = true
		}
	}
	if !shown {
		vm.Notice = "Not excluded: " + msg
	}
	return s.renderReview(w, r, http.StatusBadRequest, vm)
}

// handleObservationRestore includes an excluded observation again.
func (s *Server) handleObservationRestore(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	o, err := s.wardObservation(r)
	if err != nil {
		return err
	}
	p := principalFrom(r.Context())
	if _, err := s.store.RestoreObservation(r.Context(), o.ID, p.User.ID); err != nil {
		return err
	}
	s.sessions.Put(r.Context(), sessFlash, fmt.Sprintf("Observation of %s restored: the model uses it again.", o.Date))
	return seeOther(w, r, reviewQuery(p.Ward, r.PostForm.Get("shift"), r.PostForm.Get("weeks")))
}
