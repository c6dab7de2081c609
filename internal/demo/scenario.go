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

// The tiers' labels and descriptions say how much care time a patient
// takes, not a patient's dependency in numbered levels, so that the demo
// is not mistaken for any classification instrument.
type tierSpec struct {
	code, label, description string
	// dayMedian is the median direct-care minutes per patient over a full
	// Day shift; care minutes are log-normal around it with log-sd sigma.
	dayMedian, sigma float64
	// weeklyDrift moves the tier's median by this share a week (on the log
	// scale), so that the weekly trend has something to show.
	weeklyDrift      float64
	scoreBase        float64 // mean dependency score
	share            float64 // share of the ward's patients in this tier
	dayObs, nightObs [2]int  // observations per shift, uniform in [lo, hi]
}

var tierSpecs = []tierSpec{
	{
		code: "t1", label: "Brief care",
		description: "About an hour of direct care in a day shift, seldom over two: routine checks, medicines by mouth.",
		dayMedian:   60, sigma: 0.45, scoreBase: 4, share: 0.30,
		dayObs: [2]int{2, 4}, nightObs: [2]int{1, 2},
	},
	{
		code: "t2", label: "Regular care",
		description: "About two hours of direct care in a day shift: some help with washing and walking, checks every few hours.",
		dayMedian:   120, sigma: 0.45, scoreBase: 8, share: 0.35,
		dayObs: [2]int{2, 4}, nightObs: [2]int{1, 2},
	},
	{
		code: "t3", label: "Extended care",
		description: "Three to four hours of direct care in a day shift: most personal care, turning, frequent checks or infusions.",
		dayMedian:   210, sigma: 0.5, scoreBase: 12, share: 0.25, weeklyDrift: 0.012,
		dayObs: [2]int{1, 3}, nightObs: [2]int{1, 2},
	},
	{
		code: "t4", label: "Constant care",
		description: "Six hours or more of direct care in a day shift, often with a nurse close by for long stretches.",
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

// weekSD is the spread of a tier's weekly median about its level (log
// scale): real wards have busier and quieter weeks, so weekly medians
// should not sit on one line.
const weekSD = 0.08
