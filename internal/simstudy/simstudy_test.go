package simstudy

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/stats"
)

// constant is a degenerate care-time distribution, so that a history's
// values show the shift effect, drift and planted error exactly.
type constant float64

func (c constant) Draw(*rand.Rand) float64 { return float64(c) }
func (c constant) String() string          { return fmt.Sprint(float64(c)) }

// sampleMoments draws n values of d and returns their mean and variance
// (n−1) and the share at most q.
func sampleMoments(d Dist, n int, q float64, seed uint64) (mean, variance, below float64) {
	r := rand.New(rand.NewPCG(seed, 1))
	var sum, sq float64
	k := 0
	for range n {
		x := d.Draw(r)
		sum += x
		sq += x * x
		if x <= q {
			k++
		}
	}
	mean = sum / float64(n)
	return mean, (sq - float64(n)*mean*mean) / float64(n-1), float64(k) / float64(n)
}

func TestDistributions(t *testing.T) {
	const n = 400_000
	t90 := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: 3}.Quantile(0.9)
	z90 := stats.NormalQuantile(0.9)
	lnMean := func(mu, s float64) float64 { return math.Exp(mu + s*s/2) }
	lnVar := func(mu, s float64) float64 { return math.Expm1(s*s) * math.Exp(2*mu+s*s) }
	// Closed forms (Johnson, Kotz & Balakrishnan 1994, Continuous
	// Univariate Distributions vol. 1: gamma mean kθ and variance kθ²,
	// ch. 17; lognormal mean e^(μ+σ²/2) and variance (e^σ² − 1)e^(2μ+σ²),
	// ch. 14); the mixture's mean and variance by the law of total
	// expectation and variance; quantiles from gonum's normal and
	// Student-t quantile functions, mapped through exp.
	mixA, mixB := LogNormal{math.Log(80), 0.3}, LogNormal{math.Log(220), 0.3}
	mA, mB := lnMean(mixA.MeanLog, 0.3), lnMean(mixB.MeanLog, 0.3)
	mixMean := 0.7*mA + 0.3*mB
	mixVar := 0.7*lnVar(mixA.MeanLog, 0.3) + 0.3*lnVar(mixB.MeanLog, 0.3) + 0.7*0.3*(mA-mB)*(mA-mB)
	for _, tc := range []struct {
		name      string
		d         Dist
		mean, vr  float64 // NaN: not checked (infinite or not closed-form)
		q, pBelow float64 // P(X ≤ q) = pBelow
	}{
		{"gamma shape 3", Gamma{3, 40}, 120, 4800, math.NaN(), 0},
		{"gamma shape 0.5", Gamma{0.5, 2}, 1, 2, math.NaN(), 0},
		{"lognormal", LogNormal{math.Log(100), 0.6}, lnMean(math.Log(100), 0.6), lnVar(math.Log(100), 0.6), 100 * math.Exp(0.6*z90), 0.9},
		{"mixture", midMixture, mixMean, mixVar, math.NaN(), 0},
		{"log-t median", LogT{math.Log(100), 0.4, 3, 1440}, math.NaN(), math.NaN(), 100, 0.5},
		{"log-t 90%", LogT{math.Log(100), 0.4, 3, 1440}, math.NaN(), math.NaN(), 100 * math.Exp(0.4*t90), 0.9},
		{"log-t cap", LogT{math.Log(100), 0.4, 3, 1440}, math.NaN(), math.NaN(), 1440, 1},
	} {
		t.Run(tc.name, func(t *testing.T) {
			q := tc.q
			if math.IsNaN(q) {
				q = 0
			}
			mean, vr, below := sampleMoments(tc.d, n, q, 42)
			// 5 standard errors: the mean's is √(var/n); the variance's,
			// var·√((κ−1)/n), is bounded by var·3·√(2/n), which holds for
			// kurtosis κ ≤ 19 (gamma shape 0.5: κ = 15; lognormal σ 0.6:
			// κ ≈ 13.3).
			if !math.IsNaN(tc.mean) && math.Abs(mean-tc.mean) > 5*math.Sqrt(tc.vr/n) {
				t.Errorf("mean %.4g, want %.4g", mean, tc.mean)
			}
			if !math.IsNaN(tc.vr) && math.Abs(vr-tc.vr) > 5*3*math.Sqrt(2.0/n)*tc.vr {
				t.Errorf("variance %.4g, want %.4g", vr, tc.vr)
			}
			if !math.IsNaN(tc.q) {
				if se := math.Sqrt(tc.pBelow*(1-tc.pBelow)/n) + 1e-12; math.Abs(below-tc.pBelow) > 5*se {
					t.Errorf("P(X ≤ %.4g) = %.4f, want %.4f", tc.q, below, tc.pBelow)
				}
			}
		})
	}
}

