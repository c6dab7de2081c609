package demo

import (
	"context"
	"strings"
	"time"

	"wardload/internal/projector"
	"wardload/internal/wardload"
)

// saveCensus stores c with its projection, as a charge nurse saving the
// census form at the start of the shift would (projector.Prepare with the
// clock at the shift's start, then one CreateCensusProjection). In the
// first days of the demo some tiers have fewer than two observations of
// the shift yet; those census entries are stored without a projection,
// which is what wardload would refuse to project as well. It returns
// whether a projection was stored.
func (s *seeder) saveCensus(ctx context.Context, c *wardload.Census, loc *time.Location) (bool, error) {
	var shift *wardload.ShiftPattern
	for _, p := range s.shifts {
		if p.ID == c.ShiftID {
			shift = p
		}
	}
	start, _, _ := shift.Window(c.Date, loc)
	svc := &projector.Service{Store: s.st, Now: func() time.Time { return start }}
	census, p, err := svc.Prepare(ctx, c.WardID, c.Date, c.ShiftID, c.Counts)
	if wardload.ErrorCode(err) == wardload.EINVALID && strings.HasPrefix(wardload.ErrorField(err), "tier_") {
		return false, s.st.CreateCensus(ctx, c)
	} else if err != nil {
		return false, err
	}
	// Seeding runs as actor "demo"; the entries are the charge nurses'.
	census.EnteredBy, p.CreatedBy = c.EnteredBy, c.EnteredBy
	if err := s.st.CreateCensusProjection(ctx, census, p); err != nil {
		return false, err
	}
	*c = *census
	return true, nil
}
