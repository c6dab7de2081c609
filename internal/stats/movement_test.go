package stats

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"wardload/internal/wardload"
)

// Reference values: R 4.2.2, testdata/movement_reference.R (output in
// movement_reference.txt).
func TestEstimateMovementRateAgainstR(t *testing.T) {
	near := func(t *testing.T, name string, got, want, tol float64) {
		t.Helper()
		if !scalar.EqualWithinAbsOrRel(got, want, tol, tol) {
			t.Errorf("%s = %.17g, want %.17g", name, got, want)
		}
	}
	mon := func(n int) []int { return slices.Repeat([]int{1}, n) }
	for _, c := range []struct {
		name                 string
		y, wd                []int
		target               int
		family               string
		weekday              bool
		records, total       int
		dispersion           float64
		mean, low, high, tol float64
	}{
		// summary(glm(a ~ 1, family = quasipoisson))$dispersion = 0.2222 < 1:
		// Poisson; qgamma(c(0.05, 0.95), shape = 20.5, rate = 10).
		{"underdispersed", []int{2, 1, 3, 2, 2, 1, 2, 3, 2, 2}, mon(10), 1, "poisson", false, 10, 20, 1,
			2.0499999999999998, 1.3662775734997097, 2.8471193573412048, 1e-12},
		// φ̂ = summary(glm(d ~ 1, family = quasipoisson, control =
		// glm.control(epsilon = 1e-14, maxit = 100)))$dispersion =
		// 2.5619834752767052 (R's default epsilon 1e-8 stops early at
		// 2.56213); qgamma(c(0.05, 0.95), shape = S/φ + 0.5, rate = m/φ).
		// R's fitted mean is within 1e-9 of 22/12, hence the tolerance.
		{"overdispersed", []int{0, 4, 1, 0, 6, 2, 0, 3, 0, 5, 1, 0}, mon(12), 1, "quasipoisson", false, 12, 22, 2.5619834752767052,
			1.940082644803196, 1.0158766052069097, 3.1055312276226195, 1e-8},
		// glm(y ~ x, family = quasipoisson): t of x = 7.0946 > 1.96, so the
		// Monday records alone; φ̂ = 0.4603 < 1 is Poisson:
		// qgamma(c(0.05, 0.95), shape = 33.5, rate = 6).
		{"weekday", []int{5, 6, 4, 7, 5, 6, 1, 0, 2, 1, 1, 0, 2, 1, 1, 0}, append(mon(6), slices.Repeat([]int{3}, 10)...), 1,
			"poisson", true, 6, 33, 1, 5.583333333333333, 4.0968558482647337, 7.2590060162768273, 1e-12},
		// The same records for a Wednesday shift: Wednesday's own 10
		// (total 9), Poisson as above: Gamma(9.5, 10), mean 0.95;
		// qgamma(c(0.05, 0.95), shape = 9.5, rate = 10) (R 4.2.2).
		{"weekday other", []int{5, 6, 4, 7, 5, 6, 1, 0, 2, 1, 1, 0, 2, 1, 1, 0}, append(mon(6), slices.Repeat([]int{3}, 10)...), 3,
			"poisson", true, 10, 9, 1, 0.95, 0.50585065319295219, 1.5071763602823081, 1e-12},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := EstimateMovementRate(c.y, c.wd, c.target)
			if r.Family != c.family || r.Weekday != c.weekday || r.Records != c.records || r.Total != c.total {
				t.Fatalf("rate = %+v", r)
			}
			near(t, "dispersion", r.Dispersion, c.dispersion, max(c.tol, 1e-12))
			near(t, "mean", r.Mean, c.mean, max(c.tol, 1e-12))
			if c.tol > 0 {
				near(t, "low", r.Low, c.low, c.tol)
				near(t, "high", r.High, c.high, c.tol)
			}
		})
	}
}

// No movement at all: the rate's posterior is Gamma(1/2, m), mean 1/(2m)
// (by hand), never exactly 0.
func TestEstimateMovementRateZeros(t *testing.T) {
	r := EstimateMovementRate(make([]int, 8), make([]int, 8), 0)
	if r.Family != "poisson" || r.Mean != 1.0/16 || !(r.Low > 0) || !(r.High > r.Mean) {
		t.Fatalf("rate = %+v", r)
	}
}

// The predictive of a Poisson rate (φ = 1) is negative binomial with size
// S + 1/2 and probability m/(m + 1). R 4.2.2: qnbinom(c(0.5, 0.9, 0.99),
// size = 20.5, prob = 10/11) = 2 4 6; mean 2.05, variance 2.255.
func TestMovementDrawPredictive(t *testing.T) {
	rate := EstimateMovementRate([]int{2, 1, 3, 2, 2, 1, 2, 3, 2, 2}, make([]int, 10), 0)
	r := rand.New(rand.NewPCG(7, 11))
	const n = 400_000
	draws := make([]float64, n)
	for i := range draws {
		draws[i] = float64(rate.draw(r))
	}
	mean, sd := MeanSD(draws)
	// Monte Carlo: se(mean) = √(2.255/4e5) ≈ 0.0024; se(var) ≈ 0.006.
	if math.Abs(mean-2.05) > 0.01 || math.Abs(sd*sd-2.255) > 0.03 {
		t.Errorf("mean %g var %g, want 2.05 and 2.255", mean, sd*sd)
	}
	slices.Sort(draws)
	for i, q := range []struct{ p, want float64 }{{0.5, 2}, {0.9, 4}, {0.99, 6}} {
		if got := draws[int(q.p*n)]; got != q.want {
			t.Errorf("quantile %d (%g) = %g, want %g", i, q.p, got, q.want)
		}
	}
}

