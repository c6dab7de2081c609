package demo

// The fictional scenario. Every number here is invented for the demo; none
// is a clinical standard, a legal ratio or a measurement from a real ward.

// timeZone has daylight saving, so the demo's night shifts around the
// changes are an hour shorter or longer than nominal.
const timeZone = "Europe/London"

// beds is the demo ward's bed capacity.
const beds = 28

// dependencyFactor is the one numeric factor recorded with each demo
// observation: an invented 0–20 dependency score, loosely related to care
// time so that correlation has something to find.
const dependencyFactor = "dependency_score"

type tierSpec struct {
	code, label, description string
	// dayMedian is the median direct-care minutes per patient over a full
	// Day shift; care minutes are log-normal around it with log-sd sigma.
	dayMedian, sigma float64
	scoreBase        float64 // mean dependency score
	share            float64 // share of the ward's patients in this tier
	dayObs, nightObs [2]int  // observations per shift, uniform in [lo, hi]
}

var tierSpecs = []tierSpec{
	{
		code: "t1", label: "T1 Self-caring",
		description: "Mostly independent: routine observations, oral medicines, prompts with meals.",
		dayMedian:   60, sigma: 0.45, scoreBase: 4, share: 0.30,
		dayObs: [2]int{2, 4}, nightObs: [2]int{1, 2},
	},
	{
		code: "t2", label: "T2 Assisted",
		description: "Help with some personal care and walking; four-hourly observations.",
		dayMedian:   120, sigma: 0.45, scoreBase: 8, share: 0.35,
		dayObs: [2]int{2, 4}, nightObs: [2]int{1, 2},
	},
	{
		code: "t3", label: "T3 Dependent",
		description: "Help with most personal care and repositioning; frequent observations or infusions.",
		dayMedian:   210, sigma: 0.5, scoreBase: 12, share: 0.25,
		dayObs: [2]int{1, 3}, nightObs: [2]int{1, 2},
	},
	{
		code: "t4", label: "T4 Enhanced",
		description: "Close observation or periods of one-to-one care; unstable, or at high risk of harm.",
		dayMedian:   360, sigma: 0.55, scoreBase: 16, share: 0.10,
		dayObs: [2]int{1, 2}, nightObs: [2]int{0, 1},
	},
}

type shiftSpec struct {
	name        string
	startMinute int
	hours       float64
	// careScale scales the Day medians: less direct care is given at night.
	careScale float64
	// patientsPerNurse is the demo ratio floor: invented demo values, not
	// any jurisdiction's law or agreement.
	patientsPerNurse float64
}

// Two 12.5-hour shifts overlapping by 30 minutes for handover.
var shiftSpecs = []shiftSpec{
	{name: "Day", startMinute: 7*60 + 30, hours: 12.5, careScale: 1, patientsPerNurse: 5},
	{name: "Night", startMinute: 19*60 + 30, hours: 12.5, careScale: 0.75, patientsPerNurse: 7},
}

// shortWindowHours is the length of the part-shift windows some
// observations cover, and shortWindowShare how many do.
const (
	shortWindowHours = 4
	shortWindowShare = 0.15
)
