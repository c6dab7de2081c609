package server

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"github.com/go-chi/chi/v5"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// Planned staff per dated shift (issue 10): the charge nurse or manager
// enters it on the ward's staffing page; a roster planner sends it with
// PUT /api/v1/wards/{ward}/shifts/{date}/{shift}/staffing and a token
// that may write staffing. Both go through planStaff, so both check the
// same things and store the same way.

// staffingDays is how many days the staffing page shows.
const staffingDays = 7

// maxPlanAheadDays bounds how far from today a plan's date may be, so a
// mistyped year is refused rather than stored (common practice, no source).
const maxPlanAheadDays = 400

// planStaff checks and stores the plan of ward's dated shift: the date
// within maxPlanAheadDays of the ward's today, the shift one of the
// ward's, the counts within the ward's bounds (wardload.MaxStaff of its
// beds). Returns the stored plan, the shift pattern and whether it changed.
func (s *Server) planStaff(r *http.Request, ward *wardload.Ward, d wardload.Date, sp *wardload.ShiftPattern, nurses int, support *int, by int64) (*wardload.PlannedStaff, bool, error) {
	loc, err := ward.Location()
	if err != nil {
		return nil, false, err
	}
	today := projector.Today(s.now(), loc)
	if d.Before(today.AddDays(-maxPlanAheadDays)) || today.AddDays(maxPlanAheadDays).Before(d) {
		return nil, false, wardload.FieldErrorf(wardload.EINVALID, "date", "The date %s is more than %d days from today; please check it.", d, maxPlanAheadDays)
	}
	st, err := s.store.FindSettings(r.Context(), ward.ID)
	if err != nil {
		return nil, false, fmt.Errorf("plan staff: settings: %w", err)
	}
	p := &wardload.PlannedStaff{WardID: ward.ID, Date: d, ShiftID: sp.ID, Nurses: nurses, Support: support, UpdatedBy: by}
	if err := p.Validate(st.Beds); err != nil {
		return nil, false, err
	}
	if err := p.CheckRetired(ward, sp); err != nil {
		return nil, false, err
	}
	changed, err := s.store.SetPlannedStaff(r.Context(), p)
	if err != nil {
		return nil, false, err
	}
	return p, changed, nil
}

// wardShift finds the ward's shift pattern named name (any case) or with
// ID id (when id > 0); ENOTFOUND naming "shift" otherwise.
func (s *Server) wardShift(r *http.Request, ward *wardload.Ward, name string, id int64) (*wardload.ShiftPattern, error) {
	ps, err := s.store.FindShiftPatterns(r.Context(), ward.ID)
	if err != nil {
		return nil, fmt.Errorf("ward shifts: %w", err)
	}
	for _, p := range ps {
		if (id > 0 && p.ID == id) || (id == 0 && strings.EqualFold(p.Name, name)) {
			return p, nil
		}
	}
	return nil, wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "Ward %s has no such shift.", ward.Code)
}

// handleStaffingForm shows the ward's dated shifts from ?date= (default
// today in the ward's time zone) for staffingDays days with their plans.
func (s *Server) handleStaffingForm(w http.ResponseWriter, r *http.Request) error {
	ward := principalFrom(r.Context()).Ward
	vm := web.StaffingVM{Notice: s.sessions.PopString(r.Context(), sessFlash)}
	from, err := s.staffingFrom(r, ward, r.URL.Query().Get("date"))
	if err != nil {
		return err
	}
	return s.renderStaffing(w, r, http.StatusOK, ward, from, vm, wardload.Date{}, 0)
}

// staffingFrom parses the page's first date; "" is today in the ward's
// time zone.
func (s *Server) staffingFrom(_ *http.Request, ward *wardload.Ward, v string) (wardload.Date, error) {
	loc, err := ward.Location()
	if err != nil {
		return wardload.Date{}, err
	}
	if strings.TrimSpace(v) == "" {
		return projector.Today(s.now(), loc), nil
	}
	d, err := wardload.ParseDate(strings.TrimSpace(v))
	if err != nil {
		return wardload.Date{}, wardload.FieldErrorf(wardload.EINVALID, "date", "The date must be a calendar date written YYYY-MM-DD.")
	}
	return d, nil
}

