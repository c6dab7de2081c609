package wardload

import (
	"context"
	"time"
)

// PlannedStaff is the staff rostered for one dated shift of a ward: what
// the roster planner (or the charge nurse or manager) plans before the
// shift. It is one value per ward × date × shift, replaced by each save;
// the audit log keeps the earlier values. The staff who actually worked
// are not here: they are the census's StaffOnDuty and the end-of-shift
// record (ShiftRecord.Worked).
type PlannedStaff struct {
	WardID  int64
	Date    Date
	ShiftID int64
	// Nurses is every nurse rostered, the nurse in charge included, as
	// the projection's headcount counts them.
	Nurses int
	// Support is care staff who are not nurses; nil when not planned.
	Support   *int
	UpdatedBy int64     // user ID; 0 for an API token or the command line
	UpdatedAt time.Time // set by the store
}

// CheckRetired refuses a plan for a retired ward or shift pattern:
// nothing new is planned for what no longer runs (its past plans stay).
func (p *PlannedStaff) CheckRetired(w *Ward, sp *ShiftPattern) error {
	if w.Retired() {
		return FieldErrorf(EINVALID, "ward", "Ward %s is retired, so no staff can be planned for it.", w.Code)
	}
	if sp.Retired() {
		return FieldErrorf(EINVALID, "shift", "The %s shift is retired, so no staff can be planned for it.", sp.Name)
	}
	return nil
}

// Validate checks the plan's own fields: a ward, shift and date, and
// counts from 0 to MaxStaff(beds) (beds 0 when not at hand), as EINVALID
// naming "nurses" or "support".
func (p *PlannedStaff) Validate(beds int) error {
	if p.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if p.ShiftID == 0 {
		return FieldErrorf(EINVALID, "shift", "Shift is required.")
	}
	if p.Date.IsZero() {
		return FieldErrorf(EINVALID, "date", "Date is required.")
	}
	n := p.Nurses
	if err := checkStaffCount(&n, beds, "nurses", "Planned nurses"); err != nil {
		return err
	}
	return checkStaffCount(p.Support, beds, "support", "Planned support staff")
}

// Same reports whether p plans the same staff as q (ward, date, shift and
// counts), whoever saved them when.
func (p *PlannedStaff) Same(q *PlannedStaff) bool {
	if p.WardID != q.WardID || p.Date != q.Date || p.ShiftID != q.ShiftID || p.Nurses != q.Nurses {
		return false
	}
	if (p.Support == nil) != (q.Support == nil) {
		return false
	}
	return p.Support == nil || *p.Support == *q.Support
}

// PlannedStaffFilter selects plans. Zero fields do not filter.
type PlannedStaffFilter struct {
	WardIDs  []int64 // nil: every ward; empty: none
	From, To *Date   // inclusive, on the dated shift's Date
}

// PlannedStaffService keeps the staff planned per dated shift.
type PlannedStaffService interface {
	// SetPlannedStaff stores p as the plan of its ward, date and shift,
	// replacing any earlier plan, with the audit row "staffing.plan". It is
	// idempotent: when the stored plan already has the same counts nothing
	// is written or audited and changed is false. On success p.UpdatedBy
	// and p.UpdatedAt are those of the stored plan. Returns EINVALID naming
	// the field (counts checked against the ward's beds), or ENOTFOUND for
	// an unknown ward or a shift that is not the ward's; nothing is stored
	// on error.
	SetPlannedStaff(ctx context.Context, p *PlannedStaff) (changed bool, err error)
	// FindPlannedStaff returns the plans that match, by ward, date and
	// shift ID.
	FindPlannedStaff(ctx context.Context, f PlannedStaffFilter) ([]*PlannedStaff, error)
}

// plannedAudit is what the audit log keeps of a plan: its dated shift
// with the date as YYYY-MM-DD, and the counts.
type plannedAudit struct {
	WardID    int64
	Date      string
	ShiftID   int64
	Nurses    int
	Support   *int
	UpdatedBy int64
	UpdatedAt time.Time
}

// auditRecord names the plan by its shift pattern's ID (a plan has no ID
// of its own; the JSON gives the date).
func (p *PlannedStaff) auditRecord() auditRecord {
	return auditRecord{"planned_staff", p.ShiftID, []int64{p.WardID},
		plannedAudit{p.WardID, p.Date.String(), p.ShiftID, p.Nurses, p.Support, p.UpdatedBy, p.UpdatedAt}}
}
