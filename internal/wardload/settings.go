package wardload

import (
	"context"
	"math"
	"time"
	"unicode/utf8"
)

// Quartile conventions a ward can choose for its summaries and fences.
const (
	QuartilesHinges = "hinges" // Tukey's hinges, as R's fivenum
	QuartilesHF6    = "hf6"    // Hyndman & Fan type 6, p(n+1)
	QuartilesHF7    = "hf7"    // Hyndman & Fan type 7, R and numpy default
	QuartilesHalves = "halves" // median of each half, median left out when n is odd
)

// ValidQuartiles reports whether name is a known quartile convention.
func ValidQuartiles(name string) bool {
	switch name {
	case QuartilesHinges, QuartilesHF6, QuartilesHF7, QuartilesHalves:
		return true
	}
	return false
}

// Lower bounds of the settings a ward may save (see Settings.Validate).
const (
	MinDirectCareFraction = 0.1
	MinPatientsPerNurse   = 0.5
)

// Upper bounds of the settings a ward may save (see Settings.Validate).
const (
	// MaxPatientsPerNurse is the loosest ratio floor: a plausibility bound
	// that catches a typo, not a staffing standard (common practice, no source).
	MaxPatientsPerNurse = 50
	// MaxLookbackWeeks is two years of observations, more than any seasonal
	// comparison needs: a plausibility bound (common practice, no source).
	MaxLookbackWeeks = 104
	// MaxChangeoverMinutes is the widest change-over window: four hours
	// before a shift's start is already half of most shifts (common
	// practice, no source).
	MaxChangeoverMinutes = 240
	// MaxEscalationText is the length of the escalation text in
	// characters: a few lines, whom to call and how.
	MaxEscalationText = 500
)

// DefaultChangeoverMinutes is the change-over window a new ward starts
// with: at 07:00 the charge nurse is usually entering the census of the
// day shift that starts at 07:30, not of the night that is ending.
// Common practice, no source: a handover is prepared within the last hour
// or two of a shift.
const DefaultChangeoverMinutes = 90

// RatioFloor is a minimum nurse-to-patient ratio for one shift pattern:
// at most PatientsPerNurse patients per nurse. When TierID is not 0 the
// floor applies to that tier's patients only; the ward floor is then the
// sum over tiers. ChargeNurseCounts says whether the nurse in charge counts
// towards the floor (where they do not, one nurse is added).
type RatioFloor struct {
	ShiftID           int64
	TierID            int64 // 0: all patients of the ward
	PatientsPerNurse  float64
	ChargeNurseCounts bool
}

// Settings are a ward's staffing settings. They are entered by a manager and
// must be checked against local staffing law and agreements: wardload
// applies them, it does not know them.
type Settings struct {
	WardID             int64
	DirectCareFraction float64 // share of a nurse's shift available for direct care, (0, 1]
	CoverLevel         float64 // the one-sided probability staffing should cover, (0, 1)
	LookbackWeeks      int     // weeks of observations the model uses, 1..MaxLookbackWeeks
	Quartiles          string  // a Quartiles* constant
	Beds               int     // 0: not configured
	Floors             []RatioFloor
	// ChangeoverMinutes is how long before a shift's start the census page
	// offers that shift first, ahead of the one still running; 0 offers
	// only the running shift. 0..MaxChangeoverMinutes.
	ChangeoverMinutes int
	// SupportStaff says the ward has care staff who are not nurses: the
	// census form then asks for them too.
	SupportStaff bool
	// Escalation is what the charge nurse should do when the staff on
	// duty are below the recommendation (e.g. whom to call), shown on the
	// projection page; plain text, at most MaxEscalationText characters,
	// never about a patient.
	Escalation string
	UpdatedBy  int64
	UpdatedAt  time.Time
}

