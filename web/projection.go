package web

// ProjectionVM is the page of one stored projection. Figures that the
// roster export also carries are already formatted with the export's
// helpers, so page and export agree to the last digit.
type ProjectionVM struct {
	WardName   string
	Date       string
	ShiftName  string
	ShiftTimes string // e.g. "19:30 to 07:30 (Europe/Dublin)"
	ShiftHours string
	Revision   int
	// NewerURL links to the newest revision when this one is not it.
	NewerURL      string
	NewerRevision int
	GeneratedAt   string

	Recommended string
	NursesCover string
	Floor       string // "" when no floor is configured
	DecidedBy   string // the export's code: cover, ratio_floor or both
	DecidedText string // the same in words
	FloorRule   string
	// SettingsURL links to the ward settings where the floor is set; ""
	// for roles that may not change them.
	SettingsURL string

	CoverLevel         string // e.g. "0.9"
	CoverPercent       string // e.g. "90%"
	TotalPatients      string
	ExpectedCareHours  string
	ExpectedNurseHours string
	CoverNurseHours    string
	BandLow            string
	BandHigh           string
	DirectCareFraction string

	Chart     ChartVM
	Shortfall []ShortfallRowVM
	Tiers     []TierShareVM

	LookbackFrom     string
	LookbackTo       string
	LookbackWeeks    string
	ObservationShift string
	Observations     string // in all tiers
	Warnings         []string

	MethodVersion  string
	Seed           string
	Draws          string
	QuantileMethod string
	Quartiles      string

	Caution string

	Revisions  []RevisionVM
	CensusURL  string // enter a correction
	ListURL    string // the ward's shift list
	LowerBound bool   // the band's low end is below zero (normal approximation poor)
}

// ShortfallRowVM is one headcount of the shortfall table.
type ShortfallRowVM struct {
	Nurses      string
	Capacity    string // nurse-hours the headcount gives
	Analytic    string // normal model, as a percentage
	Simulated   string // bootstrap share, as a percentage
	SimulatedSE string
	Recommended bool
}

// TierShareVM is one tier's part of the expected workload.
type TierShareVM struct {
	Label        string
	Code         string
	Patients     string
	Observations string
	Mean         string // care minutes per patient per shift
	SD           string
	Expected     string // expected care minutes of the tier's patients
	Share        string // of the expected total
}

// RevisionVM is one census revision of the same ward, date and shift.
type RevisionVM struct {
	Revision    int
	EnteredAt   string
	Total       string
	Recommended string // "" without a projection
	URL         string // "" without a projection
	Current     bool
}

// ProjectionListVM is a ward's shift list: the newest projection of each
// dated shift in a date range, newest first.
type ProjectionListVM struct {
	WardName  string
	TimeZone  string
	PageURL   string
	From      string
	To        string
	FromError string
	ToError   string
	Rows      []ProjectionRowVM
	// CSVURL and JSONURL download the same range; "" for roles that may
	// not export.
	CSVURL    string
	JSONURL   string
	CensusURL string
}

// ProjectionRowVM is one dated shift in the shift list.
type ProjectionRowVM struct {
	Date               string
	Shift              string
	Revision           string
	TotalPatients      string
	Recommended        string
	Floor              string // "none" when not configured
	NursesCover        string
	ExpectedNurseHours string
	URL                string
}
