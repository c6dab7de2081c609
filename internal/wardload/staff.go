package wardload

// MaxStaffOnDuty is the largest number of nurses (or support staff) one
// ward can plausibly have on one shift: a bound that catches a typo such
// as 60 for 6 (common practice, no source).
const MaxStaffOnDuty = 200

// MaxStaff is the plausibility bound of a staff count on a ward with beds
// beds: twice the beds (a ward of two nurses per patient is already
// intensive care) but never more than MaxStaffOnDuty; with beds not set,
// MaxStaffOnDuty (common practice, no source).
func MaxStaff(beds int) int {
	if beds > 0 {
		return min(2*beds, MaxStaffOnDuty)
	}
	return MaxStaffOnDuty
}

// StaffOnDuty is the staff the charge nurse says are on duty with a
// census: optional counts, nil when not entered. Nurses are every nurse on
// the shift, the nurse in charge included, as the projection's headcount
// counts them; Support are care staff who are not nurses, entered only on
// wards that use them (Settings.SupportStaff).
type StaffOnDuty struct {
	Nurses  *int
	Support *int
}

// Check returns EINVALID naming "nurses_on_duty" or "support_on_duty" if a
// count is negative or above MaxStaff(beds). Pass beds 0 when the ward's
// beds are not at hand: the bound is then MaxStaffOnDuty.
func (s StaffOnDuty) Check(beds int) error {
	if err := checkStaffCount(s.Nurses, beds, "nurses_on_duty", "Nurses on duty"); err != nil {
		return err
	}
	return checkStaffCount(s.Support, beds, "support_on_duty", "Support staff on duty")
}

// checkStaffCount checks one optional staff count against MaxStaff(beds).
func checkStaffCount(n *int, beds int, field, what string) error {
	if n == nil {
		return nil
	}
	if *n < 0 {
		return FieldErrorf(EINVALID, field, "%s are counted from 0; the number cannot be negative.", what)
	}
	if limit := MaxStaff(beds); *n > limit {
		if beds > 0 {
			return FieldErrorf(EINVALID, field, "%s: %d is more than twice the ward's %d beds; please check the number.", what, *n, beds)
		}
		return FieldErrorf(EINVALID, field, "%s: %d is more than %d, which is not plausible for one ward; please check the number.", what, *n, limit)
	}
	return nil
}