// DefaultSettings returns the settings a new ward starts with. The values
// are a starting point for the manager to change, not a recommendation:
// a direct-care fraction of 0.75 (breaks, handover and indirect work take
// the rest; common practice, no source), cover at 0.9 (staff for 90% of
// shifts, one of the levels a UK modelling study compared — domain brief
// §1.5), 8 weeks of lookback (enough observations for weekly review while
// tracking changes in the case mix; common practice, no source) and Tukey's
// hinges (they match R's fivenum and boxplot fences).
func DefaultSettings(wardID int64) *Settings {
	return &Settings{
		WardID:             wardID,
		DirectCareFraction: 0.75,
		CoverLevel:         0.9,
		LookbackWeeks:      8,
		Quartiles:          QuartilesHinges,
		ChangeoverMinutes:  DefaultChangeoverMinutes,
	}
}

// Validate checks the settings' own fields.
func (s *Settings) Validate() error {
	if s.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	// Every field is checked, so that a form shows all its mistakes at
	// once (Invalid gathers them).
	var errs []error
	bad := func(field, format string, args ...any) {
		errs = append(errs, FieldErrorf(EINVALID, field, format, args...))
	}
	// The lower bounds below keep typing errors (0.0075 for 0.75) from
	// turning into absurd headcounts; a nurse with under a tenth of the
	// shift for direct care, or more than two nurses per patient as a
	// floor, is outside ward practice (common practice, no source).
	if math.IsNaN(s.DirectCareFraction) || !(s.DirectCareFraction >= MinDirectCareFraction && s.DirectCareFraction <= 1) {
		bad("direct_care_fraction", "Direct-care fraction must be between 0.1 and 1.")
	}
	if math.IsNaN(s.CoverLevel) || !(s.CoverLevel > 0 && s.CoverLevel < 1) {
		bad("cover_level", "Cover level must be between 0 and 1 (for example 0.9).")
	}
	if s.LookbackWeeks < 1 || s.LookbackWeeks > MaxLookbackWeeks {
		bad("lookback_weeks", "Lookback must be 1 to %d weeks.", MaxLookbackWeeks)
	}
	if !ValidQuartiles(s.Quartiles) {
		bad("quartiles", "Unknown quartile convention %q.", s.Quartiles)
	}
	if s.Beds < 0 || s.Beds > MaxWardBeds {
		bad("beds", "Beds must be between 0 (not set) and %d.", MaxWardBeds)
	}
	if s.ChangeoverMinutes < 0 || s.ChangeoverMinutes > MaxChangeoverMinutes {
		bad("changeover_minutes", "The change-over window must be 0 to %d minutes.", MaxChangeoverMinutes)
	}
	if utf8.RuneCountInString(s.Escalation) > MaxEscalationText {
		bad("escalation", "The escalation text is at most %d characters.", MaxEscalationText)
	} else if !plainText(s.Escalation, "\n\r") {
		bad("escalation", "The escalation text must be plain text without control characters.")
	}
	type key struct{ shift, tier int64 }
	seen := map[key]bool{}
	for _, f := range s.Floors {
		if f.ShiftID == 0 {
			bad("floors", "Each ratio floor needs a shift.")
			break
		}
		if math.IsNaN(f.PatientsPerNurse) || !(f.PatientsPerNurse >= MinPatientsPerNurse && f.PatientsPerNurse <= MaxPatientsPerNurse) {
			bad("floors", "Patients per nurse must be between %g (two nurses per patient) and %d.", MinPatientsPerNurse, MaxPatientsPerNurse)
			break
		}
		k := key{f.ShiftID, f.TierID}
		if seen[k] {
			bad("floors", "A shift has two ratio floors for the same tier.")
			break
		}
		seen[k] = true
	}
	return Invalid(errs...)
}

// SettingsService stores ward staffing settings.
type SettingsService interface {
	// FindSettings returns the ward's settings, or DefaultSettings if none
	// were saved yet. Returns ENOTFOUND for an unknown ward.
	FindSettings(ctx context.Context, wardID int64) (*Settings, error)
	// SaveSettings replaces the ward's settings (floors included) and sets
	// UpdatedAt. Returns EINVALID or ENOTFOUND (ward, or a floor's shift or
	// tier not of this ward).
	SaveSettings(ctx context.Context, s *Settings) error
}