func TestTruthGammaSum(t *testing.T) {
	// A sum of n independent Gamma(k, θ) is Gamma(nk, θ) (Johnson, Kotz &
	// Balakrishnan 1994, ch. 17); gonum's Gamma takes the rate 1/θ.
	for _, inCharge := range []bool{false, true} {
		s := &Scenario{Name: "gamma-sum", Tiers: []TierSpec{{Code: "a", Patients: 10, Obs: 2, Dist: Gamma{3, 40}}}}
		if inCharge {
			s.Floor = &stats.FloorSpec{PatientsPerNurse: 50}
		}
		const n = 200_000
		truth := NewTruth(s, n, 7)
		exact := distuv.Gamma{Alpha: 30, Beta: 1.0 / 40}
		for _, c := range []float64{900, 1152, 1400, 1728} {
			want := 1 - exact.CDF(c)
			if got := truth.Exceed(c); math.Abs(got-want) > 5*math.Sqrt(want*(1-want)/n)+1e-9 {
				t.Errorf("Exceed(%g) = %.4f, want %.4f", c, got, want)
			}
		}
		wantOracle := int(math.Ceil(exact.Quantile(Cover)/PerNurse)) + s.InCharge()
		if got := truth.Oracle(s, Cover); got != wantOracle {
			t.Errorf("in charge %v: oracle %d, want %d (true 90%% quantile %.0f min, %g min per nurse)", inCharge, got, wantOracle, exact.Quantile(Cover), PerNurse)
		}
		if got, want := s.Capacity(3), float64(3-s.InCharge())*PerNurse; got != want {
			t.Errorf("Capacity(3) = %g, want %g", got, want)
		}
	}
}

func TestTruthShiftEffect(t *testing.T) {
	// e^b·Y with b ~ N(0, τ²) and Y lognormal(μ, σ²) is lognormal(μ, σ² + τ²).
	s := &Scenario{Name: "one", ShiftSD: 0.25, Tiers: []TierSpec{{Code: "a", Patients: 1, Obs: 2, Dist: LogNormal{math.Log(100), 0.3}}}}
	truth := NewTruth(s, 200_000, 3)
	sd := math.Hypot(0.3, 0.25)
	for _, p := range []float64{0.5, 0.9, 0.99} {
		want := 100 * math.Exp(sd*stats.NormalQuantile(p))
		if got := truth.Quantile(p); math.Abs(got/want-1) > 0.01 {
			t.Errorf("quantile %g = %.2f, want %.2f", p, got, want)
		}
	}
}

func TestTruthDoesNotDependOnWorkers(t *testing.T) {
	s := Find("census-40")
	a := NewTruth(s, 3*truthChunk+5, 11)
	b := NewTruth(s, 3*truthChunk+5, 11)
	if !reflect.DeepEqual(a.totals, b.totals) {
		t.Fatal("same seed, different truth")
	}
	for i := 1; i < a.Len(); i++ {
		if a.totals[i] < a.totals[i-1] {
			t.Fatal("truth not sorted")
		}
	}
}

func TestGroupSizes(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for n := MinGroup; n <= 300; n++ {
		for range 20 {
			sum := 0
			for _, size := range groupSizes(r, n) {
				if size < MinGroup || size > MaxGroup {
					t.Fatalf("n %d: group of %d", n, size)
				}
				sum += size
			}
			if sum != n {
				t.Fatalf("n %d: sizes add up to %d", n, sum)
			}
		}
	}
}

