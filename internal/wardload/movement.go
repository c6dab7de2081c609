package wardload

// PlannedMovement is the census movement the charge nurse already knows of
// for the shift (for example two planned admissions from theatre),
// entered with the census: optional counts, nil when not entered. The
// projection takes each as the least the shift will see; transfers in
// count as admissions and transfers out as discharges.
type PlannedMovement struct {
	Admissions *int
	Discharges *int
}

// Check returns EINVALID naming "planned_admissions" or
// "planned_discharges" if a count is negative, admissions are above the
// ward's beds (above MaxShiftMovements when beds is 0, not configured) or
// discharges above the census's patients.
func (m PlannedMovement) Check(beds, patients int) error {
	if n := m.Admissions; n != nil {
		switch {
		case *n < 0:
			return FieldErrorf(EINVALID, "planned_admissions", "Planned admissions are counted from 0; the number cannot be negative.")
		case beds > 0 && *n > beds:
			return FieldErrorf(EINVALID, "planned_admissions", "Planned admissions: %d is more than the ward's %d beds; please check the number.", *n, beds)
		case *n > MaxShiftMovements:
			return FieldErrorf(EINVALID, "planned_admissions", "Planned admissions: %d in one shift is not plausible; please check the number.", *n)
		}
	}
	if n := m.Discharges; n != nil {
		switch {
		case *n < 0:
			return FieldErrorf(EINVALID, "planned_discharges", "Planned discharges are counted from 0; the number cannot be negative.")
		case *n > patients:
			return FieldErrorf(EINVALID, "planned_discharges", "Planned discharges: %d is more than the %d patients in this census; please check the number.", *n, patients)
		}
	}
	return nil
}
