// Package projector turns what a store holds (a ward's settings, shift
// patterns, tiers and care observations) and a census into a stored
// workload projection, using the pure model in internal/stats. It depends
// on the domain and the model only, never on a database driver.
//
// Every projection is an estimate that defers to local staffing law,
// collective agreements and licensed clinical judgement (stats.Caution).
package projector

import (
	"context"
	"encoding/json"
	"fmt"
	"sync"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// The window of dates a census may be entered for, counted in the ward's
// time zone from its calendar date today: from MaxDaysBack days before to
// MaxDaysAhead days after. Late corrections of the last fortnight are
// allowed; an entry further out is almost always a typing error in the
// date. (Common practice, no source.)
const (
	MaxDaysAhead = 2
	MaxDaysBack  = 14
)

// DefaultDraws is the number of bootstrap draws when Service.Draws is 0:
// enough that the simulated cover quantile's Monte Carlo error is small
// beside a nurse (stats.Simulation reports it), at a few milliseconds.
const DefaultDraws = 20_000

// Service prepares and saves projections.
type Service struct {
	Store wardload.Store
	Now   wardload.Clock // "today" for the date window; nil means time.Now
	Draws int            // simulation draws; 0 means DefaultDraws

	calOnce      sync.Once
	calibrations *calibrationCache // see Calibrate
}

// Prepare validates a census of one dated shift and computes its
// projection without storing anything. counts may leave tiers out (they
// count 0). The model's input is:
//
//   - the ward's settings (direct-care fraction, cover level, lookback);
//   - the real length of the dated shift in the ward's time zone
//     (ShiftPattern.Window: 11 or 13 hours across a daylight-saving change);
//   - for every tier of the ward, its count and the included (not
//     excluded) observations of the same shift pattern dated from
//     LookbackWeeks×7 days before the shift's date to the day before it.
//     Only the same shift pattern: care by night differs from care by day,
//     and scaling one to the other by hours would hide that;
//   - bands: one, at two-sided level = the cover level;
//   - the ratio floors configured for this shift (stats.FloorFor): a
//     ward-wide floor pools the tiers without their own; the nurse in
//     charge counts towards the floor only if every floor of the shift
//     says so;
//   - the seed Seed(ward, date, shift) and Service.Draws draws;
//   - census movement during the shift (movement): the newest revision of
//     each end-of-shift record of the same shift pattern from
//     MovementLookbackDays days before the date to the day before it, and
//     the planned admissions and discharges (none from Prepare);
//   - the ward's calibration (Calibrate: its backtest over the
//     CalibrationWeeks weeks before the date), reported with the
//     projection and warned about when more than 5 points short.
//
// Errors name the field: ENOTFOUND "ward"; EINVALID "ward" (retired),
// "date" (missing, or outside the window above), "shift" (not a shift of
// this ward, or retired), "tier" (a tier not of this ward or retired, or
// counted twice), "tier_<code>" (a negative
// count, a count above the beds, or patients in a tier with fewer than two
// observations in the lookback), "patients" (the total above the beds).
func (s *Service) Prepare(ctx context.Context, wardID int64, date wardload.Date, shiftID int64, counts []wardload.TierCount) (*wardload.Census, *wardload.Projection, error) {
	return s.prepare(ctx, wardID, date, shiftID, counts, wardload.StaffOnDuty{}, wardload.PlannedMovement{})
}

// prepare is Prepare with the staff on duty kept with the census, checked
// against the ward's beds (StaffOnDuty.Check: EINVALID "nurses_on_duty" or
// "support_on_duty"), and the planned movement, kept with the census and
// given to the model (PlannedMovement.Check against the beds and the
// census: EINVALID "planned_admissions" or "planned_discharges").
func (s *Service) prepare(ctx context.Context, wardID int64, date wardload.Date, shiftID int64, counts []wardload.TierCount, staff wardload.StaffOnDuty, planned wardload.PlannedMovement) (*wardload.Census, *wardload.Projection, error) {
	ward, err := s.Store.FindWardByID(ctx, wardID)
	if err != nil {
		return nil, nil, err
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, nil, err
	}
	if err := s.checkDate(date, loc); err != nil {
		return nil, nil, err
	}
	shift, err := s.Store.FindShiftPatternByID(ctx, shiftID)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && shift.WardID != wardID) {
		return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "shift", "This ward has no such shift.")
	} else if err != nil {
		return nil, nil, err
	}
	if err := ward.TakesCensus(); err != nil {
		return nil, nil, err
	}
	if err := shift.TakesCensus(); err != nil {
		return nil, nil, err
	}
	all, err := s.Store.FindTiers(ctx, wardID)
	if err != nil {
		return nil, nil, err
	}
	// A new census counts patients in the tiers in use; a retired tier
	// keeps its history but takes no new patients.
	tiers := wardload.ActiveTiers(all)
	settings, err := s.Store.FindSettings(ctx, wardID)
	if err != nil {
		return nil, nil, err
	}
	census, err := checkCounts(wardID, date, shiftID, tiers, counts, staff, settings.Beds)
	if err != nil {
		return nil, nil, err
	}
	if err := planned.Check(settings.Beds, census.Total()); err != nil {
		return nil, nil, err
	}
	census.Planned = planned
	movement, err := s.movement(ctx, wardID, date, shiftID, planned, settings.Beds)
	if err != nil {
		return nil, nil, err
	}

	from, to := date.AddDays(-7*settings.LookbackWeeks), date.AddDays(-1)
	obs, _, err := s.Store.FindObservations(ctx, wardload.ObservationFilter{
		WardID: &wardID, ShiftID: &shiftID, From: &from, To: &to,
	})
	if err != nil {
		return nil, nil, err
	}
	byTier := map[int64][]*wardload.Observation{}
	for _, o := range obs {
		byTier[o.TierID] = append(byTier[o.TierID], o)
	}

	start, end, hours := shift.Window(date, loc)
	in := Input{Settings: InputSettings{
		DirectCareFraction: settings.DirectCareFraction, CoverLevel: settings.CoverLevel,
		LookbackWeeks: settings.LookbackWeeks, LookbackFrom: from.String(), LookbackTo: to.String(),
		ObservationShift: shift.Name, Quartiles: settings.Quartiles, Beds: settings.Beds,
		Floors: []wardload.RatioFloor{}, TimeZone: ward.TimeZone,
	}}
	model := &in.Model
	model.ShiftHours, model.DirectCareFraction = hours, settings.DirectCareFraction
	model.Levels, model.Cover = []float64{settings.CoverLevel}, settings.CoverLevel
	model.Draws, model.Seed = s.draws(), Seed(wardID, date, shiftID)
	model.Date = date.String()
	model.Movement = movement
	in.Settings.MovementFrom, in.Settings.MovementTo = date.AddDays(-MovementLookbackDays).String(), to.String()
	patients := map[int64]int{}
	for _, tc := range census.Counts {
		patients[tc.TierID] = tc.Patients
	}
	for _, t := range tiers {
		ts := tierSample(t.Code, patients[t.ID], byTier[t.ID], shift.Name)
		model.Tiers = append(model.Tiers, ts)
		in.Tiers = append(in.Tiers, InputTier{ID: t.ID, Code: t.Code, Label: t.Label, Observations: len(ts.CareMinutes)})
	}
	model.Floor = floorSpec(settings.Floors, shiftID, tiers, &in.Settings.Floors)
	backtest, err := s.Calibrate(ctx, wardID, date)
	if err != nil {
		return nil, nil, err
	}
	model.Calibration = backtest.Calibration()

	res, err := stats.Project(*model)
	if err != nil {
		return nil, nil, err
	}
	input, err := json.Marshal(in)
	if err != nil {
		return nil, nil, fmt.Errorf("projector: input json: %w", err)
	}
	result, err := json.Marshal(res)
	if err != nil {
		return nil, nil, fmt.Errorf("projector: result json: %w", err)
	}
	nurseHours := func(minutes float64) float64 { return minutes / 60 / settings.DirectCareFraction }
	var bandLow, bandHigh float64
	if len(res.Bands) > 0 {
		bandLow, bandHigh = nurseHours(res.Bands[0].Low), nurseHours(res.Bands[0].High)
	}
	p := &wardload.Projection{
		WardID: wardID, Date: date, ShiftID: shiftID, ShiftName: shift.Name,
		Start: start, End: end, ShiftHours: hours,
		Counts: census.Counts, TotalPatients: census.Total(), CoverLevel: settings.CoverLevel,
		ExpectedNurseHours: res.NurseHours.Expected.Value,
		CoverNurseHours:    res.NurseHours.Cover.Value,
		BandLowNurseHours:  bandLow,
		BandHighNurseHours: bandHigh,
		NursesCover:        deref(res.Nurses.Cover),
		Floor:              res.Nurses.Floor,
		Recommended:        deref(res.Nurses.Recommended),
		DecidedBy:          res.Nurses.DecidedBy,
		MethodVersion:      res.MethodVersion,
		Seed:               model.Seed, Draws: model.Draws,
		Input: string(input), Result: string(result),
		CreatedBy: wardload.ActorFrom(ctx).UserID,
	}
	census.EnteredBy = p.CreatedBy
	return census, p, nil
}

