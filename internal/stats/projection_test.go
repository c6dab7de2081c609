package stats

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"wardload/internal/wardload"
)

// handInput is the hand-checkable case of TestWorkloadMomentsHand as a
// full projection: 8-hour shift, 8-hour windows (no scaling), direct-care
// fraction 0.5, so one nurse gives 8·60·0.5 = 240 care minutes; ratio floor
// 4 patients per nurse with the nurse in charge not counting.
func handInput() ProjectionInput {
	w := func(n int) []float64 { return slices.Repeat([]float64{8}, n) }
	return ProjectionInput{
		Tiers: []TierSample{
			{Code: "a", Patients: 2, CareMinutes: []float64{10, 20, 30}, WindowHours: w(3)},
			{Code: "b", Patients: 3, CareMinutes: []float64{50, 70}, WindowHours: w(2)},
			{Code: "c", Patients: 0},
		},
		ShiftHours: 8, DirectCareFraction: 0.5,
		Levels: []float64{0.8}, Cover: 0.9, Draws: 20_000, Seed: 1,
		Floor: &FloorSpec{PatientsPerNurse: 4},
	}
}

// By hand: μ = 220, Var = 800 + 1033.33… (see TestWorkloadMomentsHand).
// Nurses at the mean = 220 / 240 = 0.9167 → 1. Floor = ceil(5/4) + 1 = 3.
// R 4.2.2 (testdata/projection_reference.R): sd 42.81744192888376,
// 80 % band 165.12724026342397 .. 274.87275973657603, cover minutes
// 274.87275973657603, cover nurses 1.1453031655690669, shortfall P(T > N·240)
// for N = 1, 2, 3: 0.32021439370639548, 6.3048778946417932e-10,
// 8.3070137664740978e-32.
func TestProjectHand(t *testing.T) {
	p, err := ProjectV1(handInput())
	if err != nil {
		t.Fatal(err)
	}
	near := func(name string, got, want float64) {
		t.Helper()
		if !scalar.EqualWithinAbsOrRel(got, want, 1e-300, 1e-12) {
			t.Errorf("%s = %.17g, want %.17g", name, got, want)
		}
	}
	near("expected_minutes", p.ExpectedMinutes, 220)
	near("variance_patient", p.VariancePatient, 800)
	near("variance_estimate", p.VarianceEstimate, 3100.0/3)
	near("sd_minutes", p.SDMinutes, 42.81744192888376)
	if len(p.Bands) != 1 || p.Bands[0].Level != 0.8 {
		t.Fatalf("bands = %+v", p.Bands)
	}
	near("band low", p.Bands[0].Low, 165.12724026342397)
	near("band high", p.Bands[0].High, 274.87275973657603)
	near("cover_minutes", p.CoverMinutes, 274.87275973657603)
	near("nurse_hours.expected", p.NurseHours.Expected, 220.0/60/0.5)
	near("nurses.expected_unrounded", p.Nurses.ExpectedUnrounded, 220.0/240)
	near("nurses.cover_unrounded", p.Nurses.CoverUnrounded, 1.1453031655690669)
	if p.Nurses.Expected != 1 || p.Nurses.Cover != 2 {
		t.Errorf("nurses expected, cover = %d, %d; want 1, 2", p.Nurses.Expected, p.Nurses.Cover)
	}
	if p.Nurses.Floor == nil || *p.Nurses.Floor != 3 || p.Floor == nil || p.Floor.Nurses != 3 {
		t.Fatalf("floor = %v / %+v, want 3", p.Nurses.Floor, p.Floor)
	}
	// Simulated cover is near the analytic 1.15 nurses, so it rounds to 2
	// and the floor of 3 decides.
	if p.Nurses.CoverSimulated != 2 || p.Nurses.Recommended != 3 || p.Nurses.DecidedBy != DecidedByFloor {
		t.Errorf("cover simulated %d (%.3f), recommended %d by %s; want 2, 3 by ratio_floor",
			p.Nurses.CoverSimulated, p.Nurses.CoverSimulatedUnrounded, p.Nurses.Recommended, p.Nurses.DecidedBy)
	}
	// Default shortfall range: min(expected 1, floor 3) .. recommended + 3.
	if len(p.Shortfall) != 6 || p.Shortfall[0].Nurses != 1 || p.Shortfall[5].Nurses != 6 {
		t.Fatalf("shortfall rows = %+v", p.Shortfall)
	}
	wantP := []float64{0.32021439370639548, 6.3048778946417932e-10, 8.3070137664740978e-32}
	for i, w := range wantP {
		s := p.Shortfall[i]
		near("capacity", s.CapacityMinutes, float64(s.Nurses)*240)
		// The tail probabilities come from math.Erfc here and pnorm in R,
		// which differ in the last bits; relative error grows into the far
		// tail, worst at N = 3 (8.3e-32): 4.4e-14, so 1e-13 leaves a
		// factor of two.
		if !scalar.EqualWithinRel(s.Probability, w, 1e-13) {
			t.Errorf("shortfall N=%d = %.17g, R %.17g", s.Nurses, s.Probability, w)
		}
	}
	if got := p.Tiers[2]; got.Code != "c" || got.Patients != 0 || got.ExpectedMinutes != 0 || got.MeanMinutes.Defined {
		t.Errorf("census-0 tier = %+v", got)
	}
	if p.MethodVersion != MethodVersionV1 || p.Caution != cautionV1 || p.Patients != 5 {
		t.Errorf("method %q, caution %q, patients %d", p.MethodVersion, p.Caution, p.Patients)
	}
	var lowA, lowB, lowC bool
	for _, w := range p.Warnings {
		lowA = lowA || strings.HasPrefix(w, "Tier a has only 3")
		lowB = lowB || strings.HasPrefix(w, "Tier b has only 2")
		lowC = lowC || strings.HasPrefix(w, "Tier c")
		if strings.Contains(w, "scaled") {
			t.Errorf("unexpected scaling warning: %s", w)
		}
	}
	if !lowA || !lowB || lowC {
		t.Errorf("low-confidence warnings a, b, c = %v, %v, %v; want true, true, false: %q", lowA, lowB, lowC, p.Warnings)
	}
}

