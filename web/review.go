package web

// ReviewVM is a ward's weekly tier review for its manager: per tier, the
// spread of care minutes per shift over a window of weeks, the check that
// tiers still separate care needs, the weekly medians, and the
// observations outside the fences with forms to exclude or restore them.
// Every number is already formatted; the template does no arithmetic.
type ReviewVM struct {
	WardName    string
	Notice      string // one-time message after a post
	URL         string // the page without a query
	ImportURL   string
	TemplateURL string

	// The filter form and what it selected.
	Weeks          string // as typed or defaulted
	ShiftID        string // "" for all shifts
	Shifts         []ReviewShiftVM
	WindowText     string // "8 weeks, 2026-01-05 to 2026-03-01"
	ShiftText      string // "all shifts" or "Day shift"
	Conventions    string // quartile convention, named
	ConventionNote string // what the convention does, in words
	Unit           string // "care minutes per patient per shift"
	UnitNote       string // how the unit is computed
	RelationURL    string // the relationship check; "" when the ward records no factor

	Tiers       []ReviewTierVM
	BoxPlots    *BoxPlotsVM        // every tier on one axis; nil without observations
	Order       []string           // warnings: a higher tier's median not above the lower one's
	OrderOK     bool               // every pair of neighbouring tiers with data is in order
	Separation  *SeparationVM      // nil with fewer than two tiers with observations
	TrendWeeks  []string           // ISO week labels, oldest first
	TrendRanges []string           // their first and last day in the window
	Trend       []ReviewTrendRowVM // columns newest week first
	TrendCharts []ReviewTrendChartVM
	// The histograms' scale, the links that switch it (plain links, so
	// the switch works without JavaScript) and how the bins were chosen.
	LogScale                    bool
	ScaleLinearURL, ScaleLogURL string
	HistMethod                  string
	Flagged                     []ReviewObservationVM // one page of them
	// The flagged list's paging: FlaggedRange is e.g. "51–100 of 123",
	// FlaggedPageSize "50"; Prev and Next are "" at either end.
	FlaggedRange, FlaggedPageSize string
	FlaggedPrev, FlaggedNext      string
	FlaggedOrders                 []ReviewOrderVM
	Excluded                      []ReviewObservationVM
	Reasons                       []string       // the exclusion reasons offered
	Calibration                   *CalibrationVM // the ward's backtest; nil when it could not be run
}

// ReviewOrderVM is one order the flagged list can be sorted in.
type ReviewOrderVM struct {
	Label, URL string
	Current    bool
}

// ReviewShiftVM is one choice of the shift filter.
type ReviewShiftVM struct {
	ID, Name string
}

// ReviewTierVM is one tier's summary and box plot. With N "0" the numbers
// are empty and Plot is nil.
type ReviewTierVM struct {
	Code, Label      string
	N                string
	Min, Q1          string
	Median, Q3       string
	Max, IQR         string
	InnerLo, InnerHi string // inner fences
	OuterLo, OuterHi string // outer fences
	Mean, SD         string
	Plot             *BoxPlotVM
	Hist             *HistogramVM // on the page's scale; nil without data
}

// ReviewTrendChartVM is one tier's small multiple of the weekly trend;
// Chart is nil when the tier has no observations in the window.
type ReviewTrendChartVM struct {
	Label string
	Chart *TrendChartVM
}

// ReviewTrendRowVM is one tier's median per ISO week; "" where the week has
// no observations. Counts holds n for each week.
type ReviewTrendRowVM struct {
	Label   string
	Medians []string
	Counts  []string
}

// ReviewObservationVM is one observation in the outlier or excluded list.
type ReviewObservationVM struct {
	ID          string
	Date        string
	Shift       string
	Tier        string
	Window      string // hours
	CareMinutes string
	Value       string // per-shift minutes, the reviewed unit
	Kind        string // "mild" or "extreme" on the minutes scale; "" if inside
	LogKind     string // the same on the log scale; "" if inside or not defined
	ExcludeURL  string
	RestoreURL  string
	// Excluded observations only.
	Reason, By, At string
	// A failed exclusion of this observation: its message and input.
	Error, Choice string
}

// ImportVM is the observation import page: a CSV upload form with the
// columns the ward accepts.
type ImportVM struct {
	WardName    string
	URL         string // where the form posts
	ReviewURL   string
	TemplateURL string
	Factors     []string // the ward's optional factor columns
	Tiers       []string // "code (label)"
	Shifts      []string // shift pattern names
	Error       string   // why the last upload was refused; nothing was stored
	// Problems lists every bad cell of a refused file (up to
	// csvfile.MaxProblems), each naming line and column; Error then
	// says how many there were.
	Problems []FormErrorVM
}

// SeparationVM is the statistical check that the tiers differ in care
// time: the Kruskal–Wallis test over all tiers with observations and, for
// each pair of neighbouring tiers, the difference of medians with its
// bootstrap interval and a one-sentence verdict.
type SeparationVM struct {
	Overall string   // one sentence: H, df, p, ε², n
	Pairs   []string // one verdict per pair of neighbouring tiers
	Method  string   // how the figures were found
	Caution string   // separation is not validity
}
