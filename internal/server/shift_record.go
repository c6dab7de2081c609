package server

import (
	"fmt"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"wardload/internal/wardload"
	"wardload/web"
)

// shiftRecordURL is the end-of-shift record page of one dated shift.
func shiftRecordURL(ward *wardload.Ward, d wardload.Date, shiftID int64) string {
	return "/wards/" + ward.Code + "/shift-record?" + url.Values{"date": {d.String()}, "shift": {strconv.FormatInt(shiftID, 10)}}.Encode()
}

// shiftRecordData is the dated shift an end-of-shift record is for.
type shiftRecordData struct {
	ward     *wardload.Ward
	day      wardload.Date
	shift    *wardload.ShiftPattern
	settings *wardload.Settings
	latest   *wardload.ShiftRecord // nil: none yet
}

// loadShiftRecord reads the dated shift from date and shift (query or
// form); EINVALID naming "shift" when they do not name one of the ward's.
func (s *Server) loadShiftRecord(r *http.Request, date, shift string) (*shiftRecordData, error) {
	ward := principalFrom(r.Context()).Ward
	d := &shiftRecordData{ward: ward}
	day, err := wardload.ParseDate(strings.TrimSpace(date))
	id, idErr := strconv.ParseInt(strings.TrimSpace(shift), 10, 64)
	if err != nil || idErr != nil {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "shift", "Choose a shift from the shift list.")
	}
	d.day = day
	d.shift, err = s.store.FindShiftPatternByID(r.Context(), id)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && d.shift.WardID != ward.ID) {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "shift", "This ward has no such shift.")
	} else if err != nil {
		return nil, fmt.Errorf("shift record: %w", err)
	}
	if d.settings, err = s.store.FindSettings(r.Context(), ward.ID); err != nil {
		return nil, fmt.Errorf("shift record: settings: %w", err)
	}
	rs, _, err := s.store.FindShiftRecords(r.Context(), wardload.ShiftRecordFilter{WardID: &ward.ID, ShiftID: &id, From: &day, To: &day, LatestOnly: true})
	if err != nil {
		return nil, fmt.Errorf("shift record: latest: %w", err)
	}
	if len(rs) > 0 {
		d.latest = rs[0]
	}
	return d, nil
}

// handleShiftRecordForm shows the end-of-shift record form of the dated
// shift ?date=&shift=, filled from its newest record when it has one; a
// shift that has not ended gets no form, only when it ends.
func (s *Server) handleShiftRecordForm(w http.ResponseWriter, r *http.Request) error {
	q := r.URL.Query()
	d, err := s.loadShiftRecord(r, q.Get("date"), q.Get("shift"))
	if err != nil {
		return err
	}
	vm, err := s.shiftRecordVM(r, d, nil, nil)
	if err != nil {
		return err
	}
	vm.Notice = s.sessions.PopString(r.Context(), sessFlash)
	return s.render(w, r, http.StatusOK, web.ShiftRecordPage(s.layout(r, "End of shift"), vm))
}

// handleShiftRecordCreate stores the posted record as the next revision.
// Bad input, or a shift that has not ended, re-renders the form with
// status 400, what was typed and the messages; nothing is stored.
func (s *Server) handleShiftRecordCreate(w http.ResponseWriter, r *http.Request) error {
	if err := r.ParseForm(); err != nil {
		return formError(err)
	}
	form := r.PostForm
	d, err := s.loadShiftRecord(r, form.Get("date"), form.Get("shift"))
	if err != nil {
		return err
	}
	rec, errs := parseShiftRecordForm(form, d.settings)
	rec.WardID, rec.Date, rec.ShiftID = d.ward.ID, d.day, d.shift.ID
	rec.EnteredBy = principalFrom(r.Context()).User.ID
	if len(errs) == 0 {
		// The domain's rules with the ward's beds, then the store's (the
		// shift must have ended by its clock).
		err := rec.Validate(d.settings.Beds)
		if err == nil {
			err = s.store.CreateShiftRecord(r.Context(), rec)
		}
		switch {
		case wardload.ErrorCode(err) == wardload.EINVALID:
			errs[wardload.ErrorField(err)] = wardload.ErrorMessage(err)
		case err != nil:
			return fmt.Errorf("shift record create: %w", err)
		}
	}
	if len(errs) > 0 {
		vm, err := s.shiftRecordVM(r, d, form, errs)
		if err != nil {
			return err
		}
		return s.render(w, r, http.StatusBadRequest, web.ShiftRecordPage(s.layout(r, "End of shift"), vm))
	}
	s.sessions.Put(r.Context(), sessFlash, fmt.Sprintf("Saved: end-of-shift record, revision %d.", rec.Revision))
	return seeOther(w, r, shiftRecordURL(d.ward, d.day, d.shift.ID))
}

