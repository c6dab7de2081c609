package web

import "strconv"

// ProjectionVM is the page of one stored projection. Figures that the
// roster export also carries are already formatted with the export's
// helpers, so page and export agree to the last digit.
//
// A declined projection (Declined: too few observations to estimate care
// time) has no band, chart, shortfall table or probability: only the
// headcount the ratio floor gives, if any, and what data are missing.
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

	// MethodV1 marks a projection made with method 1, shown as stored.
	MethodV1 bool

	Recommended string // headcount; "none" when there is no recommendation
	DecidedBy   string // the export's code: cover, ratio_floor, both or insufficient_data
	DecidedText string // the same in words
	Declined    bool
	// NeedMore says per tier short of data "Insufficient observations —
	// need about N more in tier X" (or that its observations are all equal).
	NeedMore     []string
	NursesCover  string // headcount at the cover level; "" when declined
	CareGiving   string // of them, nurses giving direct care
	InCharge     bool   // the nurse in charge is extra: takes no patients, gives no direct care
	CapacityRule string // shown unless declined
	Floor        string // "" when no floor is configured
	FloorRule    string
	// SettingsURL links to the ward settings where the floor is set; ""
	// for roles that may not change them.
	SettingsURL string

	// Calibration is the ward's backtest in a sentence; "" when the
	// projection was made without one. CalibrationWarn: the backtest's
	// hit rate is more than 5 points below the cover level. Neither shows
	// on a declined projection, which has no band to be calibrated.
	Calibration     string
	CalibrationWarn bool

	CoverLevel         string // e.g. "0.9"
	CoverPercent       string // e.g. "90%"
	TotalPatients      string
	DirectCareFraction string
	ExpectedCareHours  string
	ExpectedNurseHours string
	MedianNurseHours   string
	CoverNurseHours    string
	// BandName names the band with its level and method, e.g. "90% band"
	// or "90% normal band" (method 1); BandLevel is the level alone.
	BandName  string
	BandLevel string
	BandLow   string
	BandHigh  string

	Chart     ChartVM
	Shortfall []ShortfallRowVM
	// Duty compares the staff on duty entered with the census (nil when
	// none were); made for every request, as the escalation text can change.
	Duty *DutyVM
	// RecordURL opens the shift's end-of-shift record once it has ended
	// ("" before, when RecordEnds says when it ends).
	RecordURL  string
	RecordEnds string
	Tiers      []TierVM
	// HeldOut are observations set aside as likely entry errors;
	// ReviewURL links to the review page where they can be excluded ("" for
	// roles that may not use it).
	HeldOut   []string
	ReviewURL string

	LookbackFrom     string
	LookbackTo       string
	LookbackWeeks    string
	ObservationShift string
	Observations     string // in all tiers
	Warnings         []string

	// Method details, folded away.
	Method      string
	ShiftEffect string
	Trend       string
	TierTrends  []string
	// Movement is the one sentence the page gives census movement during
	// the shift (empty for method 1); MovementDetails the rates, the band
	// with and without it and the assumption, folded away.
	Movement        string
	MovementDetails []string
	MethodVersion   string
	Seed            string
	Draws           string
	QuantileMethod  string
	Quartiles       string

	Caution string

	Revisions []RevisionVM
	CensusURL string // enter a correction
	ListURL   string // the ward's shift list
}

// ShortfallRowVM is one headcount of the shortfall table.
type ShortfallRowVM struct {
	Nurses      string
	CareGiving  string // nurses giving direct care (the nurse in charge left out where extra)
	Capacity    string // nurse-hours of direct care the headcount gives
	Chance      string // e.g. "8.4% (7.2–9.8%)" or "< 0.19%": never a bare 0%
	Recommended bool
}

// TierVM is one tier's data behind the projection.
type TierVM struct {
	Label        string
	Code         string
	Patients     string
	Observations string // given in the lookback
	Used         string // after setting aside likely entry errors
	Median       string // care minutes per patient per shift, "–" without observations
	NeedMore     string // "" when the tier has enough observations
}

// RevisionVM is one census revision of the same ward, date and shift.
type RevisionVM struct {
	Revision    int
	EnteredAt   string
	Total       string
	Recommended string // "" without a projection or without a recommendation
	NoRecommend bool   // projected, but declined without a ratio floor
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
	ReportURL string // planned and worked against needed; "" for charge nurses
}

// ProjectionRowVM is one dated shift in the shift list.
type ProjectionRowVM struct {
	Date               string
	Shift              string
	Revision           string
	TotalPatients      string
	Recommended        string // "none" without a recommendation
	Floor              string // "none" when not configured
	NursesCover        string // "–" when declined
	ExpectedNurseHours string // "–" when declined
	Declined           bool   // too few observations: the floor alone, or nothing
	URL                string
	// RecordURL opens the shift's end-of-shift record once the shift has
	// ended ("" before); RecordText is "Record", "Recorded (rev. 2)" or
	// "after 20:00".
	RecordURL  string
	RecordText string
}

// oneDecimalText rounds a formatted figure ("31.76") to one decimal
// ("31.8") for the page; anything that is not a number is shown as it is.
func oneDecimalText(s string) string {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return s
	}
	out := strconv.FormatFloat(v, 'f', 1, 64)
	if out == "-0.0" {
		return "0.0"
	}
	return out
}

// DutyVM is the staff on duty entered with the census against the
// projection: the gap in plain words, the chance of a shortfall with them,
// and, when below, the ward's escalation text.
type DutyVM struct {
	Gap     string // "You have 6 nurses on duty; the estimate is 8 — 2 short; the ratio floor needs 7 — 1 short."
	Chance  string // "" for a declined projection
	Support string // "" when no support staff were entered
	Below   bool   // fewer nurses than the recommendation or the floor
	// Escalation is the ward's text (when Below); "" when the ward has
	// none, and SettingsURL (managers only) then links to where it is set.
	Escalation  string
	SettingsURL string
}
