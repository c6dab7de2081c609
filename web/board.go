package web

// BoardVM is the hospital board: every ward × dated shift the viewer may
// see in the window, most at risk first.
type BoardVM struct {
	Week            bool   // the 7-day view; else the next 24 hours
	From, To        string // the window, in UTC
	Caution         string // the projection caution, once for the board
	CSVURL, JSONURL string
	Downloads       bool // the viewer's role may download the board
	Rows            []BoardRowVM
}

// BoardRowVM is one ward × dated shift of the board, as text.
type BoardRowVM struct {
	Ward, WardName string
	Date, Shift    string
	Window         string // local start–end with the zone
	Status         string // the census state in words ("no census yet")
	Patients       string
	Recommended    string
	Floor          string
	FloorRule      string
	Planned        string
	Difference     string // planned − recommended, signed; "–" when unknown
	Short          bool   // planned below the recommendation
	BelowFloor     bool   // planned below the ratio floor
	Chance         string // chance of a shortfall with the planned staff
	ProjectionURL  string // "" without a projection
	PlanURL        string // "" when the viewer may not plan
}

// StaffingVM is a ward's planned-staff page: its dated shifts over a week
// with the nurses planned for each, a form per shift.
type StaffingVM struct {
	WardName string
	PageURL  string // the form's action and the date picker's target
	From     string // first date shown, YYYY-MM-DD
	Notice   string
	Error    string // the failed save's message, shown above the table
	MaxStaff string // the plausibility bound, for the inputs' max
	Rows     []StaffingRowVM
}

// StaffingRowVM is one dated shift with its plan.
type StaffingRowVM struct {
	Date, ShiftID, Shift, Window string
	Nurses                       string // "" when not planned
	UpdatedAt                    string
	Recommended                  string // the newest projection's, or "–"
	Invalid                      bool   // the failed save was this row
}

// OwnTokensVM is the page where a reader (manager, staffing office,
// admin) manages the API tokens they made, each for several wards.
type OwnTokensVM struct {
	NewName, NewSecret string
	SecretLost         bool
	Notice             string
	Error              string
	FormName           string
	FormWrite          bool
	Wards              []WardOptionVM
	Tokens             []OwnTokenRowVM
}

// OwnTokenRowVM is one token of the list.
type OwnTokenRowVM struct {
	Name, Wards, CreatedAt, LastUsed, Revoked string
	Permission                                string // "read" or "read, send planned staff"
	RevokeURL                                 string
}