// parseShiftRecordForm reads the form's counts (staff as on the census
// form, parseStaffCount; admissions and discharges required), the yes/no
// of care left undone and its category. The bounds are the domain's.
func parseShiftRecordForm(form url.Values, st *wardload.Settings) (*wardload.ShiftRecord, map[string]string) {
	rec := &wardload.ShiftRecord{}
	errs := map[string]string{}
	var msg string
	if rec.Worked.Nurses, msg = parseStaffCount(form.Get("nurses_worked")); msg != "" {
		errs["nurses_worked"] = msg
	}
	if st.SupportStaff {
		if rec.Worked.Support, msg = parseStaffCount(form.Get("support_worked")); msg != "" {
			errs["support_worked"] = msg
		}
	}
	for _, m := range []struct {
		field string
		n     *int
	}{{"admissions", &rec.Admissions}, {"discharges", &rec.Discharges}} {
		n, msg := parseStaffCount(form.Get(m.field))
		switch {
		case msg != "":
			errs[m.field] = strings.Replace(msg, "Staff are", "They are", 1)
		case n == nil:
			errs[m.field] = "Enter the number (0 if none)."
		default:
			*m.n = *n
		}
	}
	switch form.Get("care_left_undone") {
	case "yes":
		rec.CareLeftUndone = true
	case "no":
	default:
		errs["care_left_undone"] = "Answer yes or no."
	}
	rec.CareCategory = clip(strings.TrimSpace(form.Get("care_category")), 40)
	return rec, errs
}

// recordFieldIDs maps the record's fields to the inputs that show them.
var recordFieldIDs = map[string]string{
	"nurses_worked": "record-nurses", "support_worked": "record-support", "admissions": "record-admissions",
	"discharges": "record-discharges", "care_left_undone": "care-yes", "care_category": "care-category",
}

