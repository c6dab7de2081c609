package server

import (
	"net/url"
	"strconv"
	"strings"

	"wardload/internal/wardload"
	"wardload/web"
)

// Form fields of the staff on duty; the same names the domain's errors
// give (wardload.StaffOnDuty.Check), so a refusal lands beside its field.
const (
	nursesOnDutyField  = "nurses_on_duty"
	supportOnDutyField = "support_on_duty"
)

// parseStaffCount reads one optional whole-number staff count: empty is
// "not entered" (nil). The bounds are the domain's (StaffOnDuty.Check and
// ShiftRecord.Validate); here only the form is read, with a message that
// says what to type.
func parseStaffCount(v string) (*int, string) {
	return parseOptionalCount(v, wardload.MaxStaffOnDuty, countText{
		negative:    "Staff are counted from 0; the number cannot be negative.",
		example:     "Enter a whole number, such as 6.",
		implausible: "That number is not plausible for one ward; please check it.",
	})
}

// countText is what the messages of one optional count say.
type countText struct{ negative, example, implausible string }

// parseOptionalCount reads an optional whole number of at most limit:
// empty is "not entered" (nil); otherwise the number or t's message.
func parseOptionalCount(v string, limit int, t countText) (*int, string) {
	v = strings.TrimSpace(v)
	switch {
	case v == "":
		return nil, ""
	case strings.HasPrefix(v, "-"):
		return nil, t.negative
	case strings.Trim(v, "0123456789") != "":
		return nil, t.example
	}
	n, err := strconv.Atoi(v)
	if err != nil || n > limit {
		return nil, t.implausible
	}
	return &n, ""
}

// parseStaffForm reads the optional staff on duty of a census form and
// checks them against the ward's beds. Support staff are read only where
// the ward uses them. The map names each bad field.
func parseStaffForm(form url.Values, st *wardload.Settings) (wardload.StaffOnDuty, map[string]string) {
	errs := map[string]string{}
	var staff wardload.StaffOnDuty
	var msg string
	if staff.Nurses, msg = parseStaffCount(form.Get(nursesOnDutyField)); msg != "" {
		errs[nursesOnDutyField] = msg
	}
	if st.SupportStaff {
		if staff.Support, msg = parseStaffCount(form.Get(supportOnDutyField)); msg != "" {
			errs[supportOnDutyField] = msg
		}
	}
	if len(errs) == 0 {
		if err := staff.Check(st.Beds); err != nil {
			errs[wardload.ErrorField(err)] = wardload.ErrorMessage(err)
		}
	}
	return staff, errs
}

// staffFieldsVM builds the staff-on-duty fields: as posted (form not nil),
// else from the latest revision of this shift (a correction keeps them),
// else empty. Staff are never carried from another shift: they differ
// from shift to shift.
func staffFieldsVM(vm *web.CensusVM, st *wardload.Settings, form url.Values, latest *wardload.Census, errs map[string]string) {
	fields := []web.StaffFieldVM{{Name: nursesOnDutyField, InputID: "staff-nurses", Label: "Nurses on duty",
		Hint: "Every nurse on the shift, the nurse in charge included."}}
	if st.SupportStaff {
		fields = append(fields, web.StaffFieldVM{Name: supportOnDutyField, InputID: "staff-support", Label: "Support staff on duty",
			Hint: "Care staff who are not nurses."})
	}
	fillCountFields(vm, fields, form, errs, func(name string) *int {
		if latest == nil {
			return nil
		}
		if name == supportOnDutyField {
			return latest.Staff.Support
		}
		return latest.Staff.Nurses
	})
	vm.Staff = fields
}

// fillCountFields sets each count field's value as posted (form not nil)
// or else as stored(name) gives it (nil: empty), and its error from errs,
// adding each error to the form's summary.
func fillCountFields(vm *web.CensusVM, fields []web.StaffFieldVM, form url.Values, errs map[string]string, stored func(name string) *int) {
	for i := range fields {
		f := &fields[i]
		if form != nil {
			f.Value = clip(strings.TrimSpace(form.Get(f.Name)), 12)
		} else if n := stored(f.Name); n != nil {
			f.Value = strconv.Itoa(*n)
		}
		f.Error = errs[f.Name]
		if f.Error != "" {
			vm.Errors = append(vm.Errors, web.FormErrorVM{Href: "#" + f.InputID, Message: f.Label + ": " + f.Error})
		}
	}
}