func TestHistoryShape(t *testing.T) {
	target, _ := time.Parse(time.DateOnly, ProjectedDate)
	for _, s := range Scenarios() {
		t.Run(s.Name, func(t *testing.T) {
			in, planted := s.History(rand.New(rand.NewPCG(5, 6)), 4000, 9)
			again, _ := s.History(rand.New(rand.NewPCG(5, 6)), 4000, 9)
			if !reflect.DeepEqual(in, again) {
				t.Error("same seed, different history")
			}
			if in.Date != ProjectedDate || in.Cover != Cover || in.ShiftHours != ShiftHours || in.Draws != 4000 || in.Seed != 9 || in.Floor != s.Floor {
				t.Errorf("input settings %+v", in)
			}
			groups := map[string]int{}
			for k, tier := range in.Tiers {
				spec := s.Tiers[k]
				if tier.Code != spec.Code || tier.Patients != spec.Patients || len(tier.CareMinutes) != spec.Obs ||
					len(tier.WindowHours) != spec.Obs || len(tier.Dates) != spec.Obs || len(tier.Shifts) != spec.Obs {
					t.Fatalf("tier %s: %d values for %d observations", tier.Code, len(tier.CareMinutes), spec.Obs)
				}
				for i, d := range tier.Dates {
					day, err := time.Parse(time.DateOnly, d)
					back := target.Sub(day).Hours() / 24
					if err != nil || back < 1 || back > float64(s.Lookback()) {
						t.Errorf("tier %s: date %s is %g days back (lookback %d)", tier.Code, d, back, s.Lookback())
					}
					if tier.WindowHours[i] != ShiftHours || !(tier.CareMinutes[i] >= 0) || math.IsInf(tier.CareMinutes[i], 0) {
						t.Errorf("tier %s: window %g, minutes %g", tier.Code, tier.WindowHours[i], tier.CareMinutes[i])
					}
					groups[d+"|"+tier.Shifts[i]]++
				}
			}
			for g, n := range groups {
				if n < MinGroup || n > MaxGroup || !strings.HasSuffix(g, "|Day") && !strings.HasSuffix(g, "|Night") {
					t.Errorf("shift %s holds %d observations", g, n)
				}
			}
			if s.EntryError != (planted.Tier >= 0) {
				t.Errorf("planted %+v for EntryError %v", planted, s.EntryError)
			}
		})
	}
}

func TestHistoryEffects(t *testing.T) {
	target, _ := time.Parse(time.DateOnly, ProjectedDate)
	daysBack := func(d string) float64 {
		day, _ := time.Parse(time.DateOnly, d)
		return target.Sub(day).Hours() / 24
	}
	tiers := []TierSpec{{Code: "a", Patients: 3, Obs: 60, Dist: constant(100)}, {Code: "b", Patients: 0, Obs: 60, Dist: constant(200)}}

	t.Run("shift effect", func(t *testing.T) {
		s := &Scenario{Name: "tau", Tiers: tiers, ShiftSD: 0.25}
		in, _ := s.History(rand.New(rand.NewPCG(1, 1)), 1000, 1)
		factor := map[string]float64{}
		var logs []float64
		for k, tier := range in.Tiers {
			for i, y := range tier.CareMinutes {
				key := tier.Dates[i] + "|" + tier.Shifts[i]
				f := y / float64(s.Tiers[k].Dist.(constant))
				if prev, ok := factor[key]; ok && math.Abs(prev/f-1) > 1e-12 {
					t.Errorf("shift %s: factors %g and %g", key, prev, f)
				}
				if _, ok := factor[key]; !ok {
					logs = append(logs, math.Log(f))
				}
				factor[key] = f
			}
		}
		mean, sd := meanSD(logs)
		// Over about 30 shifts the SD of log factors estimates τ = 0.25.
		if len(logs) < 20 || math.Abs(mean) > 0.15 || sd < 0.15 || sd > 0.35 {
			t.Errorf("%d shifts, log factors mean %.3f SD %.3f, want about 0 and 0.25", len(logs), mean, sd)
		}
	})
	t.Run("drift", func(t *testing.T) {
		s := &Scenario{Name: "drift", Tiers: tiers, Drift: 0.15}
		in, _ := s.History(rand.New(rand.NewPCG(1, 1)), 1000, 1)
		for k, tier := range in.Tiers {
			for i, y := range tier.CareMinutes {
				want := float64(s.Tiers[k].Dist.(constant)) * math.Pow(1.15, -daysBack(tier.Dates[i])/28)
				if math.Abs(y/want-1) > 1e-12 {
					t.Errorf("%s: %g minutes, want %g", tier.Dates[i], y, want)
				}
			}
		}
	})
	t.Run("entry error", func(t *testing.T) {
		s := &Scenario{Name: "error", Tiers: tiers, EntryError: true}
		in, planted := s.History(rand.New(rand.NewPCG(1, 1)), 1000, 1)
		if planted.Tier != 0 || planted.True != 100 {
			t.Fatalf("planted %+v, want in tier a (the one with patients), true value 100", planted)
		}
		big := 0
		for k, tier := range in.Tiers {
			for i, y := range tier.CareMinutes {
				if y != float64(s.Tiers[k].Dist.(constant)) {
					big++
					if y != 6000 || k != planted.Tier || i != planted.Index {
						t.Errorf("tier %s value %d is %g", tier.Code, i, y)
					}
				}
			}
		}
		if big != 1 {
			t.Errorf("%d values changed, want 1", big)
		}
	})
}