// Properties on a larger case with a fixed seed.
func TestProjectProperties(t *testing.T) {
	in := benchInput(200_000)
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	// The bootstrap total has expectation Σ n_k·ȳ_k = μ exactly.
	if !p.Simulation.MeanSE.Defined || math.Abs(p.Simulation.Mean-p.ExpectedMinutes) > 4*p.Simulation.MeanSE.Value {
		t.Errorf("simulated mean %v, μ %v, MC SE %v", p.Simulation.Mean, p.ExpectedMinutes, p.Simulation.MeanSE)
	}
	if !(p.Simulation.P10 <= p.Simulation.P50 && p.Simulation.P50 <= p.Simulation.P90) {
		t.Errorf("quantiles not ordered: %+v", p.Simulation)
	}
	for i := 1; i < len(p.Shortfall); i++ {
		a, b := p.Shortfall[i-1], p.Shortfall[i]
		if b.Probability > a.Probability || b.SimulatedProbability > a.SimulatedProbability {
			t.Errorf("shortfall rises from N=%d to N=%d: %+v %+v", a.Nurses, b.Nurses, a, b)
		}
	}
	if p.Nurses.Floor == nil || p.Nurses.Recommended < *p.Nurses.Floor || p.Nurses.Recommended < p.Nurses.CoverSimulated {
		t.Errorf("recommended %d below floor %v or simulated cover %d", p.Nurses.Recommended, p.Nurses.Floor, p.Nurses.CoverSimulated)
	}
	// Same seed, same projection; another seed moves the simulation only.
	in2 := benchInput(200_000)
	q, _ := ProjectV1(in2)
	if q.Simulation != p.Simulation {
		t.Error("same seed gave a different simulation")
	}
	in2.Seed = 2
	r, _ := ProjectV1(in2)
	if r.Simulation.P90 == p.Simulation.P90 || r.ExpectedMinutes != p.ExpectedMinutes {
		t.Error("seed did not change the simulation, or changed the analytic model")
	}
}