// movementTruth is a ward with known care and movement.
type movementTruth struct {
	meanlog, sdlog []float64 // per tier
	census         []int
	adm, dis       float64 // Poisson rates per shift
}

func (w movementTruth) care(r *rand.Rand, k int) float64 {
	return math.Exp(w.meanlog[k] + w.sdlog[k]*r.NormFloat64())
}

// shift draws one real shift's total with its movement.
func (w movementTruth) shift(r *rand.Rand) float64 {
	n := 0
	for _, c := range w.census {
		n += c
	}
	a, d := poissonDraw(r, w.adm), min(int(poissonDraw(r, w.dis)), n)
	var patients []int
	for k, c := range w.census {
		for range c {
			patients = append(patients, k)
		}
	}
	r.Shuffle(len(patients), func(i, j int) { patients[i], patients[j] = patients[j], patients[i] })
	total := 0.0
	for i, k := range patients {
		c := w.care(r, k)
		if i < d {
			c *= r.Float64() // leaves at a uniform time
		}
		total += c
	}
	for range int(a) {
		total += (1 - r.Float64()) * w.care(r, patients[r.IntN(n)])
	}
	return total
}

// input draws a history (observations and end-of-shift records) from the
// truth.
func (w movementTruth) input(r *rand.Rand, seed uint64) ProjectionInput {
	in := ProjectionInput{ShiftHours: 12, DirectCareFraction: 0.8, Levels: []float64{0.8}, Cover: 0.9,
		Draws: 2000, Seed: seed, Date: "2026-03-16", Movement: &MovementInput{}}
	for k := range w.census {
		ts := TierSample{Code: string(rune('a' + k)), Patients: w.census[k]}
		for range 60 {
			ts.CareMinutes = append(ts.CareMinutes, w.care(r, k))
			ts.WindowHours = append(ts.WindowHours, 12)
		}
		in.Tiers = append(in.Tiers, ts)
	}
	for i := range 20 {
		in.Movement.History = append(in.Movement.History, MovementRecord{
			Date:       time.Date(2026, 2, 1+i, 0, 0, 0, 0, time.UTC).Format(time.DateOnly),
			Admissions: int(poissonDraw(r, w.adm)), Discharges: int(poissonDraw(r, w.dis)),
		})
	}
	return in
}

// With known rates, the cover quantile with movement modelled covers the
// real shift about as often as promised (0.9); holding the census fixed
// (version 3) undercovers when more patients come than go. 400
// replications: the binomial SE of a 0.9 share is 0.015, so the window
// 0.86–0.94 is about ±2.7 SE.
func TestMovementCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation study")
	}
	w := movementTruth{meanlog: []float64{math.Log(60), math.Log(150)}, sdlog: []float64{0.5, 0.4},
		census: []int{6, 4}, adm: 4, dis: 2}
	r := rand.New(rand.NewPCG(20261205, 1))
	const reps = 400
	with, without := 0, 0
	for i := range reps {
		in := w.input(r, uint64(i+1))
		p, err := Project(in)
		if err != nil {
			t.Fatal(err)
		}
		q, err := ProjectV3(in)
		if err != nil {
			t.Fatal(err)
		}
		if !p.Movement.Modelled || !p.Movement.FromRates {
			t.Fatalf("movement not modelled: %+v", p.Movement)
		}
		real := w.shift(r)
		if real <= p.CoverMinutes.Value {
			with++
		}
		if real <= q.CoverMinutes.Value {
			without++
		}
	}
	cw, cwo := float64(with)/reps, float64(without)/reps
	t.Logf("coverage of the 90%% cover quantile: with movement %.3f, census held fixed %.3f", cw, cwo)
	if cw < 0.86 || cw > 0.94 {
		t.Errorf("coverage with movement = %.3f, want 0.86–0.94", cw)
	}
	if cwo > 0.84 {
		t.Errorf("coverage without movement = %.3f, want below 0.84 (it should undercover)", cwo)
	}
}