func meanSD(x []float64) (mean, sd float64) {
	m, se := meanSE(x)
	return m, se * math.Sqrt(float64(len(x)))
}

func TestRunWithFixedMethods(t *testing.T) {
	s := Find("charge-nurse")
	cfg := Config{Reps: 8, Draws: 1000, TruthDraws: 20_000, Seed: 3}
	fixed := Method{Name: "fixed 5", Recommend: func(stats.ProjectionInput) (int, bool, error) { return 5, true, nil }}
	never := Method{Name: "never", Recommend: func(stats.ProjectionInput) (int, bool, error) { return 0, false, nil }}
	res, err := Run(s, cfg, fixed, never)
	if err != nil {
		t.Fatal(err)
	}
	truth := NewTruth(s, cfg.TruthDraws, s.Seed(cfg.Seed)^truthStream)
	want := truth.Exceed(4 * PerNurse) // the nurse in charge gives no direct care
	if r := res[0]; r.Declined != 0 || len(r.Shortfall) != 8 || r.Oracle != truth.Oracle(s, Cover) || r.Method != "fixed 5" {
		t.Errorf("fixed: %+v", r)
	}
	if mean, _ := res[0].MeanShortfall(); math.Abs(mean-want) > 1e-12 {
		t.Errorf("fixed: mean shortfall %g, want %g", mean, want)
	}
	if mean, se := res[0].MeanRecommended(); mean != 5 || se != 0 {
		t.Errorf("fixed: mean recommended %g ± %g", mean, se)
	}
	if r := res[1]; r.Declined != 8 || r.DeclinedShare() != 1 || len(r.Shortfall) != 0 {
		t.Errorf("never: %+v", r)
	}
	if mean, _ := res[1].MeanShortfall(); !math.IsNaN(mean) {
		t.Errorf("never: mean shortfall %g, want NaN", mean)
	}
	if f := res[1].Failures(Cover, 0); len(f) != 1 || !strings.Contains(f[0], "declined 8 of 8") {
		t.Errorf("never on a plentiful scenario: %q", f)
	}
	bad := Method{Name: "bad", Recommend: func(stats.ProjectionInput) (int, bool, error) { return 0, false, fmt.Errorf("refused") }}
	if _, err := Run(s, cfg, bad); err == nil || !strings.Contains(err.Error(), "refused") {
		t.Errorf("a method's error: %v", err)
	}
}