func (s *Server) renderStaffing(w http.ResponseWriter, r *http.Request, status int, ward *wardload.Ward, from wardload.Date, vm web.StaffingVM, badDate wardload.Date, badShift int64) error {
	loc, err := ward.Location()
	if err != nil {
		return err
	}
	to := from.AddDays(staffingDays - 1)
	all, err := s.store.FindShiftPatterns(r.Context(), ward.ID)
	if err != nil {
		return fmt.Errorf("staffing: %w", err)
	}
	ps := wardload.ActiveShifts(all) // a retired shift takes no new plans
	plans, err := s.store.FindPlannedStaff(r.Context(), wardload.PlannedStaffFilter{WardIDs: []int64{ward.ID}, From: &from, To: &to})
	if err != nil {
		return fmt.Errorf("staffing: %w", err)
	}
	projs, _, err := s.store.FindProjections(r.Context(), wardload.ProjectionFilter{WardID: &ward.ID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return fmt.Errorf("staffing: %w", err)
	}
	type key struct {
		d  wardload.Date
		id int64
	}
	plan := map[key]*wardload.PlannedStaff{}
	for _, p := range plans {
		plan[key{p.Date, p.ShiftID}] = p
	}
	rec := map[key]string{}
	for _, p := range projs {
		if n := p.RecommendedNurses(); n != nil {
			rec[key{p.Date, p.ShiftID}] = strconv.Itoa(*n)
		} else {
			rec[key{p.Date, p.ShiftID}] = "none (too few observations)"
		}
	}
	st, err := s.store.FindSettings(r.Context(), ward.ID)
	if err != nil {
		return fmt.Errorf("staffing: %w", err)
	}
	vm.WardName, vm.From = ward.Name, from.String()
	vm.PageURL = "/wards/" + ward.Code + "/staffing"
	vm.MaxStaff = strconv.Itoa(wardload.MaxStaff(st.Beds))
	for d := from; !to.Before(d); d = d.AddDays(1) {
		for _, sp := range ps {
			start, end, _ := sp.Window(d, loc)
			row := web.StaffingRowVM{Date: d.String(), ShiftID: strconv.FormatInt(sp.ID, 10), Shift: sp.Name,
				Window: start.Format("Mon 2 Jan 15:04") + "–" + end.Format("15:04 MST"), Recommended: "no census yet",
				Invalid: d == badDate && sp.ID == badShift}
			if v, ok := rec[key{d, sp.ID}]; ok {
				row.Recommended = v
			}
			if p := plan[key{d, sp.ID}]; p != nil {
				row.Nurses, row.UpdatedAt = strconv.Itoa(p.Nurses), formatAt(p.UpdatedAt)
			}
			vm.Rows = append(vm.Rows, row)
		}
	}
	return s.render(w, r, status, web.StaffingPage(s.layout(r, "Planned staff"), vm))
}

// handleStaffingSave stores one dated shift's planned nurses from the
// staffing page; a refusal shows the page again with the message.
func (s *Server) handleStaffingSave(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	p := principalFrom(r.Context())
	ward := p.Ward
	f := r.PostForm
	d, dateErr := s.staffingFrom(r, ward, f.Get("date"))
	if dateErr == nil && strings.TrimSpace(f.Get("date")) == "" {
		dateErr = wardload.FieldErrorf(wardload.EINVALID, "date", "The date is required.")
	}
	shiftID, _ := strconv.ParseInt(f.Get("shift"), 10, 64)
	refuse := func(err error) error {
		code := wardload.ErrorCode(err)
		if code != wardload.EINVALID && code != wardload.ENOTFOUND {
			return err
		}
		from := d
		if dateErr != nil {
			from, _ = s.staffingFrom(r, ward, "")
		}
		return s.renderStaffing(w, r, http.StatusBadRequest, ward, from, web.StaffingVM{Error: wardload.ErrorMessage(err)}, d, shiftID)
	}
	if dateErr != nil {
		return refuse(dateErr)
	}
	if shiftID <= 0 {
		return refuse(wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "Ward %s has no such shift.", ward.Code))
	}
	sp, err := s.wardShift(r, ward, "", shiftID)
	if err != nil {
		return refuse(err)
	}
	nurses, err := strconv.Atoi(strings.TrimSpace(f.Get("nurses")))
	if err != nil {
		return refuse(wardload.FieldErrorf(wardload.EINVALID, "nurses", "Planned nurses must be a whole number from 0."))
	}
	plan, changed, err := s.planStaff(r, ward, d, sp, nurses, nil, p.User.ID)
	if err != nil {
		return refuse(err)
	}
	msg := fmt.Sprintf("%s %s: %d nurses planned.", plan.Date, sp.Name, plan.Nurses)
	if !changed {
		msg = fmt.Sprintf("%s %s: %d nurses were already planned; nothing changed.", plan.Date, sp.Name, plan.Nurses)
	}
	s.sessions.Put(r.Context(), sessFlash, msg)
	return seeOther(w, r, staffingURL(ward, d.String()))
}

