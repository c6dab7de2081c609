package wardload

import (
	"context"
	"strings"
	"time"
)

// Projection is the stored workload projection of one census revision of
// a dated shift: the figures a charge nurse and a roster planner read, and
// everything needed to recompute them exactly (Input, Result, Seed, Draws,
// MethodVersion).
//
// Nurse-hours are hours of nurse time on the shift: care minutes ÷ 60 ÷
// the ward's direct-care fraction. All figures are estimates; they defer to
// local staffing law, collective agreements and licensed clinical judgement.
type Projection struct {
	ID             int64
	WardID         int64
	CensusID       int64 // the census revision this projection is of; set by the store
	CensusRevision int   // set by the store
	Date           Date
	ShiftID        int64
	ShiftName      string // the pattern's name when projected (a later rename does not change it)
	// Start and End are the real instants of the dated shift (see
	// ShiftPattern.Window). Stores return them in UTC; show them in the
	// ward's time zone.
	Start, End time.Time
	ShiftHours float64     // real length of the dated shift: 11 or 13 across a daylight-saving change
	Counts     []TierCount // the census, every tier of the ward by DisplayOrder; set by the store
	// TotalPatients is the census total, Σ Counts.
	TotalPatients int
	CoverLevel    float64 // the one-sided cover probability q used (the ward's setting)

	ExpectedNurseHours float64 // at the expected total care minutes μ
	CoverNurseHours    float64 // at the simulated q-quantile of the total (the basis of NursesCover); 0 when declined
	// BandLowNurseHours and BandHighNurseHours are the central band of the
	// total care minutes at two-sided level q = CoverLevel, in nurse-hours:
	// method 2's equal-tailed predictive interval (0 when declined), or
	// method 1's normal μ ± Φ⁻¹((1+q)/2)·sd, whose Low may be below zero.
	BandLowNurseHours  float64
	BandHighNurseHours float64
	NursesCover        int    // headcount at the cover level (care-giving nurses + the nurse in charge where extra); 0 when declined
	Floor              *int   // nurses the configured ratio floor asks for; nil: no floor configured
	Recommended        int    // max(NursesCover, *Floor)
	DecidedBy          string // "cover", "ratio_floor", "both" or "insufficient_data" (then Recommended is the floor, or 0 with Floor nil: no recommendation)

	MethodVersion string // the stats package's method version
	Seed          uint64 // simulation seed
	Draws         int    // simulation draws
	// Input is the JSON of the complete model input (settings, shift length,
	// census and the observation values used); Result is the JSON of the
	// model's complete result. Re-running the model of MethodVersion on
	// Input gives Result byte for byte.
	Input  string
	Result string

	CreatedBy int64 // user ID; 0 for the command line or the system
	CreatedAt time.Time
}

// DeclinedDecision is the DecidedBy of a projection that declined for
// want of observations (stats.DecidedByInsufficient).
const DeclinedDecision = "insufficient_data"

// RecommendedNurses is the stored recommendation: nil when the projection
// declined and the shift has no ratio floor, else Recommended (the floor
// alone when it declined).
func (p *Projection) RecommendedNurses() *int {
	if p.DecidedBy == DeclinedDecision && p.Floor == nil {
		return nil
	}
	n := p.Recommended
	return &n
}

// Validate checks the projection's own fields, before the store sets IDs,
// revision, counts and time.
func (p *Projection) Validate() error {
	if p.WardID == 0 {
		return FieldErrorf(EINVALID, "ward", "Ward is required.")
	}
	if p.ShiftID == 0 {
		return FieldErrorf(EINVALID, "shift", "Shift is required.")
	}
	if p.Date.IsZero() {
		return FieldErrorf(EINVALID, "date", "Date is required.")
	}
	if strings.TrimSpace(p.ShiftName) == "" || p.Start.IsZero() || !p.End.After(p.Start) || !(p.ShiftHours > 0 && p.ShiftHours <= 25) {
		return FieldErrorf(EINVALID, "shift", "The projection's shift window is missing.")
	}
	if !(p.CoverLevel > 0 && p.CoverLevel < 1) {
		return FieldErrorf(EINVALID, "cover_level", "Cover level must be between 0 and 1.")
	}
	if p.MethodVersion == "" || p.Draws < 1 || p.Input == "" || p.Result == "" {
		return FieldErrorf(EINVALID, "projection", "The projection lacks what is needed to reproduce it.")
	}
	if p.TotalPatients < 0 || p.NursesCover < 0 || p.Recommended < 0 || (p.Floor != nil && *p.Floor < 0) {
		return FieldErrorf(EINVALID, "projection", "Projected counts must not be negative.")
	}
	return nil
}

