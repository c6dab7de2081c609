package web

// CensusVM is the census entry page: a small form that chooses the dated
// shift, and the form of patient counts per tier for that shift.
type CensusVM struct {
	WardName string
	TimeZone string
	Today    string // the ward's calendar date, YYYY-MM-DD
	// PageURL is where the shift chooser sends its GET; ActionURL is where
	// the counts are posted (the same address).
	PageURL   string
	ActionURL string

	// The chooser, as typed or preselected.
	Date    string
	MinDate string // the projector's window of allowed dates
	MaxDate string
	Shifts  []ShiftOptionVM

	// Chosen is set when Date and the selected shift are valid: the tier
	// form is shown only then.
	Chosen bool
	// Rechoose: the posted shift was retired meanwhile; the counts form
	// asks for one of Shifts itself, so that what was typed is not lost.
	Rechoose     bool
	ShiftLabel   string // e.g. "Night, 19:30, 12 hours"
	ShiftID      string
	Tiers        []TierFieldVM
	Latest       *LatestCensusVM // nil when the shift has no census yet
	NextRevision int
	// Carried is the ward's newest census of an earlier shift whose counts
	// fill the fields when this shift has none (nil: nothing carried).
	Carried *CarriedCensusVM
	// Beds is the ward's bed count (0: not set); TotalText the sentence
	// "11 patients of 28 beds." for the counts shown, TotalOver set when
	// they exceed the beds. ScriptURL is the versioned census.js, which
	// keeps the sentence current while typing.
	// Staff are the optional fields of the staff on duty, stored with the
	// census revision.
	Staff []StaffFieldVM
	// Planned are the optional planned admissions and discharges of the
	// shift, in a section that is open when one has a value or an error.
	Planned     []StaffFieldVM
	PlannedOpen bool
	Beds        int
	TotalText   string
	TotalOver   bool
	ScriptURL   string

	// Choices are the large shift choices at a change-over: the shift
	// about to start first, the one running second (empty when there is
	// only one likely shift).
	Choices []ShiftChoiceVM
	// The dated shift a save stores, for the sentence near Save: "Saving
	// stores the census for Day shift on Fri 4 Dec 2026 (07:30–20:00)".
	SaveShift string
	SaveDate  string
	SaveTimes string
	// Ended is set when that shift has ended (EndedAt, e.g. "Fri 4 Dec
	// 08:00"); ConfirmEnded when a save of it was posted without
	// confirmation: the page asks, and the form then carries the
	// confirmation.
	Ended        bool
	EndedAt      string
	ConfirmEnded bool

	// Errors lists every problem at the top of the page, each linking to
	// its field; DateError and ShiftError are shown beside those fields.
	Errors     []FormErrorVM
	DateError  string
	ShiftError string
	CountError string // a problem of the counts as a whole (the total above the beds)

	NoShifts bool // the ward has no shift patterns yet
	NoTiers  bool // the ward has no acuity tiers yet
	// SetupURL links a manager or admin from a ward not yet set up to
	// its set-up checklist ("" for charge nurses).
	SetupURL string
	// Closed, when set, says why the ward takes no census (retired).
	Closed string
}

// ShiftOptionVM is one shift pattern in the chooser.
type ShiftOptionVM struct {
	ID       string
	Label    string
	Selected bool
}

// ShiftChoiceVM is one large choice of a dated shift, e.g. "Day shift,
// Fri 4 Dec 07:30–20:00 (starts in 20 min)"; URL opens the census of it.
type ShiftChoiceVM struct {
	Label    string
	URL      string
	Selected bool
}

// TierFieldVM is the count field of one acuity tier.
type TierFieldVM struct {
	Name        string // form field, "tier_<code>"
	InputID     string // HTML id of the input
	Label       string
	Description string
	Value       string // as typed, or from the latest census
	Error       string
	Carried     bool // Value came from another shift's census
}

// DescID is the id of the tier's description, for aria-describedby.
func (t TierFieldVM) DescID() string { return t.InputID + "-desc" }

// ErrorID is the id of the tier's error message, for aria-describedby.
func (t TierFieldVM) ErrorID() string { return t.InputID + "-error" }

// DescribedBy lists the ids that describe the input: its error first.
func (t TierFieldVM) DescribedBy() string {
	ids := ""
	if t.Error != "" {
		ids = t.ErrorID() + " "
	}
	if t.Description != "" {
		ids += t.DescID()
	}
	return ids
}

// LatestCensusVM is the newest census of the chosen shift, which a
// correction starts from.
type LatestCensusVM struct {
	Revision      int
	EnteredAt     string
	Total         int
	ProjectionURL string // "" when that revision has no projection
}

// CarriedCensusVM names the census whose counts were carried forward.
type CarriedCensusVM struct {
	From      string // "Night shift, Thu 3 Dec 2026"
	Revision  int
	EnteredAt string
	Total     int
}

// FormErrorVM is one entry of an error summary.
type FormErrorVM struct {
	Href    string // "#<input id>"
	Message string
}

// StaffFieldVM is one optional field of the staff on duty (nurses, and
// support staff where the ward uses them).
type StaffFieldVM struct {
	Name    string // form field, "nurses_on_duty" or "support_on_duty"
	InputID string
	Label   string
	Hint    string
	Value   string // as typed, or from the latest revision of this shift
	Error   string
}