// shiftRecordVM builds the page: fields as posted (form not nil), else
// from the newest record, else empty.
func (s *Server) shiftRecordVM(r *http.Request, d *shiftRecordData, form url.Values, errs map[string]string) (web.ShiftRecordVM, error) {
	loc, err := d.ward.Location()
	if err != nil {
		return web.ShiftRecordVM{}, err
	}
	start, end, _ := d.shift.Window(d.day, loc)
	vm := web.ShiftRecordVM{
		WardName: d.ward.Name, ShiftName: shiftName(d.shift), ShiftWhen: datedShiftTimes(d.ward, d.day, start, end),
		Date: d.day.String(), ShiftID: strconv.FormatInt(d.shift.ID, 10),
		ActionURL: "/wards/" + d.ward.Code + "/shift-record", ListURL: projectionsURL(d.ward), NextRevision: 1,
	}
	if now := s.now(); now.Before(end) {
		vm.NotEnded = true
		vm.EndsAt = formatDay(wardload.DateOf(end.In(loc))) + " " + end.In(loc).Format("15:04")
	}
	ps, _, err := s.store.FindProjections(r.Context(), wardload.ProjectionFilter{WardID: &d.ward.ID, ShiftID: &d.shift.ID, From: &d.day, To: &d.day, Limit: 1})
	if err != nil {
		return vm, fmt.Errorf("shift record: projection: %w", err)
	}
	if len(ps) > 0 {
		vm.ProjectionURL = projectionURL(d.ward, ps[0].ID)
	}
	if l := d.latest; l != nil {
		vm.Latest = &web.ShiftRecordSummaryVM{Revision: l.Revision, EnteredAt: formatLocal(l.EnteredAt, d.ward), Summary: recordSummary(l)}
		vm.NextRevision = l.Revision + 1
	}
	value := func(field string, stored *int) string {
		switch {
		case form != nil:
			return clip(strings.TrimSpace(form.Get(field)), 12)
		case stored != nil:
			return strconv.Itoa(*stored)
		}
		return ""
	}
	var stored wardload.ShiftRecord
	if d.latest != nil {
		stored = *d.latest
	}
	storedInt := func(n int) *int {
		if d.latest == nil {
			return nil
		}
		return &n
	}
	vm.Counts = append(vm.Counts, web.StaffFieldVM{Name: "nurses_worked", InputID: "record-nurses", Label: "Nurses who worked",
		Hint: "Every nurse on the shift, the nurse in charge included.", Value: value("nurses_worked", stored.Worked.Nurses)})
	if d.settings.SupportStaff {
		vm.Counts = append(vm.Counts, web.StaffFieldVM{Name: "support_worked", InputID: "record-support", Label: "Support staff who worked",
			Hint: "Care staff who are not nurses; leave empty if not known.", Value: value("support_worked", stored.Worked.Support)})
	}
	vm.Counts = append(vm.Counts,
		web.StaffFieldVM{Name: "admissions", InputID: "record-admissions", Label: "Admissions", Hint: "Patients admitted during the shift (0 if none).",
			Value: value("admissions", storedInt(stored.Admissions))},
		web.StaffFieldVM{Name: "discharges", InputID: "record-discharges", Label: "Discharges", Hint: "Patients discharged or transferred out (0 if none).",
			Value: value("discharges", storedInt(stored.Discharges))})
	switch {
	case form != nil:
		vm.CareUndone = map[string]string{"yes": "yes", "no": "no"}[form.Get("care_left_undone")]
		vm.Category = clip(strings.TrimSpace(form.Get("care_category")), 40)
	case d.latest != nil:
		vm.CareUndone, vm.Category = "no", stored.CareCategory
		if stored.CareLeftUndone {
			vm.CareUndone = "yes"
		}
	}
	for _, c := range wardload.CareCategories {
		vm.Categories = append(vm.Categories, web.OptionVM{Value: c, Label: wardload.CareCategoryLabel(c)})
	}
	for i := range vm.Counts {
		f := &vm.Counts[i]
		f.Error = errs[f.Name]
	}
	vm.CareError, vm.CategoryError = errs["care_left_undone"], errs["care_category"]
	// Messages in the order of the form; one about the shift itself (it
	// has not ended) stands above it.
	for _, field := range []string{"nurses_worked", "support_worked", "admissions", "discharges", "care_left_undone", "care_category"} {
		if msg := errs[field]; msg != "" {
			vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#" + recordFieldIDs[field], Message: msg})
		}
	}
	for field, msg := range errs {
		if _, ok := recordFieldIDs[field]; !ok {
			vm.FormError = msg
			vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#record-error", Message: msg})
		}
	}
	return vm, nil
}

// recordSummary is a record in one sentence: "5 nurses, 1 support staff,
// 1 admission, 2 discharges; care left undone: Hygiene."
func recordSummary(r *wardload.ShiftRecord) string {
	plural := func(n int, one, many string) string {
		if n == 1 {
			return "1 " + one
		}
		return strconv.Itoa(n) + " " + many
	}
	s := nursesText(*r.Worked.Nurses)
	if r.Worked.Support != nil {
		s += ", " + strconv.Itoa(*r.Worked.Support) + " support staff"
	}
	s += ", " + plural(r.Admissions, "admission", "admissions") + ", " + plural(r.Discharges, "discharge", "discharges")
	switch {
	case !r.CareLeftUndone:
		return s + "; no care left undone."
	case r.CareCategory != "":
		return s + "; care left undone or delayed: " + wardload.CareCategoryLabel(r.CareCategory) + "."
	}
	return s + "; care left undone or delayed."
}
