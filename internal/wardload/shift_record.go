package wardload

import (
	"context"
	"slices"
	"time"
)

// Care left undone or delayed: the categories an end-of-shift record may
// name. A short fixed list, never free text, so nothing about a patient
// can be written in; the names are wardload's own.
const (
	CareObservations = "observations_delayed"
	CareMobility     = "mobility_repositioning"
	CareMedication   = "medication_timing"
	CareHygiene      = "hygiene"
	CareTeaching     = "teaching_discharge"
	CareOther        = "other"
)

// CareCategories lists the categories in the order forms offer them.
var CareCategories = []string{CareObservations, CareMobility, CareMedication, CareHygiene, CareTeaching, CareOther}

// CareCategoryLabel is the category's label on forms and pages.
func CareCategoryLabel(c string) string {
	switch c {
	case CareObservations:
		return "Observations delayed"
	case CareMobility:
		return "Mobility or repositioning"
	case CareMedication:
		return "Medication timing"
	case CareHygiene:
		return "Hygiene"
	case CareTeaching:
		return "Teaching or discharge preparation"
	case CareOther:
		return "Other"
	}
	return c
}

// MaxShiftMovements is the largest number of admissions (or discharges)
// one end-of-shift record may give: a plausibility bound that catches a
// typo (common practice, no source).
const MaxShiftMovements = 200

// ShiftRecord is what the charge nurse records when a dated shift has
// ended: the staff who actually worked, the admissions and discharges that
// happened, and whether care was left undone or delayed. A correction is a
// new ShiftRecord with the next Revision; earlier revisions are kept. It
// holds counts and a category from CareCategories only, never patient
// details.
type ShiftRecord struct {
	ID       int64
	WardID   int64
	Date     Date
	ShiftID  int64
	Revision int // 1 for the first record, set by the store
	// Worked is the staff who actually worked the shift; Nurses is
	// required, Support optional (wards without support staff leave it nil).
	Worked     StaffOnDuty
	Admissions int
	Discharges int
	// CareLeftUndone says some care was left undone or delayed;
	// CareCategory optionally names which (one of CareCategories), and is
	// empty when CareLeftUndone is false.
	CareLeftUndone bool
	CareCategory   string
	EnteredBy      int64
	EnteredAt      time.Time
}

// Validate checks the record's own fields, with the staff counts against
// MaxStaff(beds) (beds 0 when not at hand: the bound is MaxStaffOnDuty).
// It returns EINVALID naming the field.
func (r *ShiftRecord) Validate(beds int) error {
	if r.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if r.ShiftID == 0 {
		return FieldErrorf(EINVALID, "shift", "Shift is required.")
	}
	if r.Date.IsZero() {
		return FieldErrorf(EINVALID, "date", "Date is required.")
	}
	if r.Worked.Nurses == nil {
		return FieldErrorf(EINVALID, "nurses_worked", "Enter the number of nurses who worked the shift.")
	}
	if err := checkStaffCount(r.Worked.Nurses, beds, "nurses_worked", "Nurses who worked"); err != nil {
		return err
	}
	if err := checkStaffCount(r.Worked.Support, beds, "support_worked", "Support staff who worked"); err != nil {
		return err
	}
	for _, m := range []struct {
		n           int
		field, what string
	}{{r.Admissions, "admissions", "Admissions"}, {r.Discharges, "discharges", "Discharges"}} {
		if m.n < 0 {
			return FieldErrorf(EINVALID, m.field, "%s are counted from 0; the number cannot be negative.", m.what)
		}
		if m.n > MaxShiftMovements {
			return FieldErrorf(EINVALID, m.field, "%s: %d in one shift is not plausible; please check the number.", m.what, m.n)
		}
	}
	if r.CareCategory != "" && !slices.Contains(CareCategories, r.CareCategory) {
		return FieldErrorf(EINVALID, "care_category", "Choose one of the listed categories.")
	}
	if r.CareCategory != "" && !r.CareLeftUndone {
		return FieldErrorf(EINVALID, "care_category", "A category is only given when care was left undone or delayed.")
	}
	return nil
}

// CheckShift checks r against its ward w and shift pattern p as a store
// finds them (p nil when there is no such pattern): ENOTFOUND naming
// "shift" for a pattern not of the ward, EINVALID naming "shift" if the
// dated shift, in the ward's time zone, has not ended at now. What
// happened on a shift is known only once it is over.
func (r *ShiftRecord) CheckShift(w *Ward, p *ShiftPattern, now time.Time) error {
	if p == nil || p.WardID != r.WardID || w.ID != r.WardID {
		return FieldErrorf(ENOTFOUND, "shift", "Shift not found for this ward.")
	}
	loc, err := w.Location()
	if err != nil {
		return err
	}
	if _, end, _ := p.Window(r.Date, loc); now.Before(end) {
		return FieldErrorf(EINVALID, "shift", "This shift ends %s: the end-of-shift record can be entered once it has ended.",
			end.In(loc).Format("Mon 2 Jan 15:04"))
	}
	return nil
}

// ShiftRecordFilter selects end-of-shift records. Zero fields do not
// filter.
type ShiftRecordFilter struct {
	WardID     *int64
	ShiftID    *int64
	From, To   *Date // inclusive
	LatestOnly bool  // only the newest revision of each ward × date × shift
	Offset     int
	Limit      int
}

// ShiftRecordService stores end-of-shift records and their revisions.
type ShiftRecordService interface {
	// CreateShiftRecord stores r as the next revision for its ward, date
	// and shift and sets ID, Revision and EnteredAt (the store's clock),
	// with the audit row "shift_record.create". Returns EINVALID naming
	// the field (r.Validate(0); "shift" when the dated shift has not ended
	// at the store's clock, CheckShift), or ENOTFOUND for an unknown ward
	// or a shift not of the ward; nothing is stored on error.
	CreateShiftRecord(ctx context.Context, r *ShiftRecord) error
	// FindShiftRecords returns matches ordered by Date descending, shift
	// start, then Revision descending, and the total ignoring Offset and
	// Limit.
	FindShiftRecords(ctx context.Context, f ShiftRecordFilter) ([]*ShiftRecord, int, error)
}

func (r *ShiftRecord) auditRecord() auditRecord {
	return auditRecord{"shift_record", r.ID, []int64{r.WardID}, r}
}