// benchInput is the benchmark's scenario (invented data, seeded): 4 tiers
// × 60 observations of 12-hour shifts, 40 patients, ratio floor 1:5 with
// the nurse in charge not counting.
func benchInput(draws int) ProjectionInput {
	g := rand.NewPCG(2026, 12)
	in := ProjectionInput{
		ShiftHours: 12, DirectCareFraction: 0.8, Levels: []float64{0.8, 0.9},
		Cover: 0.9, Draws: draws, Seed: 7, Floor: &FloorSpec{PatientsPerNurse: 5},
	}
	for k, n := range []int{16, 12, 8, 4} {
		t := TierSample{Code: "t" + string(rune('1'+k)), Patients: n}
		for range 60 {
			// right-skewed minutes: base × (1 + exponential-ish tail)
			u := (float64(g.Uint64()>>11) + 0.5) / (1 << 53)
			t.CareMinutes = append(t.CareMinutes, float64(60*(k+1))*(0.5-0.5*math.Log(u)))
			t.WindowHours = append(t.WindowHours, 12)
		}
		in.Tiers = append(in.Tiers, t)
	}
	return in
}

func TestProjectScalingWarning(t *testing.T) {
	in := handInput()
	in.Tiers[0].WindowHours = []float64{4, 8, 8}
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	// 10 minutes over 4 h is 20 per 8-h shift: tier a becomes 20, 20, 30.
	if !scalar.EqualWithinRel(p.Tiers[0].MeanMinutes.Value, 70.0/3, 1e-15) {
		t.Errorf("scaled mean = %v, want 23.33…", p.Tiers[0].MeanMinutes.Value)
	}
	if !slices.ContainsFunc(p.Warnings, func(w string) bool { return strings.HasPrefix(w, "1 of 5 observations were timed over windows") }) {
		t.Errorf("no scaling warning in %q", p.Warnings)
	}
}

func TestProjectFloorVariants(t *testing.T) {
	tests := []struct {
		name    string
		floor   FloorSpec
		want    int
		warnFor string
	}{
		// 5 patients at 1:4 → 2, charge nurse counts → 2.
		{"ward ratio, charge counts", FloorSpec{PatientsPerNurse: 4, ChargeNurseCounts: true}, 2, ""},
		// tier a 2 patients at 1:1 → 2; b 3 patients pooled at 1:4 → 1; +1 → 4.
		{"tier ratio plus pool", FloorSpec{PatientsPerNurse: 4, TierPatientsPerNurse: map[string]float64{"a": 1}}, 4, ""},
		// only tier b has a ratio: 3 at 1:2 → 2; a has none (warned); counts → 2.
		{"tier ratio only", FloorSpec{TierPatientsPerNurse: map[string]float64{"b": 2}, ChargeNurseCounts: true}, 2, "Tier a has no ratio floor"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := handInput()
			in.Floor = &tc.floor
			p, err := ProjectV1(in)
			if err != nil {
				t.Fatal(err)
			}
			if p.Floor.Nurses != tc.want || *p.Nurses.Floor != tc.want {
				t.Errorf("floor = %d, want %d (%s)", p.Floor.Nurses, tc.want, p.Floor.Description)
			}
			warned := slices.ContainsFunc(p.Warnings, func(w string) bool { return tc.warnFor != "" && strings.HasPrefix(w, tc.warnFor) })
			if warned != (tc.warnFor != "") {
				t.Errorf("warnings %q, want one starting %q", p.Warnings, tc.warnFor)
			}
		})
	}
	in := handInput()
	in.Floor = nil
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	if p.Floor != nil || p.Nurses.Floor != nil || p.Nurses.DecidedBy != DecidedByCover || p.Nurses.Recommended != p.Nurses.CoverSimulated {
		t.Errorf("no floor: %+v %+v", p.Floor, p.Nurses)
	}
	// The JSON result must say, not only omit, that no floor was applied.
	if !slices.ContainsFunc(p.Warnings, func(w string) bool { return strings.HasPrefix(w, "No ratio floor was configured") }) {
		t.Errorf("no floor but no warning: %q", p.Warnings)
	}
}

