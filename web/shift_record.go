package web

// ShiftRecordVM is the end-of-shift record page of one dated shift: who
// actually worked, the admissions and discharges that happened, and
// whether care was left undone or delayed. Counts and a category from a
// fixed list only: the page never asks for patient details.
type ShiftRecordVM struct {
	WardName  string
	ShiftName string // "Night shift"
	ShiftWhen string // "Fri 4 Dec 19:30–07:30"
	Date      string // YYYY-MM-DD
	ShiftID   string
	ActionURL string
	ListURL   string // the shift list
	// ProjectionURL is the shift's newest projection ("" without one).
	ProjectionURL string
	Notice        string // one-time "Saved …" after a post

	// NotEnded is set while the shift is running or still to come: the
	// form opens once it has ended, at EndsAt.
	NotEnded bool
	EndsAt   string

	Latest       *ShiftRecordSummaryVM // nil when the shift has no record yet
	NextRevision int

	Counts []StaffFieldVM // nurses, support staff (where used), admissions, discharges
	// CareUndone is "yes", "no" or "" (not answered); Category one of
	// Categories' values or "".
	CareUndone    string
	CareError     string
	Category      string
	Categories    []OptionVM
	CategoryError string

	// Errors lists every problem at the top, each linking to its field;
	// FormError is one about the record as a whole (e.g. the shift has not
	// ended).
	Errors    []FormErrorVM
	FormError string
}

// ShiftRecordSummaryVM is the newest end-of-shift record, which a
// correction starts from.
type ShiftRecordSummaryVM struct {
	Revision  int
	EnteredAt string
	Summary   string // "5 nurses, 1 admission, 2 discharges; no care left undone."
}

// OptionVM is one option of a select.
type OptionVM struct {
	Value string
	Label string
}
