package stats

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// history draws m lognormal observations per tier (log means mus, log SD
// 0.5), two per dated day shift counted back from 2026-11-01, with a
// shift-level effect of log SD tau. Invented data, for properties only.
func history(seed uint64, mus []float64, patients []int, m int, tau float64) []TierSample {
	r := rand.New(rand.NewPCG(seed, 99))
	tiers := make([]TierSample, len(mus))
	effects := map[int]float64{}
	for k, mu := range mus {
		ts := TierSample{Code: fmt.Sprint("t", k+1), Patients: patients[k]}
		for i := range m {
			day := 1 + i/2
			b, ok := effects[day]
			if !ok {
				b = tau * r.NormFloat64()
				effects[day] = b
			}
			ts.CareMinutes = append(ts.CareMinutes, math.Exp(mu+b+0.5*r.NormFloat64()))
			ts.WindowHours = append(ts.WindowHours, 12)
			ts.Dates = append(ts.Dates, "2026-11-01")
			ts.Shifts = append(ts.Shifts, "day")
			ts.Dates[i] = dateBefore(day)
		}
		tiers[k] = ts
	}
	return tiers
}

func dateBefore(days int) string {
	return time.Date(2026, 11, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, -days).Format(time.DateOnly)
}

func v2Input(tiers []TierSample) ProjectionInput {
	return ProjectionInput{Tiers: tiers, ShiftHours: 12, DirectCareFraction: 0.8, Levels: []float64{0.9},
		Cover: 0.9, Draws: 20000, Seed: 7, Date: "2026-11-01"}
}

