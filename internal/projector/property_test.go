package projector_test

import (
	"encoding/json"
	"math/rand/v2"
	"testing"
	"time"

	"wardload/internal/projector"
	"wardload/internal/wardload"
)

// seedInvented seeds an invented ward for property checks: Europe/London
// (daylight saving), Day 07:30 and Night 19:30 of 12 nominal hours, three
// tiers, two observations a day per tier and shift from 20 February to 30
// March 2026, and night floors (8 per nurse, tier t3 2 per nurse). Invented
// data, generated from a fixed seed, for properties only.
func seedInvented(t *testing.T) (wardload.Store, *wardload.Ward, []*wardload.Tier, *wardload.ShiftPattern, *wardload.ShiftPattern) {
	t.Helper()
	st := MustOpen(t)
	w := &wardload.Ward{Code: "inv", Name: "Invented", TimeZone: "Europe/London"}
	must(t, st.CreateWard(ctx, w))
	var tiers []*wardload.Tier
	for i, code := range []string{"t1", "t2", "t3"} {
		tr := &wardload.Tier{WardID: w.ID, Code: code, Label: "Tier " + code, DisplayOrder: i}
		must(t, st.CreateTier(ctx, tr))
		tiers = append(tiers, tr)
	}
	dayP := &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 450, NominalHours: 12}
	nightP := &wardload.ShiftPattern{WardID: w.ID, Name: "Night", StartMinute: 1170, NominalHours: 12}
	must(t, st.CreateShiftPattern(ctx, dayP))
	must(t, st.CreateShiftPattern(ctx, nightP))
	set := wardload.DefaultSettings(w.ID)
	set.LookbackWeeks = 4
	set.Floors = []wardload.RatioFloor{
		{ShiftID: nightP.ID, PatientsPerNurse: 8, ChargeNurseCounts: true},
		{ShiftID: nightP.ID, TierID: tiers[2].ID, PatientsPerNurse: 2, ChargeNurseCounts: true},
	}
	must(t, st.SaveSettings(ctx, set))
	rng := rand.New(rand.NewPCG(1, 2))
	var obs []*wardload.Observation
	for d := day("2026-02-20"); d.Before(day("2026-03-31")); d = d.AddDays(1) {
		for k, tr := range tiers {
			for _, sp := range []*wardload.ShiftPattern{dayP, nightP} {
				for range 2 {
					obs = append(obs, &wardload.Observation{WardID: w.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d,
						WindowHours: []float64{4, 12}[rng.IntN(2)], CareMinutes: float64(30*(k+1)) * (0.5 + rng.Float64())})
				}
			}
		}
	}
	_, err := st.CreateObservations(ctx, obs)
	must(t, err)
	return st, w, tiers, dayP, nightP
}

func TestProjectionProperties(t *testing.T) {
	st, w, tiers, dayP, nightP := seedInvented(t)
	// Clock on the morning of the spring change (29 March 2026).
	svc := &projector.Service{Store: st, Now: func() time.Time { return time.Date(2026, 3, 29, 9, 0, 0, 0, time.UTC) }, Draws: 4000}
	counts := func(a, b, c int) []wardload.TierCount {
		return []wardload.TierCount{{TierID: tiers[0].ID, Patients: a}, {TierID: tiers[1].ID, Patients: b}, {TierID: tiers[2].ID, Patients: c}}
	}

	// The night of 28 March spans the change: 11 real hours.
	_, p, err := svc.Prepare(ctx, w.ID, day("2026-03-28"), nightP.ID, counts(6, 8, 3))
	must(t, err)
	if p.ShiftHours != 11 || p.End.Sub(p.Start) != 11*time.Hour || decodeInput(t, p).Model.ShiftHours != 11 {
		t.Errorf("night over the spring change: %g hours", p.ShiftHours)
	}
	// Floor: ceil((6+8)/8) + ceil(3/2) = 2 + 2, the nurse in charge counting.
	if p.Floor == nil || *p.Floor != 4 {
		t.Errorf("night floor = %v, want 4", p.Floor)
	}

	for _, d := range []string{"2026-03-22", "2026-03-25", "2026-03-29"} {
		for _, sp := range []*wardload.ShiftPattern{dayP, nightP} {
			_, p1, err := svc.Prepare(ctx, w.ID, day(d), sp.ID, counts(5, 7, 2))
			must(t, err)
			// Deterministic: the same request gives the same input and result.
			_, p2, err := svc.Prepare(ctx, w.ID, day(d), sp.ID, counts(5, 7, 2))
			must(t, err)
			if p1.Input != p2.Input || p1.Result != p2.Result {
				t.Errorf("%s %s: two runs differ", d, sp.Name)
			}
			// Ordered figures.
			if !(p1.BandLowNurseHours < p1.ExpectedNurseHours && p1.ExpectedNurseHours < p1.BandHighNurseHours) {
				t.Errorf("%s %s: band %g..%g does not hold expected %g", d, sp.Name, p1.BandLowNurseHours, p1.BandHighNurseHours, p1.ExpectedNurseHours)
			}
			if p1.Recommended < p1.NursesCover || (p1.Floor != nil && p1.Recommended < *p1.Floor) {
				t.Errorf("%s %s: recommended %d below cover %d or floor %v", d, sp.Name, p1.Recommended, p1.NursesCover, p1.Floor)
			}
			if (sp == dayP) != (p1.Floor == nil) {
				t.Errorf("%s %s: floor %v; only the night has one", d, sp.Name, p1.Floor)
			}
			// One more patient in the heaviest tier means more expected work.
			_, p3, err := svc.Prepare(ctx, w.ID, day(d), sp.ID, counts(5, 7, 3))
			must(t, err)
			if p3.ExpectedNurseHours <= p1.ExpectedNurseHours {
				t.Errorf("%s %s: expected nurse-hours %g with one more patient, %g before", d, sp.Name, p3.ExpectedNurseHours, p1.ExpectedNurseHours)
			}
			// Recompute gives the stored result byte for byte.
			res, err := projector.Recompute(p1)
			must(t, err)
			if b := mustJSON(t, res); b != p1.Result {
				t.Errorf("%s %s: recompute differs", d, sp.Name)
			}
		}
	}

	// Excluding an observation in the lookback removes exactly it from the input.
	_, before, err := svc.Prepare(ctx, w.ID, day("2026-03-25"), dayP.ID, counts(5, 7, 2))
	must(t, err)
	from, to := day("2026-03-20"), day("2026-03-20")
	obs, _, err := st.FindObservations(ctx, wardload.ObservationFilter{WardID: &w.ID, TierID: &tiers[1].ID, ShiftID: &dayP.ID, From: &from, To: &to})
	must(t, err)
	_, err = st.ExcludeObservation(ctx, obs[0].ID, "entered twice", 7)
	must(t, err)
	_, after, err := svc.Prepare(ctx, w.ID, day("2026-03-25"), dayP.ID, counts(5, 7, 2))
	must(t, err)
	nb, na := decodeInput(t, before).Tiers[1].Observations, decodeInput(t, after).Tiers[1].Observations
	if na != nb-1 || before.Seed != after.Seed {
		t.Errorf("after one exclusion: %d observations, before %d", na, nb)
	}
	if nb != 4*7*2 {
		t.Errorf("lookback of 4 weeks with 2 observations a day: %d, want 56", nb)
	}
}

func mustJSON(t *testing.T, v any) string {
	t.Helper()
	b, err := json.Marshal(v)
	must(t, err)
	return string(b)
}