func TestProjectInvalid(t *testing.T) {
	tests := []struct {
		name  string
		edit  func(*ProjectionInput)
		field string
	}{
		{"shift hours 0", func(in *ProjectionInput) { in.ShiftHours = 0 }, "shift_hours"},
		{"shift hours 25.5", func(in *ProjectionInput) { in.ShiftHours = 25.5 }, "shift_hours"},
		{"shift hours NaN", func(in *ProjectionInput) { in.ShiftHours = math.NaN() }, "shift_hours"},
		{"direct care 0", func(in *ProjectionInput) { in.DirectCareFraction = 0 }, "direct_care_fraction"},
		{"direct care 1.1", func(in *ProjectionInput) { in.DirectCareFraction = 1.1 }, "direct_care_fraction"},
		{"level 1", func(in *ProjectionInput) { in.Levels = []float64{0.8, 1} }, "levels"},
		{"level NaN", func(in *ProjectionInput) { in.Levels = []float64{math.NaN()} }, "levels"},
		{"cover 0", func(in *ProjectionInput) { in.Cover = 0 }, "cover_level"},
		{"cover 1", func(in *ProjectionInput) { in.Cover = 1 }, "cover_level"},
		{"draws 0", func(in *ProjectionInput) { in.Draws = 0 }, "draws"},
		{"draws too many", func(in *ProjectionInput) { in.Draws = MaxDraws + 1 }, "draws"},
		{"negative census", func(in *ProjectionInput) { in.Tiers[0].Patients = -1 }, "census"},
		{"patients no observations", func(in *ProjectionInput) { in.Tiers[2].Patients = 1 }, "tier"},
		{"patients one observation", func(in *ProjectionInput) {
			in.Tiers[2] = TierSample{Code: "c", Patients: 1, CareMinutes: []float64{5}, WindowHours: []float64{8}}
		}, "tier"},
		{"duplicate tier", func(in *ProjectionInput) { in.Tiers[2].Code = "a" }, "tier"},
		{"empty tier code", func(in *ProjectionInput) { in.Tiers[2].Code = "" }, "tier"},
		{"negative minutes", func(in *ProjectionInput) { in.Tiers[0].CareMinutes = []float64{-1, 2, 3} }, "care_minutes"},
		{"window 0", func(in *ProjectionInput) { in.Tiers[0].WindowHours = []float64{0, 8, 8} }, "window_hours"},
		{"nurses range reversed", func(in *ProjectionInput) { in.NursesFrom, in.NursesTo = 5, 3 }, "nurses_to"},
		{"nurses negative", func(in *ProjectionInput) { in.NursesFrom = -1 }, "nurses_to"},
		{"ratio 0 alone", func(in *ProjectionInput) { in.Floor = &FloorSpec{} }, "patients_per_nurse"},
		{"ratio unknown tier", func(in *ProjectionInput) {
			in.Floor = &FloorSpec{PatientsPerNurse: 4, TierPatientsPerNurse: map[string]float64{"zz": 2}}
		}, "patients_per_nurse"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := handInput()
			tc.edit(&in)
			p, err := ProjectV1(in)
			if p != nil || wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != tc.field {
				t.Errorf("Project = %v, %v; want EINVALID field %s", p, err, tc.field)
			}
		})
	}
}

func TestProjectExplicitRangeAndNoMutation(t *testing.T) {
	in := handInput()
	in.NursesFrom, in.NursesTo = 0, 2
	before := slices.Clone(in.Tiers[0].CareMinutes)
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Shortfall) != 3 || p.Shortfall[0].Nurses != 0 || p.Shortfall[0].SimulatedProbability != 1 {
		t.Errorf("shortfall = %+v", p.Shortfall)
	}
	if !slices.Equal(before, in.Tiers[0].CareMinutes) {
		t.Error("Project modified its input")
	}
}

func TestProjectionJSON(t *testing.T) {
	in := handInput()
	in.Floor = nil
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(p)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"expected_minutes", "variance_patient", "variance_estimate", "sd_minutes", "bands",
		"simulation", "nurse_hours", "nurses", "shortfall", "warnings", "caution", "method_version"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	nurses := m["nurses"].(map[string]any)
	if v, ok := nurses["floor"]; !ok || v != nil {
		t.Errorf("nurses.floor = %v (present %v), want null", v, ok)
	}
	for _, k := range []string{"draws", "seed", "mean", "p10", "p50", "p90"} {
		if _, ok := m["simulation"].(map[string]any)[k]; !ok {
			t.Errorf("simulation lacks %q", k)
		}
	}
	if tiers := m["tiers"].([]any); tiers[2].(map[string]any)["sd_minutes"] != nil {
		t.Errorf("tier c sd = %v, want null", tiers[2])
	}
}

