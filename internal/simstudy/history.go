package simstudy

import (
	"math"
	"math/rand/v2"
	"time"

	"wardload/internal/stats"
)

// Planted says where History planted its entry error.
type Planted struct {
	Tier  int     // index into Tiers; -1 when none was planted
	Index int     // position in that tier's CareMinutes
	True  float64 // the value before it was multiplied by 60
}

// History draws one observation history of s and returns it as the input
// of a projection of the next shift (the census of s at ProjectedDate) with
// the given simulation draws and seed. The observations are cut into
// dated shift occurrences of MinGroup to MaxGroup observations each, drawn
// without replacement from the lookback's days × ShiftNames, and every
// observation of one occurrence shares its e^(b_g) and drift factor (see
// Scenario). The order of random draws is fixed, so the same r gives the
// same history.
func (s *Scenario) History(r *rand.Rand, draws int, seed uint64) (stats.ProjectionInput, Planted) {
	if err := s.validate(); err != nil {
		panic("simstudy: " + err.Error())
	}
	slots := make([]int, 0, 64)
	for k, t := range s.Tiers {
		for range t.Obs {
			slots = append(slots, k)
		}
	}
	r.Shuffle(len(slots), func(i, j int) { slots[i], slots[j] = slots[j], slots[i] })
	sizes := groupSizes(r, len(slots))
	occurrences := r.Perm(len(ShiftNames) * s.Lookback())[:len(sizes)]

	target, _ := time.Parse(time.DateOnly, ProjectedDate)
	in := stats.ProjectionInput{
		Tiers:              make([]stats.TierSample, len(s.Tiers)),
		ShiftHours:         ShiftHours,
		DirectCareFraction: DirectCareFraction,
		Levels:             []float64{Cover},
		Cover:              Cover,
		Draws:              draws,
		Seed:               seed,
		Floor:              s.Floor,
		Date:               ProjectedDate,
	}
	for k, t := range s.Tiers {
		in.Tiers[k] = stats.TierSample{Code: t.Code, Patients: t.Patients,
			CareMinutes: make([]float64, 0, t.Obs), WindowHours: make([]float64, 0, t.Obs),
			Dates: make([]string, 0, t.Obs), Shifts: make([]string, 0, t.Obs)}
	}
	next := 0
	for g, size := range sizes {
		occ := occurrences[g]
		daysBack := 1 + occ/len(ShiftNames)
		date := target.AddDate(0, 0, -daysBack).Format(time.DateOnly)
		shift := ShiftNames[occ%len(ShiftNames)]
		factor := math.Pow(1+s.Drift, -float64(daysBack)/28)
		if s.ShiftSD > 0 {
			factor *= math.Exp(s.ShiftSD * r.NormFloat64())
		}
		for _, k := range slots[next : next+size] {
			ts := &in.Tiers[k]
			ts.CareMinutes = append(ts.CareMinutes, s.Tiers[k].Dist.Draw(r)*factor)
			ts.WindowHours = append(ts.WindowHours, ShiftHours)
			ts.Dates = append(ts.Dates, date)
			ts.Shifts = append(ts.Shifts, shift)
		}
		next += size
	}
	planted := Planted{Tier: -1}
	if s.EntryError {
		var candidates [][2]int
		for k, t := range in.Tiers {
			if t.Patients > 0 {
				for i := range t.CareMinutes {
					candidates = append(candidates, [2]int{k, i})
				}
			}
		}
		c := candidates[r.IntN(len(candidates))]
		v := &in.Tiers[c[0]].CareMinutes[c[1]]
		planted = Planted{Tier: c[0], Index: c[1], True: *v}
		*v *= 60
	}
	return in, planted
}

// groupSizes cuts n ≥ MinGroup observations into groups of MinGroup to
// MaxGroup, each size uniform on that range except where the remainder
// forces it (a remainder of one is never left).
func groupSizes(r *rand.Rand, n int) []int {
	var sizes []int
	for n > 0 {
		size := min(MinGroup+r.IntN(MaxGroup-MinGroup+1), n)
		if n-size > 0 && n-size < MinGroup {
			if size < MaxGroup {
				size = n
			} else {
				size -= MinGroup - (n - size)
			}
		}
		sizes = append(sizes, size)
		n -= size
	}
	return sizes
}
