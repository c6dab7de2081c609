package export

import (
	"encoding/json"
	"math"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// Result is a stored projection's result decoded by its method version:
// exactly one of V2 and V1 is set. Projections made before version 2 are
// kept as they were made (stats.ProjectionV1), so readers must handle both.
type Result struct {
	V2 *stats.Projection   // method versions stats.MethodVersion (4), V3 and V2: one shape
	V1 *stats.ProjectionV1 // method version stats.MethodVersionV1
}

// DecodeResult reads p.Result by p.MethodVersion. Returns EINTERNAL for a
// result that cannot be read or a method version this build does not know.
func DecodeResult(p *wardload.Projection) (*Result, error) {
	unreadable := wardload.Errorf(wardload.EINTERNAL, "The stored result of projection %d cannot be read.", p.ID)
	var res Result
	var err error
	switch p.MethodVersion {
	case stats.MethodVersion, stats.MethodVersionV3, stats.MethodVersionV2:
		res.V2 = new(stats.Projection)
		err = json.Unmarshal([]byte(p.Result), res.V2)
	case stats.MethodVersionV1:
		res.V1 = new(stats.ProjectionV1)
		err = json.Unmarshal([]byte(p.Result), res.V1)
	default:
		return nil, unreadable
	}
	if err != nil {
		return nil, unreadable
	}
	return &res, nil
}

// FloorUsed is the ratio floor the projection applied; nil without one.
func (r *Result) FloorUsed() *stats.FloorUsed {
	if r.V1 != nil {
		return r.V1.Floor
	}
	return r.V2.Floor
}

// Names of the methods behind Row's band and shortfall figures, as the
// export writes them in band_method and shortfall_method.
const (
	// BandPredictive: method 2's equal-tailed band of the simulated
	// predictive distribution (asymmetric where care time is skewed).
	BandPredictive = "predictive_equal_tailed"
	// BandNormal: method 1's normal approximation μ ± z·sd.
	BandNormal = "normal"
	// ShortfallPredictive: method 2's share of simulated predictive
	// totals above the headcount's capacity.
	ShortfallPredictive = "simulated_predictive"
	// ShortfallBootstrap: method 1's share of two-level bootstrap totals
	// above the headcount's capacity.
	ShortfallBootstrap = "simulated_bootstrap"
)

// Shortfall is the chance that a shift's care exceeds what the
// recommended headcount gives: a share of simulated shifts with its 95%
// Wilson interval for the simulation's own error (stats.WilsonInterval),
// and the same in words (stats.ProbabilityText, never a bare 0% or 100%).
type Shortfall struct {
	Method           string // ShortfallPredictive or ShortfallBootstrap
	Nurses           int    // the headcount
	Probability      float64
	WilsonLow        float64
	WilsonHigh       float64
	Text             string
	CareGivingNurses int // headcount less the nurse in charge where that nurse is extra
}

// newRow returns the export row of stored projection p and its decoded
// result, without Census (Rows adds it in the order of its tiers).
// Declined projections (stats.DecidedByInsufficient) carry no care-time
// figures: their expected hours, band, headcount at cover and shortfall
// are nil, and Recommended is the floor or nil.
func newRow(ward *wardload.Ward, loc *time.Location, p *wardload.Projection, res *Result) Row {
	r := Row{
		Ward: ward.Code, Date: p.Date, Shift: p.ShiftName,
		Start: p.Start.In(loc), End: p.End.In(loc), ShiftHours: p.ShiftHours,
		CensusRevision: p.CensusRevision, TotalPatients: p.TotalPatients,
		CoverLevel: p.CoverLevel, Floor: p.Floor, DecidedBy: p.DecidedBy, FloorRule: NoFloor,
		MethodVersion: p.MethodVersion, GeneratedAt: p.CreatedAt.In(loc), Caution: stats.Caution,
		DataSufficient: true,
	}
	if f := res.FloorUsed(); f != nil {
		r.FloorRule = f.Description
	}
	if res.V2 != nil && res.V2.Movement != nil {
		r.Movement = newMovement(res.V2)
	}
	if res.V2 != nil && !res.V2.DataSufficient {
		r.DataSufficient = false
		r.Insufficient = res.V2.Insufficient
		r.Recommended = p.Floor
		return r
	}
	expected, low, high, cover, rec := p.ExpectedNurseHours, p.BandLowNurseHours, p.BandHighNurseHours, p.NursesCover, p.Recommended
	r.ExpectedNurseHours, r.BandLowNurseHours, r.BandHighNurseHours = &expected, &low, &high
	r.NursesCover, r.Recommended = &cover, &rec
	level := p.CoverLevel
	if res.V2 != nil {
		r.BandMethod = BandPredictive
		if len(res.V2.Bands) > 0 {
			level = res.V2.Bands[0].Level
		}
		for _, sf := range res.V2.Shortfall {
			if sf.Nurses == rec {
				r.Shortfall = &Shortfall{Method: ShortfallPredictive, Nurses: sf.Nurses, CareGivingNurses: sf.CareGivingNurses,
					Probability: sf.Probability, WilsonLow: sf.Low, WilsonHigh: sf.High, Text: sf.Text}
			}
		}
	} else {
		r.BandMethod = BandNormal
		if len(res.V1.Bands) > 0 {
			level = res.V1.Bands[0].Level
		}
		if draws := res.V1.Simulation.Draws; draws > 0 {
			for _, sf := range res.V1.Shortfall {
				if sf.Nurses == rec {
					r.Shortfall = ShortfallV1(sf.Nurses, sf.SimulatedProbability, draws)
				}
			}
		}
	}
	r.BandLevel = &level
	return r
}

// ShortfallV1 restates a method 1 simulated share of draws at a headcount
// with its Wilson interval; the projection page uses it for method 1's
// table as the export does for the recommendation. Method 1 stored the share k/draws and its standard error
// √(p(1−p)/draws), which reads "± 0" at k = 0; k is recovered exactly by
// rounding share × draws, since the share was k/draws.
func ShortfallV1(nurses int, share float64, draws int) *Shortfall {
	k := min(draws, max(0, int(math.Round(share*float64(draws)))))
	lo, hi := stats.WilsonInterval(k, draws)
	return &Shortfall{Method: ShortfallBootstrap, Nurses: nurses, CareGivingNurses: nurses,
		Probability: float64(k) / float64(draws), WilsonLow: lo, WilsonHigh: hi, Text: stats.ProbabilityText(k, draws)}
}

// NewRow returns the export row of one stored projection of ward and its
// decoded result, without Census. The projection page shows the row's
// figures, so page and export agree to the digit.
func NewRow(ward *wardload.Ward, p *wardload.Projection) (Row, *Result, error) {
	loc, err := ward.Location()
	if err != nil {
		return Row{}, nil, err
	}
	res, err := DecodeResult(p)
	if err != nil {
		return Row{}, nil, err
	}
	return newRow(ward, loc, p, res), res, nil
}
