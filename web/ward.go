package web

// WardNewVM is the admin's "New ward" page and, with Edit set, the
// "Edit ward" page: the form, as typed when it was refused, and the time
// zones offered.
type WardNewVM struct {
	ActionURL string
	// Edit is the edit form: the code is shown, not asked for.
	Edit     bool
	Code     string
	Name     string
	TimeZone string
	Beds     string
	// Zones are the IANA names of the time zone <select>; a stored name
	// not among them is added first, so editing never changes it silently.
	Zones []string
	// Errors are the messages by form field; Summary lists them, in the
	// order of the form, each linking to its input.
	Errors  map[string]string
	Summary []FormErrorVM
	// Retire is the retire (or reinstate) form of the edit page.
	Retire *RetireVM
	// SetupURL links to the ward's set-up checklist (edit page).
	SetupURL string
	// Notice is what was just saved.
	Notice string
}

// RetireVM is a small form that retires (or, when Retired, reinstates) a
// ward, shift pattern or tier. What names it in words ("ward w4-north",
// "shift pattern Night"); RetiredOn is when it was retired, in the ward's
// time zone. Error is the refusal to show beside the button.
type RetireVM struct {
	ID        string // unique on the page, for the ids of its inputs
	URL       string
	What      string
	Retired   bool
	RetiredOn string
	// Confirm asks for a tick before retiring (wards).
	Confirm bool
	Error   string
}

// WardSetupVM is the short checklist at the top of the settings page of a
// ward that cannot take a census yet. Nil: the ward is set up.
type WardSetupVM struct {
	HasShifts bool
	HasTiers  bool
	CensusURL string
	SetupURL  string
}

// WardSetupPageVM is a new ward's guided set-up: each step with whether
// the ward's stored data show it done, and where to do it.
type WardSetupPageVM struct {
	WardName string
	WardCode string
	Notice   string
	Retired  bool
	Steps    []SetupStepVM
	// Ready: shift patterns and tiers exist, so a census can be entered.
	Ready     bool
	CensusURL string
}

// SetupStepVM is one step of the set-up: Title links to URL; Status says
// what the data show ("2 active: Day, Night" or "Not yet"); Optional
// steps do not hold up the first census.
type SetupStepVM struct {
	Title    string
	URL      string
	Done     bool
	Optional bool
	Status   string
	Hint     string
}
