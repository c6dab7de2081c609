package server

import (
	"net/url"

	"wardload/internal/wardload"
	"wardload/web"
)

// Form fields of the planned movement; the names the domain's errors give
// (wardload.PlannedMovement.Check), so a refusal lands beside its field.
const (
	plannedAdmissionsField = "planned_admissions"
	plannedDischargesField = "planned_discharges"
)

// parsePlannedCount reads one optional whole-number planned count: empty
// is "not entered" (nil). The bounds against beds and census are the
// domain's; here only the form is read.
func parsePlannedCount(v string) (*int, string) {
	return parseOptionalCount(v, wardload.MaxShiftMovements, countText{
		negative:    "Counted from 0; the number cannot be negative.",
		example:     "Enter a whole number, such as 2.",
		implausible: "That number is not plausible for one shift; please check it.",
	})
}

// parsePlannedForm reads the optional planned admissions and discharges
// of a census form and, when the counts were read (patients ≥ 0), checks
// them against the beds and the census. The map names each bad field.
func parsePlannedForm(form url.Values, st *wardload.Settings, patients int) (wardload.PlannedMovement, map[string]string) {
	errs := map[string]string{}
	var m wardload.PlannedMovement
	var msg string
	if m.Admissions, msg = parsePlannedCount(form.Get(plannedAdmissionsField)); msg != "" {
		errs[plannedAdmissionsField] = msg
	}
	if m.Discharges, msg = parsePlannedCount(form.Get(plannedDischargesField)); msg != "" {
		errs[plannedDischargesField] = msg
	}
	if len(errs) == 0 && patients >= 0 {
		if err := m.Check(st.Beds, patients); err != nil {
			errs[wardload.ErrorField(err)] = wardload.ErrorMessage(err)
		}
	}
	return m, errs
}

// plannedFieldsVM builds the planned-movement fields: as posted (form not
// nil), else from the latest revision of this shift (a correction keeps
// them), else empty. They are never carried from another shift. The
// section is open when a field has a value or an error.
func plannedFieldsVM(vm *web.CensusVM, form url.Values, latest *wardload.Census, errs map[string]string) {
	fields := []web.StaffFieldVM{
		{Name: plannedAdmissionsField, InputID: "planned-admissions", Label: "Planned admissions",
			Hint: "Admissions and transfers in you already know of for this shift, e.g. 2 from theatre."},
		{Name: plannedDischargesField, InputID: "planned-discharges", Label: "Planned discharges",
			Hint: "Discharges and transfers out you already know of for this shift."},
	}
	fillCountFields(vm, fields, form, errs, func(name string) *int {
		if latest == nil {
			return nil
		}
		if name == plannedDischargesField {
			return latest.Planned.Discharges
		}
		return latest.Planned.Admissions
	})
	for _, f := range fields {
		vm.PlannedOpen = vm.PlannedOpen || f.Value != "" || f.Error != ""
	}
	vm.Planned = fields
}