func mustProject(t *testing.T, in ProjectionInput) *Projection {
	t.Helper()
	p, err := Project(in)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestProjectChargeNurseBothSides: where the nurse in charge does not count
// towards the ratio, the care-time side does not count that nurse's time
// either: headcount = care-giving nurses + 1, and the shortfall table's
// capacity is (N − 1) nurses' direct care.
func TestProjectChargeNurseBothSides(t *testing.T) {
	in := v2Input(history(1, []float64{4, 4.6}, []int{8, 10}, 40, 0.1))
	counts := mustProject(t, in)
	in.Floor = &FloorSpec{PatientsPerNurse: 50, ChargeNurseCounts: false}
	extra := mustProject(t, in)
	if extra.Nurses.InCharge != 1 || *extra.Nurses.CareGiving != *counts.Nurses.CareGiving ||
		*extra.Nurses.Cover != *counts.Nurses.Cover+1 || *extra.Nurses.Recommended != *counts.Nurses.Recommended+1 {
		t.Errorf("charge nurse extra: care-giving %d cover %d rec %d; counted: care-giving %d cover %d rec %d",
			*extra.Nurses.CareGiving, *extra.Nurses.Cover, *extra.Nurses.Recommended,
			*counts.Nurses.CareGiving, *counts.Nurses.Cover, *counts.Nurses.Recommended)
	}
	perNurse := 12 * 60 * 0.8
	for _, s := range extra.Shortfall {
		if s.CareGivingNurses != s.Nurses-1 || s.CapacityMinutes != float64(s.Nurses-1)*perNurse {
			t.Errorf("headcount %d: care-giving %d, capacity %g", s.Nurses, s.CareGivingNurses, s.CapacityMinutes)
		}
		if s.Nurses == *extra.Nurses.Recommended && s.Probability > 0.1 {
			t.Errorf("shortfall at the recommendation %d is %g, above 1 − cover", s.Nurses, s.Probability)
		}
	}
	if !strings.Contains(extra.CapacityRule, "+ 1") {
		t.Errorf("capacity rule %q", extra.CapacityRule)
	}
}

// TestProjectDeclines: below MinTierObservations in a tier with patients
// the projection declines, falls back to the floor (or none) and shows no
// probability; with ≥ 30 observations in every tier it never declines.
func TestProjectDeclines(t *testing.T) {
	in := v2Input(history(2, []float64{4, 4.6}, []int{8, 3}, 40, 0))
	in.Tiers[1].CareMinutes, in.Tiers[1].WindowHours = in.Tiers[1].CareMinutes[:5], in.Tiers[1].WindowHours[:5]
	in.Tiers[1].Dates, in.Tiers[1].Shifts = in.Tiers[1].Dates[:5], in.Tiers[1].Shifts[:5]
	p := mustProject(t, in)
	if p.DataSufficient || p.Nurses.DecidedBy != DecidedByInsufficient || p.Nurses.Recommended != nil ||
		len(p.Shortfall) != 0 || len(p.Bands) != 0 || p.CoverMinutes.Defined || p.Tiers[1].NeedMore != MinTierObservations-5 {
		t.Errorf("declined without floor: %+v", p.Nurses)
	}
	if len(p.Insufficient) != 1 || !strings.Contains(p.Insufficient[0], fmt.Sprintf("need about %d more", MinTierObservations-5)) {
		t.Errorf("insufficient = %q", p.Insufficient)
	}
	b, _ := json.Marshal(p)
	if !strings.Contains(string(b), `"data_sufficient":false`) || !strings.Contains(string(b), `"recommended":null`) {
		t.Errorf("json lacks the decline: %s", b)
	}
	in.Floor = &FloorSpec{PatientsPerNurse: 4, ChargeNurseCounts: true}
	p = mustProject(t, in)
	if p.Nurses.Recommended == nil || *p.Nurses.Recommended != 3 || p.Nurses.DecidedBy != DecidedByInsufficient {
		t.Errorf("declined with floor: %+v", p.Nurses)
	}
	// A tier with 0 patients needs no observations.
	in.Tiers[1].Patients = 0
	if p := mustProject(t, in); !p.DataSufficient {
		t.Errorf("declined although the thin tier has no patients: %q", p.Insufficient)
	}
	for seed := range uint64(20) {
		in := v2Input(history(100+seed, []float64{3, 4, 5}, []int{1, 20, 2}, 30, 0.3))
		if p := mustProject(t, in); !p.DataSufficient {
			t.Fatalf("seed %d: declined with 30 observations per tier: %q", seed, p.Insufficient)
		}
	}
}

// TestProjectEntryErrorSetAside: one value typed in hours instead of
// minutes (×60) is named and set aside, and does not move the headcount.
func TestProjectEntryErrorSetAside(t *testing.T) {
	in := v2Input(history(3, []float64{4, 4.6}, []int{6, 8}, 40, 0.1))
	clean := mustProject(t, in)
	in.Tiers[0].CareMinutes[7] *= 60
	typo := mustProject(t, in)
	if len(typo.HeldOut) != 1 || typo.HeldOut[0].Tier != "t1" || typo.HeldOut[0].Index != 7 || typo.Tiers[0].HeldOut != 1 {
		t.Fatalf("held out = %+v", typo.HeldOut)
	}
	if d := *typo.Nurses.Recommended - *clean.Nurses.Recommended; d < -1 || d > 1 {
		t.Errorf("the typo moved the recommendation from %d to %d", *clean.Nurses.Recommended, *typo.Nurses.Recommended)
	}
	if !strings.Contains(strings.Join(typo.Warnings, " "), "likely entry error") {
		t.Errorf("no warning names the entry error: %q", typo.Warnings)
	}
}

// TestProjectSmallTierSpread: with few observations the predictive spread
// is not narrower than the analytic normal model's (WorkloadMoments, which
// already adds the estimation term n²s²/m).
func TestProjectSmallTierSpread(t *testing.T) {
	for seed := range uint64(10) {
		for _, m := range []int{8, 12} {
			in := v2Input(history(200+seed, []float64{4.2}, []int{6}, m, 0))
			p := mustProject(t, in)
			if !p.DataSufficient {
				t.Fatalf("seed %d m %d: declined: %q", seed, m, p.Insufficient)
			}
			y := ShiftMinutes(in.Tiers[0].CareMinutes, in.Tiers[0].WindowHours, 12)
			mu, vp, ve, _ := WorkloadMoments([]string{"t1"}, []int{6}, [][]float64{y})
			z := NormalQuantile(0.95)
			analytic := 2 * z * math.Sqrt(vp+ve)
			if got := p.Bands[0].High - p.Bands[0].Low; got < analytic {
				t.Errorf("seed %d m %d: 90%% band width %.1f below the analytic %.1f (mean %.1f)", seed, m, got, analytic, mu)
			}
		}
	}
}

// TestProjectBandSkewed: for right-skewed care the band is asymmetric,
// longer above the median than below.
func TestProjectBandSkewed(t *testing.T) {
	in := v2Input(history(4, []float64{4}, []int{2}, 60, 0))
	for i := range in.Tiers[0].CareMinutes {
		in.Tiers[0].CareMinutes[i] = math.Pow(in.Tiers[0].CareMinutes[i], 1.4)
	}
	p := mustProject(t, in)
	b, med := p.Bands[0], p.MedianMinutes.Value
	if !(b.High-med > 1.2*(med-b.Low)) {
		t.Errorf("band %.1f–%.1f around median %.1f is not right-skewed", b.Low, b.High, med)
	}
}

// TestProjectShiftEffect: with dated occurrences the shift-level component
// is estimated; without dates the projection says it could not be.
func TestProjectShiftEffect(t *testing.T) {
	in := v2Input(history(5, []float64{4, 4.5, 5}, []int{4, 6, 3}, 120, 0.3))
	p := mustProject(t, in)
	if !p.ShiftEffect.Estimated || math.Abs(p.ShiftEffect.SDLog.Value-0.3) > 0.12 {
		t.Errorf("shift effect %+v, true SD 0.3", p.ShiftEffect)
	}
	for k := range in.Tiers {
		in.Tiers[k].Dates, in.Tiers[k].Shifts = nil, nil
	}
	in.Date = ""
	p = mustProject(t, in)
	if p.ShiftEffect.Estimated || p.ShiftEffect.Reason == "" || p.Trend.Estimated ||
		!strings.Contains(strings.Join(p.Warnings, " "), "shift-level effect could not be estimated") {
		t.Errorf("without dates: %+v %+v", p.ShiftEffect, p.Trend)
	}
}

// TestProjectDriftWarned: care time rising 20% per 4 weeks is reported as
// a trend and warned about; the projection extrapolates it.
func TestProjectDriftWarned(t *testing.T) {
	in := v2Input(history(6, []float64{4.3}, []int{10}, 120, 0.05))
	flat := mustProject(t, in)
	for i, d := range in.Tiers[0].Dates {
		age := daysBetween(d, in.Date)
		in.Tiers[0].CareMinutes[i] *= math.Pow(1.2, -age/28)
	}
	p := mustProject(t, in)
	if !p.Trend.Estimated || p.Trend.Low.Value <= 0 || math.Abs(p.Trend.PercentPer28Days.Value-20) > 10 {
		t.Errorf("trend %+v, true +20%% per 28 days", p.Trend)
	}
	if !strings.Contains(strings.Join(p.Warnings, " "), "has moved") {
		t.Errorf("no drift warning: %q", p.Warnings)
	}
	// The drifted history ends at the flat history's level, so projected to
	// the end it must come out near the flat one, although its values are
	// lower on average.
	if got, want := p.MedianMinutes.Value, flat.MedianMinutes.Value; got < 0.95*want || p.Tiers[0].MedianMinutes.Value > 0.9*flat.Tiers[0].MedianMinutes.Value {
		t.Errorf("projected median %.0f with drift, %.0f flat (observed medians %.0f, %.0f): the trend is not extrapolated",
			got, want, p.Tiers[0].MedianMinutes.Value, flat.Tiers[0].MedianMinutes.Value)
	}
}

// TestProjectV2Deterministic: same seed, same result, for any GOMAXPROCS.
func TestProjectV2Deterministic(t *testing.T) {
	in := v2Input(history(7, []float64{4, 4.6}, []int{30, 70}, 40, 0.2))
	a, _ := json.Marshal(mustProject(t, in))
	old := runtime.GOMAXPROCS(1)
	b, _ := json.Marshal(mustProject(t, in))
	runtime.GOMAXPROCS(old)
	if string(a) != string(b) {
		t.Error("result depends on GOMAXPROCS")
	}
	for range 5 { // map iteration order must not reach any sum
		if c, _ := json.Marshal(mustProject(t, in)); string(c) != string(a) {
			t.Fatal("two runs differ")
		}
	}
}

// TestProjectV2BadInput: cover, draws and dates out of range are EINVALID
// naming the field.
func TestProjectV2BadInput(t *testing.T) {
	base := v2Input(history(8, []float64{4}, []int{3}, 20, 0))
	for name, c := range map[string]struct {
		mod   func(*ProjectionInput)
		field string
	}{
		"cover low":   {func(in *ProjectionInput) { in.Cover = 0.4 }, "cover_level"},
		"cover high":  {func(in *ProjectionInput) { in.Cover = 0.9995 }, "cover_level"},
		"few draws":   {func(in *ProjectionInput) { in.Draws = 999 }, "draws"},
		"bad date":    {func(in *ProjectionInput) { in.Tiers[0].Dates[3] = "2026-13-01" }, "date"},
		"no target":   {func(in *ProjectionInput) { in.Date = "" }, "date"},
		"future obs":  {func(in *ProjectionInput) { in.Tiers[0].Dates[0] = "2026-11-02" }, "date"},
		"short dates": {func(in *ProjectionInput) { in.Tiers[0].Dates = in.Tiers[0].Dates[1:] }, "date"},
		"shifts":      {func(in *ProjectionInput) { in.Tiers[0].Shifts = in.Tiers[0].Shifts[1:] }, "shift"},
	} {
		in := base
		in.Tiers = append([]TierSample(nil), base.Tiers...)
		in.Tiers[0].Dates = append([]string(nil), base.Tiers[0].Dates...)
		c.mod(&in)
		if _, err := Project(in); err == nil || wardload.ErrorField(err) != c.field {
			t.Errorf("%s: err %v, want field %s", name, err, c.field)
		}
	}
	// A tier whose observations are all equal cannot show its spread: a
	// decline with the reason, not a certainty.
	flat := base
	flat.Tiers = []TierSample{{Code: "t1", Patients: 3, CareMinutes: make([]float64, 20), WindowHours: base.Tiers[0].WindowHours}}
	for i := range flat.Tiers[0].CareMinutes {
		flat.Tiers[0].CareMinutes[i] = 60
	}
	flat.Date = ""
	p := mustProject(t, flat)
	if p.DataSufficient || !strings.Contains(p.Insufficient[0], "all 20 usable observations are equal") {
		t.Errorf("zero spread: %+v", p.Insufficient)
	}
}

func daysBetween(a, b string) float64 {
	ta, _ := time.Parse(time.DateOnly, a)
	tb, _ := time.Parse(time.DateOnly, b)
	return tb.Sub(ta).Hours() / 24
}