// Without movement to model, version 4 gives version 3's numbers; the
// movement part says why.
func TestProjectMovementNotModelled(t *testing.T) {
	w := movementTruth{meanlog: []float64{math.Log(60), math.Log(150)}, sdlog: []float64{0.5, 0.4},
		census: []int{6, 4}, adm: 4, dis: 2}
	in := w.input(rand.New(rand.NewPCG(3, 4)), 9)
	in.Movement.History = in.Movement.History[:MinMovementRecords-1]
	p, err := Project(in)
	if err != nil {
		t.Fatal(err)
	}
	q, err := ProjectV3(in)
	if err != nil {
		t.Fatal(err)
	}
	if p.Movement == nil || p.Movement.Modelled || p.Movement.Reason == "" || p.Movement.Records != 7 {
		t.Fatalf("movement = %+v", p.Movement)
	}
	if p.CoverMinutes != q.CoverMinutes || p.ExpectedMinutes != q.ExpectedMinutes || !slices.Equal(p.Bands, q.Bands) {
		t.Errorf("version 4 without movement differs from version 3: %v %v", p.CoverMinutes, q.CoverMinutes)
	}
	if q.Movement != nil || q.MethodVersion != MethodVersionV3 || p.MethodVersion != MethodVersion {
		t.Errorf("versions %s %s, v3 movement %+v", p.MethodVersion, q.MethodVersion, q.Movement)
	}

	// Planned admissions alone are modelled, the history's rates not.
	two := 2
	in.Movement.PlannedAdmissions = &two
	p, err = Project(in)
	if err != nil {
		t.Fatal(err)
	}
	mv := p.Movement
	if !mv.Modelled || mv.FromRates || !(mv.ExpectedMinutes.Value > 0) || len(mv.BandsWithout) != 1 {
		t.Fatalf("movement = %+v", mv)
	}
	// Two admissions arriving at uniform times add, on average, one
	// patient's care: 0.6·E[a] + 0.4·E[b] with E = e^{μ+σ²/2} of the
	// truth ≈ 0.6·68 + 0.4·162.5 ≈ 106 minutes; the fitted tiers differ
	// from the truth by sampling error, so allow 25%.
	if mv.ExpectedMinutes.Value < 80 || mv.ExpectedMinutes.Value > 135 {
		t.Errorf("expected movement minutes = %g, want about 106", mv.ExpectedMinutes.Value)
	}
	if !(p.CoverMinutes.Value > mv.CoverMinutesWithout.Value) || mv.CoverMinutesWithout != q.CoverMinutes {
		t.Errorf("cover with %g, without %v, v3 %v", p.CoverMinutes.Value, mv.CoverMinutesWithout, q.CoverMinutes)
	}
}

func TestProjectMovementBadInput(t *testing.T) {
	w := movementTruth{meanlog: []float64{math.Log(60)}, sdlog: []float64{0.5}, census: []int{3}, adm: 1, dis: 1}
	neg := -1
	for field, mod := range map[string]func(*ProjectionInput){
		"planned_admissions": func(in *ProjectionInput) { in.Movement.PlannedAdmissions = &neg },
		"planned_discharges": func(in *ProjectionInput) { in.Movement.PlannedDischarges = &neg },
		"movement":           func(in *ProjectionInput) { in.Movement.History[0].Date = "yesterday" },
		"date":               func(in *ProjectionInput) { in.Date = "" },
	} {
		in := w.input(rand.New(rand.NewPCG(1, 2)), 1)
		mod(&in)
		if _, err := Project(in); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != field {
			t.Errorf("%s: err = %v", field, err)
		}
	}
}

// Discharges never exceed the census; drawn admissions never the free
// beds; planned counts are lower bounds, planned admissions also on a
// full ward.
func TestMovementCounts(t *testing.T) {
	rate := EstimateMovementRate([]int{9, 8, 10, 9, 9, 8, 10, 9}, make([]int, 8), 0)
	m := &movementFit{adm: &rate, dis: &rate, patients: 3, beds: 5, planAdm: 1}
	r := rand.New(rand.NewPCG(5, 6))
	for range 1000 {
		a, d := m.counts(r)
		if d > 3 || a > 5-3+d || a < 1 || d < 0 {
			t.Fatalf("admissions %d discharges %d with 3 patients and 5 beds", a, d)
		}
	}
	full := &movementFit{patients: 5, beds: 5, planAdm: 2, planDis: 9}
	if a, d := full.counts(r); a != 2 || d != 5 {
		t.Errorf("full ward, planned 2 admissions and 9 discharges: %d and %d, want 2 and 5", a, d)
	}
}

// BenchmarkProjectMovement measures the cost of movement: version 4 with
// 20 records draws the shift twice (with movement, and with the census
// fixed for the band without it), against version 3.
func BenchmarkProjectMovement(b *testing.B) {
	w := movementTruth{meanlog: []float64{math.Log(60), math.Log(150)}, sdlog: []float64{0.5, 0.4},
		census: []int{12, 8}, adm: 4, dis: 2}
	in := w.input(rand.New(rand.NewPCG(1, 1)), 1)
	in.Draws = 20_000
	for _, c := range []struct {
		name    string
		project func(ProjectionInput) (*Projection, error)
	}{{"v4-movement", Project}, {"v3-fixed", ProjectV3}} {
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := c.project(in); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
