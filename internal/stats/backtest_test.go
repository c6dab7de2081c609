package stats

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

// wardHistory invents `weeks` weeks of daily day shifts, each with 2–4
// timed patients in each of three tiers (lognormal, log SD 0.5) and a
// shift-level effect of log SD 0.2; from jumpWeek on, every value is
// multiplied by jump. Invented data, for properties only.
func wardHistory(seed uint64, weeks, jumpWeek int, jump float64) []BacktestObservation {
	r := rand.New(rand.NewPCG(seed, 5))
	start := time.Date(2026, 1, 5, 0, 0, 0, 0, time.UTC)
	var obs []BacktestObservation
	for d := range 7 * weeks {
		date := start.AddDate(0, 0, d).Format(time.DateOnly)
		b := 0.2 * r.NormFloat64()
		f := 1.0
		if d >= 7*jumpWeek {
			f = jump
		}
		for k, mu := range []float64{3.8, 4.4, 5.0} {
			for range 2 + r.IntN(3) {
				obs = append(obs, BacktestObservation{Tier: string(rune('a' + k)), Date: date, Shift: "day",
					Minutes: f * math.Exp(mu+b+0.5*r.NormFloat64())})
			}
		}
	}
	return obs
}

// TestBacktestCalibrated: on data drawn from the model's own family the
// backtest finds coverage near nominal. 12 weeks give 84 shift totals;
// the tolerance is 3 binomial SDs of a share over 84 (e.g. √(0.9·0.1/84)
// = 0.033 for the 90% band).
func TestBacktestCalibrated(t *testing.T) {
	res, err := Backtest(wardHistory(1, 30, 1000, 1), BacktestOptions{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if res.Totals.Checked != 84 || res.Skipped != 0 {
		t.Fatalf("checked %d shift totals, skipped %d; want 84 and 0", res.Totals.Checked, res.Skipped)
	}
	n := float64(res.Totals.Checked)
	for i, l := range res.Levels {
		tol := 3 * math.Sqrt(l*(1-l)/n)
		if got := res.Totals.Coverage[i]; math.Abs(got-l) > tol {
			t.Errorf("%g band covered %.3f of shift totals (tolerance ±%.3f)", l, got, tol)
		}
	}
	if got := res.Totals.CoverHit; got < 0.9-3*math.Sqrt(0.09/n) {
		t.Errorf("cover hit rate %.3f", got)
	}
	for _, row := range res.Tiers {
		tol := 3 * math.Sqrt(0.09/float64(row.Checked))
		if math.Abs(row.Coverage[2]-0.9) > tol {
			t.Errorf("tier %s: 90%% band covered %.3f of %d observations", row.Name, row.Coverage[2], row.Checked)
		}
	}
	if c := res.Calibration(); c.Warn(0.9) || c.Basis != "shift totals" || c.Shifts != 84 {
		t.Errorf("calibration %+v warns on calibrated data", c)
	}
}

// TestBacktestDetectsJump: when care time doubles in week 22 of 30 (the
// checked weeks are 19 to 30), the projections from the weeks before fall
// short until the trend and the lookback catch up, and the calibration
// warns (69 of 84 at or under the 90% level with these seeds).
func TestBacktestDetectsJump(t *testing.T) {
	res, err := Backtest(wardHistory(2, 30, 22, 2), BacktestOptions{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	c := res.Calibration()
	if !c.Warn(0.9) {
		t.Errorf("after care time doubled: %d of %d at or under the 90%% level; sentence %q", c.Inside, c.Shifts, res.Sentence)
	}
}

// TestBacktestBadInput names the field.
func TestBacktestBadInput(t *testing.T) {
	obs := wardHistory(3, 2, 1000, 1)
	bad := append([]BacktestObservation(nil), obs...)
	bad[3].Date = "3 March"
	if _, err := Backtest(bad, BacktestOptions{}); err == nil {
		t.Error("bad date accepted")
	}
	if _, err := Backtest(obs, BacktestOptions{Cover: 0.3}); err == nil {
		t.Error("cover 0.3 accepted")
	}
	if _, err := Backtest(nil, BacktestOptions{}); err == nil {
		t.Error("no observations accepted")
	}
}