func TestFailures(t *testing.T) {
	plenty, tiny := Find("plentiful-30"), Find("tiny-2")
	rep := func(v float64, n int) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = v
		}
		return x
	}
	spread := func(mean, half float64, n int) []float64 {
		x := rep(mean, n)
		for i := range x {
			x[i] += half * float64(2*(i%2)-1)
		}
		return x
	}
	for _, tc := range []struct {
		name       string
		r          Result
		confidence float64
		want       []string // substrings, one per failure
	}{
		{"at the limit", Result{Scenario: tiny, Reps: 4, Shortfall: rep(0.12, 4), Recommended: []int{5, 5, 5, 5}, Oracle: 9}, 0, nil},
		{"above the limit", Result{Scenario: tiny, Reps: 4, Shortfall: rep(0.121, 4), Recommended: []int{5, 5, 5, 5}}, 0, []string{"shortfall 0.121"}},
		{"above, within Monte Carlo error", Result{Scenario: tiny, Reps: 4, Shortfall: spread(0.13, 0.05, 4), Recommended: []int{5, 5, 5, 5}}, 0.99, nil},
		{"above, beyond Monte Carlo error", Result{Scenario: tiny, Reps: 40, Shortfall: spread(0.16, 0.02, 40), Recommended: rep2(5, 40)}, 0.99, []string{"shortfall 0.160"}},
		{"all declined, tiny", Result{Scenario: tiny, Reps: 4, Declined: 4}, 0, nil},
		{"declined, plentiful", Result{Scenario: plenty, Reps: 4, Declined: 1, Shortfall: rep(0.05, 3), Recommended: []int{5, 5, 5}, Oracle: 5}, 0, []string{"declined 1 of 4"}},
		{"far from oracle", Result{Scenario: plenty, Reps: 4, Shortfall: rep(0.01, 4), Recommended: []int{6, 6, 6, 5}, Oracle: 5}, 0, []string{"mean recommended 5.75"}},
		// The oracle margin is one-sided (see Failures): below the oracle
		// the shortfall rule judges.
		{"below oracle, promise kept", Result{Scenario: plenty, Reps: 4, Shortfall: rep(0.11, 4), Recommended: []int{4, 4, 5, 4}, Oracle: 5}, 0, nil},
		{"below oracle, promise broken", Result{Scenario: plenty, Reps: 4, Shortfall: rep(0.13, 4), Recommended: []int{4, 4, 5, 4}, Oracle: 5}, 0, []string{"shortfall 0.130"}},
		{"close to oracle", Result{Scenario: plenty, Reps: 4, Shortfall: rep(0.05, 4), Recommended: []int{6, 5, 5, 6}, Oracle: 5}, 0, nil},
		{"far only for a tiny scenario", Result{Scenario: tiny, Reps: 4, Shortfall: rep(0.01, 4), Recommended: []int{9, 9, 9, 9}, Oracle: 5}, 0, nil},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := tc.r.Failures(Cover, tc.confidence)
			if len(got) != len(tc.want) {
				t.Fatalf("failures %q, want %d like %q", got, len(tc.want), tc.want)
			}
			for i, w := range tc.want {
				if !strings.Contains(got[i], w) {
					t.Errorf("failure %q, want it to say %q", got[i], w)
				}
			}
		})
	}
}

func rep2(v, n int) []int {
	x := make([]int, n)
	for i := range x {
		x[i] = v
	}
	return x
}

// The quick battery: every scenario, 50 replications of 4,000 draws each
// against a truth of 100,000 draws. Version 3 (After) must pass the rule of issue 8,
// item 6 (Result.Failures): a mean fails only where its one-sided 99%
// Student-t bound over the 50 replications is still beyond the limit, so
// the test fails when the rule is broken by more than the Monte Carlo
// error of 50 replications (about 2.4 standard errors; the table's ±se
// column shows them), never for noise. The limits themselves are the
// issue's. Version 1 must be caught where issue 8 says it breaks the
// promise, which shows this check can fail.
func TestBattery(t *testing.T) {
	cfg := Config{Reps: 50, Draws: 4000, TruthDraws: 100_000, Seed: 20261204}
	v1Breaks := map[string]bool{"charge-nurse": true, "drift": true, "entry-error": true}
	var rows []Row
	for _, s := range Scenarios() {
		res, err := Run(s, cfg, Before, After)
		if err != nil {
			t.Fatal(err)
		}
		rows = append(rows, Row{Scenario: s, Results: res})
		if f := res[1].Failures(Cover, 0.99); len(f) > 0 {
			t.Errorf("version 3, %s: %s", s.Name, strings.Join(f, "; "))
		}
		if v1Breaks[s.Name] && len(res[0].Failures(Cover, 0.99)) == 0 {
			short, _ := res[0].MeanShortfall()
			rec, _ := res[0].MeanRecommended()
			t.Errorf("version 1, %s: not caught (shortfall %.3f, recommended %.2f, oracle %d)", s.Name, short, rec, res[0].Oracle)
		}
	}
	if t.Failed() {
		var b strings.Builder
		WriteTable(&b, rows, Cover)
		t.Log("\n" + b.String())
	}
}
