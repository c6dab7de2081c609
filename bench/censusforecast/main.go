// Command censusforecast runs the full census forecast battery of
// internal/simstudy (issue 16, item 7) and prints, per scenario and
// horizon, the coverage of the 80% and 90% census bands (the integer bands
// users see and the randomized-PIT coverage that calibration promises,
// with its Monte Carlo SE), MASE against the seasonal-naive forecast, the
// MAE relative to seasonal naive and the cut in MAE against the fixed
// average census. It exits 1 when a PIT coverage is more than 3 points
// from nominal or a MASE is not below 1, and 2 on bad flags.
//
//	go run ./bench/censusforecast -reps 60 -origins 20
package main

import (
	"flag"
	"fmt"
	"math"
	"os"
	"time"

	"wardload/internal/simstudy"
)

func main() {
	reps := flag.Int("reps", 60, "replications (census histories) per scenario")
	origins := flag.Int("origins", 20, "newest weekly origins backtested per history")
	draws := flag.Int("draws", 1000, "predictive draws per dated shift")
	seed := flag.Uint64("seed", 20261205, "base seed")
	flag.Parse()
	if *reps < 2 || *origins < 1 || *draws < 100 {
		fmt.Fprintln(os.Stderr, "censusforecast: -reps ≥ 2, -origins ≥ 1, -draws ≥ 100")
		os.Exit(2)
	}
	levels := []float64{0.8, 0.9}
	failed := false
	fmt.Printf("Census forecast battery: %d histories per scenario, %d weekly origins each, %d draws, seed %d.\n", *reps, *origins, *draws, *seed)
	fmt.Println("Pass rule: |PIT coverage − nominal| ≤ 0.03 at every horizon and level; MASE < 1.")
	fmt.Println()
	fmt.Printf("%-26s %4s %6s  %-13s  %-13s  %-11s  %5s  %6s  %6s\n", "scenario", "h", "n", "80% int/PIT", "90% int/PIT", "PIT SE", "MASE", "relMAE", "vs avg")
	for _, sc := range simstudy.CensusScenarios() {
		start := time.Now()
		rows, err := simstudy.RunCensusBattery(sc, *reps, *origins, *draws, *seed, levels)
		if err != nil {
			fmt.Fprintln(os.Stderr, "censusforecast:", err)
			os.Exit(2)
		}
		for _, r := range rows {
			mark := ""
			for i, l := range levels {
				if math.Abs(r.PITCoverage[i]-l) > 0.03 {
					mark = "  FAIL coverage"
				}
			}
			if !(r.MASE < 1) {
				mark += "  FAIL MASE"
			}
			failed = failed || mark != ""
			fmt.Printf("%-26s %4d %6d  %.3f / %.3f  %.3f / %.3f  %.3f/%.3f  %5.3f  %6.3f  %5.1f%%%s\n", sc.Name, r.Horizon, r.Checked,
				r.Coverage[0], r.PITCoverage[0], r.Coverage[1], r.PITCoverage[1], r.PITSE[0], r.PITSE[1], r.MASE, r.RelMAE, 100*r.AvgCut, mark)
		}
		fmt.Printf("%-26s (%.1f s)\n", "", time.Since(start).Seconds())
	}
	if failed {
		os.Exit(1)
	}
}
