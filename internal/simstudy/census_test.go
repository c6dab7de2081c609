package simstudy

import (
	"math"
	"testing"
)

// TestCensusBatteryQuick is the quick part of the census battery (issue
// 16, item 7); the full battery is bench/census_forecast.sh. Eight
// histories of the first scenario, each backtested from its newest 12
// weekly origins. The promise checked is calibration: the randomized-PIT
// coverage of each band (exactly nominal in expectation for a calibrated
// count forecast; Czado, Gneiting & Held 2009) within 3 points of
// nominal. Eight replications cannot resolve 3 points exactly, so the rule
// here is that the result is consistent with it: |PIT − L| ≤ 0.03 + 3·SE,
// SE the Monte Carlo standard error from the replications' spread (about
// 0.01–0.02 here). The integer bands the user sees are wider than L by
// construction and must not fall short by more than the same margin. MASE
// below 1 at every horizon is the target.
func TestCensusBatteryQuick(t *testing.T) {
	levels := []float64{0.8, 0.9}
	rows, err := RunCensusBattery(CensusScenarios()[0], 8, 12, 500, 1, levels)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		for i, l := range levels {
			margin := 0.03 + 3*r.PITSE[i]
			if math.IsNaN(r.PITSE[i]) || math.Abs(r.PITCoverage[i]-l) > margin {
				t.Errorf("h=%d: %g band PIT coverage %.3f (SE %.3f), want within %.3f of nominal", r.Horizon, l, r.PITCoverage[i], r.PITSE[i], margin)
			}
			if r.Coverage[i] < l-margin {
				t.Errorf("h=%d: %g integer band covers %.3f", r.Horizon, l, r.Coverage[i])
			}
		}
		if !(r.MASE < 1) {
			t.Errorf("h=%d: MASE %.3f, want below 1", r.Horizon, r.MASE)
		}
		t.Logf("h=%2d n=%4d cover %.3f/%.3f PIT %.3f/%.3f (SE %.3f/%.3f) MASE %.3f relMAE %.3f vs-average %.3f",
			r.Horizon, r.Checked, r.Coverage[0], r.Coverage[1], r.PITCoverage[0], r.PITCoverage[1], r.PITSE[0], r.PITSE[1], r.MASE, r.RelMAE, r.AvgCut)
	}
}

// A generated history leaves out about the scenario's share of dated
// shifts (missing, not zero).
func TestGenerateCensusMissingShare(t *testing.T) {
	sc := CensusScenarios()[1]
	hist := GenerateCensus(sc, 5)
	full := 7 * sc.Weeks * len(sc.Shifts) * len(sc.Tiers)
	share := 1 - float64(len(hist))/float64(full)
	// Binomial(630 dated shifts, 0.05): SE ≈ 0.0087; 4 SEs.
	if math.Abs(share-sc.Missing) > 0.035 {
		t.Errorf("missing share %.3f, want about %g", share, sc.Missing)
	}
}
