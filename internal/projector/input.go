package projector

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"hash/fnv"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// Input is the JSON stored in wardload.Projection.Input: the model input
// exactly as stats.Project received it, plus what chose that input (the
// settings and the lookback window), so that a reader can see where each
// number came from and Recompute can re-run the model.
type Input struct {
	Model    stats.ProjectionInput `json:"model"`
	Tiers    []InputTier           `json:"tiers"` // in Model.Tiers order
	Settings InputSettings         `json:"settings"`
}

// InputTier names a tier of Model.Tiers and says how many observations
// the lookback found for it.
type InputTier struct {
	ID           int64  `json:"id"`
	Code         string `json:"code"`
	Label        string `json:"label"`
	Observations int    `json:"observations"`
}

// InputSettings are the ward settings and window a projection used.
type InputSettings struct {
	DirectCareFraction float64               `json:"direct_care_fraction"`
	CoverLevel         float64               `json:"cover_level"`
	LookbackWeeks      int                   `json:"lookback_weeks"`
	LookbackFrom       string                `json:"lookback_from"` // first observation date used, YYYY-MM-DD
	LookbackTo         string                `json:"lookback_to"`   // last, the day before the shift's date
	ObservationShift   string                `json:"observation_shift"`
	Quartiles          string                `json:"quartiles"` // the ward's convention (summaries; the projection itself uses none)
	Beds               int                   `json:"beds"`      // 0: not configured
	Floors             []wardload.RatioFloor `json:"floors"`    // the ward's floors for this shift
	TimeZone           string                `json:"time_zone"`
	// MovementFrom and MovementTo are the window of the end-of-shift
	// records whose admissions and discharges Model.Movement holds.
	MovementFrom string `json:"movement_from,omitempty"`
	MovementTo   string `json:"movement_to,omitempty"`
}

// Seed returns the bootstrap seed of a dated shift: the first 8 bytes
// (big-endian) of FNV-1a 64 over "wardload-projection|<ward>|<date>|<shift>".
//
// It depends on the ward, the date and the shift only, not on the census
// revision, so a correction is simulated with the same random numbers
// (common random numbers): the figures of revision 2 differ from revision
// 1 because the census or the observations differ, not by Monte Carlo
// noise.
func Seed(wardID int64, date wardload.Date, shiftID int64) uint64 {
	h := fnv.New64a()
	fmt.Fprintf(h, "wardload-projection|%d|%s|%d", wardID, date, shiftID)
	return binary.BigEndian.Uint64(h.Sum(nil))
}

// Recompute re-runs the workload model of p's method version on the stored
// input of p and returns its result (a *stats.Projection for versions 2
// to 4, a *stats.ProjectionV1 for version 1), whose JSON equals p.Result
// byte for byte. It returns EINVALID for a projection made by a method
// version this build does not have, or with an unreadable input.
func Recompute(p *wardload.Projection) (any, error) {
	project := byVersion[p.MethodVersion]
	if project == nil {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "method_version",
			"This projection was made with method %s; this version of wardload has %s and cannot reproduce it exactly.",
			p.MethodVersion, stats.MethodVersion)
	}
	var in Input
	if err := json.Unmarshal([]byte(p.Input), &in); err != nil {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "input", "The stored input of projection %d cannot be read.", p.ID)
	}
	return project(in.Model)
}

// byVersion runs the model of each method version this build can
// reproduce.
var byVersion = map[string]func(stats.ProjectionInput) (any, error){
	stats.MethodVersion:   func(in stats.ProjectionInput) (any, error) { return stats.Project(in) },
	stats.MethodVersionV3: func(in stats.ProjectionInput) (any, error) { return stats.ProjectV3(in) },
	stats.MethodVersionV2: func(in stats.ProjectionInput) (any, error) { return stats.ProjectV2(in) },
	stats.MethodVersionV1: func(in stats.ProjectionInput) (any, error) { return stats.ProjectV1(in) },
}
