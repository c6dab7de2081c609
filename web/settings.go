package web

// SettingsVM is a ward's settings page for managers: the staffing
// settings, the ratio floors per shift, the shift patterns and the tiers,
// each in its own form. A form that failed shows the input as typed and
// its messages by field; the others show what is stored.
type SettingsVM struct {
	WardName string
	Notice   string // one-time "Saved." after a successful post
	Updated  string // when and by whom the settings were last saved; "" if never

	GeneralURL string
	General    GeneralFormVM
	Quartiles  []QuartileOptionVM

	FloorsURL   string
	FloorShifts []FloorShiftVM
	FloorsError string // a message about the floors as a whole

	Shifts      []ShiftFormVM // one edit form per stored pattern
	NewShift    ShiftFormVM
	NewShiftURL string

	Tiers      []TierFormVM // one edit form per stored tier
	NewTier    TierFormVM
	NewTierURL string
}

// GeneralFormVM is the staffing settings form. Values are strings so that
// a rejected entry is shown back exactly as typed.
type GeneralFormVM struct {
	DirectCareFraction string
	CoverLevel         string
	LookbackWeeks      string
	Quartiles          string
	Beds               string
	ChangeoverMinutes  string
	SupportStaff       bool
	Escalation         string
	Errors             map[string]string // by form field name
}

// QuartileOptionVM is one quartile convention with a one-line explanation.
type QuartileOptionVM struct {
	Value       string
	Label       string
	Explanation string
	Default     bool
}

// FloorShiftVM is the ratio floors of one shift pattern: a ward-wide
// floor and optional floors for single tiers. Field names are the form's.
type FloorShiftVM struct {
	ShiftName         string
	WardField         string
	WardValue         string
	ChargeField       string
	ChargeNurseCounts bool
	Tiers             []FloorTierVM
	Errors            map[string]string // by form field name
}

// FloorTierVM is the floor of one tier on one shift.
type FloorTierVM struct {
	Field string
	Code  string
	Label string
	Value string
}

// ShiftFormVM is a shift pattern form (edit or add). ID is "new" for the
// add form; IDs of inputs are made unique with it.
type ShiftFormVM struct {
	ID     string
	URL    string
	Name   string
	Start  string // HH:MM
	Hours  string
	Errors map[string]string
	// Retire retires or reinstates a stored pattern (nil on the add form).
	Retire *RetireVM
}

// TierFormVM is a tier form (edit or add). Code can only be set when
// adding: census and observations refer to it. ID is "new" for the add
// form.
type TierFormVM struct {
	New         bool // the add form
	ID          string
	URL         string
	Code        string
	Label       string
	Description string
	Order       string
	Errors      map[string]string
	// Retire retires or reinstates a stored tier (nil on the add form).
	Retire *RetireVM
}
