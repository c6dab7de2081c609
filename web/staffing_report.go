package web

// StaffingReportVM is a ward's planned-and-worked-against-needed report.
type StaffingReportVM struct {
	WardName, URL, Weeks, WindowText string
	ProjectionsURL                   string
	Floors                           []string // the ratio floors the projections used, "Day: 6 nurses"
	Rows                             []StaffingWeekVM
	BelowFloor                       []StaffedShiftVM // shifts worked below the ratio floor
}

// StaffingWeekVM is one ISO week of the report.
type StaffingWeekVM struct {
	Week, Range                       string
	Shifts, Recorded                  string
	BelowRec, BelowFloor              string
	Planned, PlanBelow                string
	HoursShort, HoursOver, CareUndone string
}

// StaffedShiftVM is one dated shift of the report.
type StaffedShiftVM struct {
	Date, Shift, Recommended, Floor, Planned, Worked string
}