// ProjectionFilter selects projections. Zero fields do not filter.
type ProjectionFilter struct {
	WardID   *int64
	ShiftID  *int64
	From, To *Date // inclusive, on the dated shift's Date
	// LatestOnly keeps only the newest projection of each ward × date ×
	// shift (the highest CensusRevision that has a projection).
	LatestOnly bool
	Offset     int
	Limit      int
}

// ShiftRevision is one census revision of a dated shift with, when it has
// one, its projection's ID and recommendation: the list a projection page
// shows, without loading every census's counts or every projection's
// Input and Result.
type ShiftRevision struct {
	CensusID      int64
	Revision      int
	EnteredAt     time.Time   // UTC
	TotalPatients int         // Σ of the revision's counts (Census.Total)
	ProjectionID  int64       // 0 when the revision has no projection
	Recommended   int         // the projection's Recommended; 0 without one
	Staff         StaffOnDuty // the staff on duty entered with the revision
}

// ProjectionService stores projections together with their census.
type ProjectionService interface {
	// CreateCensusProjection stores c as the next census revision of its
	// ward, date and shift (exactly as CensusService.CreateCensus) and p as
	// its projection, in one transaction, with the audit rows
	// "census.create" and "projection.create" (whose JSON leaves out Input
	// and Result, which are stored once, in the projection). p must name the
	// same ward, date and shift as c, and its TotalPatients must equal
	// c.Total(). On success it sets c.ID, c.Revision, c.EnteredAt and p.ID,
	// p.CensusID, p.CensusRevision, p.Counts (as stored for c) and
	// p.CreatedAt (= c.EnteredAt). Returns EINVALID naming the field, or
	// ENOTFOUND for an unknown ward, shift or tier; nothing is stored on
	// error.
	CreateCensusProjection(ctx context.Context, c *Census, p *Projection) error
	// FindProjectionByID returns ENOTFOUND if there is no such projection.
	FindProjectionByID(ctx context.Context, id int64) (*Projection, error)
	// FindProjections returns matches newest first: Date descending, then
	// shift Start descending, then CensusRevision descending; and the total
	// count ignoring Offset and Limit. Start and End are in UTC.
	FindProjections(ctx context.Context, f ProjectionFilter) ([]*Projection, int, error)
	// FindShiftRevisions returns every census revision of the ward's
	// dated shift, newest revision first, each with its projection if it
	// has one. An unknown ward, date or shift gives an empty list.
	FindShiftRevisions(ctx context.Context, wardID int64, d Date, shiftID int64) ([]*ShiftRevision, error)
}

// ValidateCensusProjection checks a census and its projection before a
// store saves them together: each valid, and p a projection of c (same
// ward, date and shift, and c's patient total). It returns EINVALID naming
// the field.
func ValidateCensusProjection(c *Census, p *Projection) error {
	if err := c.Validate(); err != nil {
		return err
	}
	if err := p.Validate(); err != nil {
		return err
	}
	if p.WardID != c.WardID || p.ShiftID != c.ShiftID || p.Date != c.Date {
		return FieldErrorf(EINVALID, "projection", "The projection is not of this census's ward, date and shift.")
	}
	if p.TotalPatients != c.Total() {
		return FieldErrorf(EINVALID, "projection", "The projection's patient total differs from the census.")
	}
	return nil
}