// staffingRequest is the body of the staffing PUT.
type staffingRequest struct {
	Nurses  *int `json:"nurses"`
	Support *int `json:"support_staff"`
}

// staffingResponse is the answer of the staffing PUT: the stored plan.
type staffingResponse struct {
	Ward         string `json:"ward"`
	Date         string `json:"date"`
	Shift        string `json:"shift"`
	Start        string `json:"start"`
	End          string `json:"end"`
	Nurses       int    `json:"nurses"`
	SupportStaff *int   `json:"support_staff"`
	Changed      bool   `json:"changed"`
	UpdatedAt    string `json:"updated_at"`
}

// maxStaffingBody is the largest staffing PUT body read; the route's own
// limit (8 KiB) refuses bigger ones before the handler runs.
const maxStaffingBody = 8 << 10

// handleAPIStaffingPut sets the planned staff of one dated shift: {shift}
// is the shift's name (any case), the body {"nurses": n,
// "support_staff": m|null}. Idempotent: the same body again changes
// nothing ("changed": false) and writes no audit row.
func (s *Server) handleAPIStaffingPut(w http.ResponseWriter, r *http.Request) error {
	p := principalFrom(r.Context())
	ward := p.Ward
	d, err := wardload.ParseDate(chi.URLParam(r, "date"))
	if err != nil {
		return wardload.FieldErrorf(wardload.EINVALID, "date", "The date must be a calendar date written YYYY-MM-DD.")
	}
	name, err := url.PathUnescape(chi.URLParam(r, "shift"))
	if err != nil || strings.TrimSpace(name) == "" {
		return wardload.FieldErrorf(wardload.ENOTFOUND, "shift", "Ward %s has no such shift.", ward.Code)
	}
	sp, err := s.wardShift(r, ward, name, 0)
	if err != nil {
		return err
	}
	body, err := io.ReadAll(io.LimitReader(r.Body, maxStaffingBody+1))
	if err != nil {
		var mbe *http.MaxBytesError
		if errors.As(err, &mbe) {
			return err
		}
		return wardload.Errorf(wardload.EINVALID, "The request body could not be read.")
	}
	var req staffingRequest
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&req); err != nil || dec.More() {
		return wardload.Errorf(wardload.EINVALID, `The body must be one JSON object {"nurses": n, "support_staff": m or null}, nothing else.`)
	}
	if req.Nurses == nil {
		return wardload.FieldErrorf(wardload.EINVALID, "nurses", "nurses is required: the number of nurses planned, the nurse in charge included.")
	}
	plan, changed, err := s.planStaff(r, ward, d, sp, *req.Nurses, req.Support, 0)
	if err != nil {
		return err
	}
	loc, err := ward.Location()
	if err != nil {
		return err
	}
	start, end, _ := sp.Window(d, loc)
	res := staffingResponse{Ward: ward.Code, Date: d.String(), Shift: sp.Name, Start: export.FormatTime(start), End: export.FormatTime(end),
		Nurses: plan.Nurses, SupportStaff: plan.Support, Changed: changed, UpdatedAt: export.FormatTime(plan.UpdatedAt.In(loc))}
	return writeJSON(w, http.StatusOK, res)
}