// Save prepares the projection and stores it with its census as the next
// revision, in one transaction (wardload.ProjectionService). Nothing is
// stored on any error.
func (s *Service) Save(ctx context.Context, wardID int64, date wardload.Date, shiftID int64, counts []wardload.TierCount, staff wardload.StaffOnDuty, planned wardload.PlannedMovement) (*wardload.Census, *wardload.Projection, error) {
	c, p, err := s.prepare(ctx, wardID, date, shiftID, counts, staff, planned)
	if err != nil {
		return nil, nil, err
	}
	if err := s.Store.CreateCensusProjection(ctx, c, p); err != nil {
		return nil, nil, err
	}
	return c, p, nil
}

func (s *Service) draws() int {
	if s.Draws > 0 {
		return s.Draws
	}
	return DefaultDraws
}

// now is Service.Now, or time.Now when it is nil.
func (s *Service) now() time.Time {
	if s.Now != nil {
		return s.Now()
	}
	return time.Now()
}

// Today returns the ward's calendar date at now.
func Today(now time.Time, loc *time.Location) wardload.Date { return wardload.DateOf(now.In(loc)) }

func (s *Service) checkDate(date wardload.Date, loc *time.Location) error {
	if date.IsZero() {
		return wardload.FieldErrorf(wardload.EINVALID, "date", "Date is required.")
	}
	today := Today(s.now(), loc)
	if date.After(today.AddDays(MaxDaysAhead)) || date.Before(today.AddDays(-MaxDaysBack)) {
		return wardload.FieldErrorf(wardload.EINVALID, "date",
			"Date %s is too far from today (%s on this ward): a census can be entered from %d days back to %d days ahead.",
			date, today, MaxDaysBack, MaxDaysAhead)
	}
	return nil
}

// deref reads a headcount that may be absent (a declined projection
// without a floor): the stored column holds 0, and DecidedBy says
// stats.DecidedByInsufficient, so readers know it is no recommendation.
func deref(n *int) int {
	if n == nil {
		return 0
	}
	return *n
}
