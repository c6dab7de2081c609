package demo

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"wardload/internal/wardload"
)

// Kinds of planted entry error.
const (
	ErrorExtraZero = "extra_zero" // a digit typed twice: 45 became 450
	ErrorHours     = "hours"      // hours typed where minutes were asked for
)

// PlantedError is a deliberate entry error in the demo observations, there
// for the outlier review to find. Recorded is what the demo stores;
// Intended is what the nurse meant.
type PlantedError struct {
	Kind        string
	Date        wardload.Date
	Tier, Shift string // tier code, shift name
	WindowHours float64
	Recorded    float64
	Intended    float64
}

// plantedSpecs place the errors by day offset from the first demo day.
var plantedSpecs = []struct {
	kind               string
	day, tier, shift   int
	shortWindow        bool
	recorded, intended float64
}{
	{ErrorExtraZero, 12, 0, 0, true, 450, 45},
	{ErrorExtraZero, 40, 2, 0, false, 2600, 260},
	{ErrorHours, 23, 1, 1, false, 2.5, 150},
	{ErrorHours, 55, 3, 0, false, 5.5, 330},
}

// PlantedErrors returns the entry errors Seed plants for this now.
func PlantedErrors(now time.Time) ([]PlantedError, error) {
	loc, err := time.LoadLocation(timeZone)
	if err != nil {
		return nil, fmt.Errorf("demo: time zone: %w", err)
	}
	first, _ := period(now, loc)
	var out []PlantedError
	for _, p := range plantedSpecs {
		d := first.AddDays(p.day)
		out = append(out, PlantedError{
			Kind: p.kind, Date: d,
			Tier: tierSpecs[p.tier].code, Shift: shiftSpecs[p.shift].name,
			WindowHours: plantedWindow(p.shortWindow, p.shift, d, loc),
			Recorded:    p.recorded, Intended: p.intended,
		})
	}
	return out, nil
}

// period returns the first and last demo day: Weeks whole weeks ending on
// the ward's calendar day before now.
func period(now time.Time, loc *time.Location) (first, last wardload.Date) {
	last = wardload.DateOf(now.In(loc)).AddDays(-1)
	return last.AddDays(-7*Weeks + 1), last
}

func plantedWindow(short bool, shift int, d wardload.Date, loc *time.Location) float64 {
	if short {
		return shortWindowHours
	}
	return realHours(shift, d, loc)
}

// realHours is the true length of demo shift i on d: the demo records full
// shift windows as they were worked, so a night over a clock change is an
// hour shorter or longer than nominal.
func realHours(i int, d wardload.Date, loc *time.Location) float64 {
	p := wardload.ShiftPattern{StartMinute: shiftSpecs[i].startMinute, NominalHours: shiftSpecs[i].hours}
	_, _, h := p.Window(d, loc)
	return h
}

// createObservations stores one import batch per week, as a ward that
// collects on paper and types the sheets in weekly would.
func (s *seeder) createObservations(ctx context.Context, first, last wardload.Date, loc *time.Location) error {
	entered := s.users[managerName].ID
	var batch []*wardload.Observation
	for day := 0; !first.AddDays(day).After(last); day++ {
		d := first.AddDays(day)
		for si := range shiftSpecs {
			batch = append(batch, s.shiftObservations(d, day, si, loc, entered)...)
		}
		if (day+1)%7 == 0 || d == last {
			if _, err := s.st.CreateObservations(ctx, batch); err != nil {
				return fmt.Errorf("create observations up to %s: %w", d, err)
			}
			batch = nil
		}
	}
	return nil
}

// shiftObservations draws the observations of one dated shift, then adds
// any planted error for it.
func (s *seeder) shiftObservations(d wardload.Date, day, si int, loc *time.Location, by int64) []*wardload.Observation {
	shift := shiftSpecs[si]
	full := realHours(si, d, loc)
	var out []*wardload.Observation
	for ti, tier := range tierSpecs {
		span := tier.dayObs
		if si > 0 {
			span = tier.nightObs
		}
		n := span[0] + s.rng.IntN(span[1]-span[0]+1)
		for range n {
			window := full
			if s.rng.Float64() < shortWindowShare {
				window = shortWindowHours
			}
			z := s.rng.NormFloat64()
			median := tier.dayMedian * weekFactor(ti, day) * shift.careScale * window / shift.hours
			minutes := math.Max(5, math.Round(median*math.Exp(tier.sigma*z)))
			if s.rng.Float64() < 0.3 {
				// Heaping: sheets filled in at the end of a shift round to 5.
				minutes = math.Max(5, 5*math.Round(minutes/5))
			}
			score := math.Round(tier.scoreBase + 2.5*z + 1.5*s.rng.NormFloat64())
			out = append(out, s.observation(d, ti, si, window, minutes, math.Min(20, math.Max(0, score)), by))
		}
	}
	for _, p := range plantedSpecs {
		if p.day == day && p.shift == si {
			score := tierSpecs[p.tier].scoreBase
			out = append(out, s.observation(d, p.tier, si, plantedWindow(p.shortWindow, si, d, loc), p.recorded, score, by))
		}
	}
	return out
}

func (s *seeder) observation(d wardload.Date, ti, si int, window, minutes, score float64, by int64) *wardload.Observation {
	return &wardload.Observation{
		WardID:      s.ward.ID,
		TierID:      s.tiers[ti].ID,
		Date:        d,
		ShiftID:     s.shifts[si].ID,
		WindowHours: window,
		CareMinutes: minutes,
		Factors:     map[string]float64{dependencyFactor: score},
		EnteredBy:   by,
	}
}

// weekFactor is tier ti's multiplier of its median in the week holding
// day (days from the first): a random week effect of log-sd weekSD and
// the tier's drift, centred on the middle of the demo's weeks. It draws
// from its own generator, seeded by tier and week, so the observations'
// other random draws stay as they were.
func weekFactor(ti, day int) float64 {
	week := day / 7
	r := rand.New(rand.NewPCG(seedA^uint64(week+1), seedB+uint64(ti)))
	drift := tierSpecs[ti].weeklyDrift * (float64(week) - float64(Weeks-1)/2)
	return math.Exp(weekSD*r.NormFloat64() + drift)
}