func TestCountAbove(t *testing.T) {
	values := []float64{1, 2, 2, 3, 5, 8}
	thresholds := []float64{0, 2, 4, 8, 9}
	// above 0: all 6; above 2: 3, 5, 8; above 4: 5, 8; above 8: none (strict).
	want := []int{6, 3, 2, 0, 0}
	if got := countAbove(values, thresholds); !slices.Equal(got, want) {
		t.Errorf("countAbove = %v, want %v", got, want)
	}
}

// Input that would overflow (a tiny window) or a huge range is refused,
// not turned into Inf or a panic.
func TestProjectExtremeInput(t *testing.T) {
	in := handInput()
	in.Tiers[0].WindowHours = []float64{1e-300, 8, 8}
	if _, err := ProjectV1(in); wardload.ErrorField(err) != "care_minutes" {
		t.Errorf("tiny window: %v, want EINVALID care_minutes", err)
	}
	in = handInput()
	in.NursesFrom, in.NursesTo = MaxNurses, MaxNurses+1
	if _, err := ProjectV1(in); wardload.ErrorField(err) != "nurses_to" {
		t.Errorf("huge range: %v, want EINVALID nurses_to", err)
	}
}

// A stored input, re-read from JSON, reproduces the result byte for byte.
func TestProjectionInputJSONRoundTrip(t *testing.T) {
	in := handInput()
	in.Floor.TierPatientsPerNurse = map[string]float64{"b": 2}
	stored, err := json.Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	var again ProjectionInput
	if err := json.Unmarshal(stored, &again); err != nil {
		t.Fatal(err)
	}
	p1, err1 := ProjectV1(in)
	p2, err2 := ProjectV1(again)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	r1, _ := json.Marshal(p1)
	r2, _ := json.Marshal(p2)
	if string(r1) != string(r2) {
		t.Errorf("re-run differs:\n%s\n%s", r1, r2)
	}
	if !strings.Contains(string(stored), `"care_minutes":[10,20,30]`) {
		t.Errorf("stored input %s", stored)
	}
}

// The domain brief's §1.6 illustration end to end (a [D] derivation in the
// brief, used only as a cross-check): 12-hour shift, direct-care fraction
// 0.85 (10.2 usable hours), tiers (n, μ h, σ h) = (10, 1.5, 0.6),
// (8, 3.0, 1.2), (4, 6.0, 2.5) with 30 observations each. Brief: the mean
// needs 6.18 → 7 nurses, the 90th percentile 7.04 → 8. R 4.2.2
// (testdata/projection_reference.R) gives 7.0444519485649364 for the latter;
// the former is 63 / 10.2 exactly.
func TestProjectDomainBrief(t *testing.T) {
	in := ProjectionInput{ShiftHours: 12, DirectCareFraction: 0.85, Cover: 0.9, Draws: 1000, Seed: 1}
	for k, s := range []struct{ n, mu, sigma float64 }{{10, 1.5, 0.6}, {8, 3.0, 1.2}, {4, 6.0, 2.5}} {
		a := s.sigma * math.Sqrt(29.0/30)
		ts := TierSample{Code: string(rune('a' + k)), Patients: int(s.n)}
		for i := range 30 {
			y := 60 * (s.mu - a)
			if i%2 == 1 {
				y = 60 * (s.mu + a)
			}
			ts.CareMinutes = append(ts.CareMinutes, y)
			ts.WindowHours = append(ts.WindowHours, 12)
		}
		in.Tiers = append(in.Tiers, ts)
	}
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinRel(p.Nurses.ExpectedUnrounded, 63/10.2, 1e-12) || p.Nurses.Expected != 7 {
		t.Errorf("mean need %.17g → %d, want 6.176… → 7", p.Nurses.ExpectedUnrounded, p.Nurses.Expected)
	}
	if !scalar.EqualWithinRel(p.Nurses.CoverUnrounded, 7.0444519485649364, 1e-12) || p.Nurses.Cover != 8 {
		t.Errorf("90%% need %.17g → %d, want 7.0444… → 8", p.Nurses.CoverUnrounded, p.Nurses.Cover)
	}
}
