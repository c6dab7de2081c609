// Command calibration runs the simulation battery of internal/simstudy
// (issue 8, item 6) and prints its table: per scenario, version 1
// (bootstrap, "before"), version 2 and version 3 (the current one) side by
// side, with the mean true
// shortfall at the recommendation, the declined share, the mean
// recommendation, the oracle and their difference. It exits with status 1
// when a version 3 row breaks the pass rule on the point estimates
// (simstudy.Result.Failures with confidence 0), and 2 on bad flags.
//
//	go run ./bench/calibration -reps 200 -draws 20000
//	go run ./bench/calibration -scenario drift,shift-effect -reps 400
package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"
	"time"

	"wardload/internal/simstudy"
)

func main() {
	reps := flag.Int("reps", 200, "replications (observation histories) per scenario")
	draws := flag.Int("draws", 20000, "simulation draws of each projection (at least 1000)")
	truth := flag.Int("truth", 200000, "Monte Carlo draws of each scenario's true shift total")
	seed := flag.Uint64("seed", 20261204, "base seed")
	names := flag.String("scenario", "all", "comma-separated scenario names, or all")
	quantile := flag.Bool("quantile", false, "also print the calibration of each version's cover quantile before rounding")
	flag.Parse()
	err := run(os.Stdout, *reps, *draws, *truth, *seed, *names, *quantile)
	switch {
	case err == errFailed:
		os.Exit(1)
	case err != nil:
		fmt.Fprintln(os.Stderr, "calibration:", err)
		os.Exit(2)
	}
}

var errFailed = fmt.Errorf("a version 3 row breaks the pass rule")

func run(w io.Writer, reps, draws, truth int, seed uint64, names string, quantile bool) error {
	if reps < 2 || draws < 1000 || truth < 10000 {
		return fmt.Errorf("need -reps ≥ 2, -draws ≥ 1000 and -truth ≥ 10000")
	}
	var scenarios []*simstudy.Scenario
	if names == "all" {
		scenarios = simstudy.Scenarios()
	} else {
		for name := range strings.SplitSeq(names, ",") {
			s := simstudy.Find(strings.TrimSpace(name))
			if s == nil {
				return fmt.Errorf("no scenario %q", name)
			}
			scenarios = append(scenarios, s)
		}
	}
	cfg := simstudy.Config{Reps: reps, Draws: draws, TruthDraws: truth, Seed: seed}
	fmt.Fprintf(w, "Simulation battery: %d replications, %d projection draws, %d truth draws, seed %d, GOMAXPROCS %d\n",
		reps, draws, truth, seed, runtime.GOMAXPROCS(0))
	fmt.Fprintf(w, "Cover %g; rule: mean true shortfall ≤ %.2f; with ≥ 30 obs in every tier with patients, mean rec − oracle ≤ %.1f and no declining.\n",
		simstudy.Cover, 1-simstudy.Cover+simstudy.ShortfallMargin, simstudy.OracleMargin)
	fmt.Fprintf(w, "Shortfall and rec are means over replications that did not decline; ±se is the shortfall's standard error over replications.\n\n")
	start := time.Now()
	var rows []simstudy.Row
	failed := 0
	for _, s := range scenarios {
		t0 := time.Now()
		res, err := simstudy.Run(s, cfg, simstudy.Before, simstudy.Previous, simstudy.After)
		if err != nil {
			return err
		}
		rows = append(rows, simstudy.Row{Scenario: s, Results: res})
		if len(res[len(res)-1].Failures(simstudy.Cover, 0)) > 0 {
			failed++
		}
		fmt.Fprintf(os.Stderr, "%-16s %6.1fs\n", s.Name, time.Since(t0).Seconds())
	}
	if err := simstudy.WriteTable(w, rows, simstudy.Cover); err != nil {
		return err
	}
	fmt.Fprintf(w, "\nScenarios:\n")
	for _, s := range scenarios {
		fmt.Fprintf(w, "  %-16s %s\n", s.Name, s.About)
	}
	if quantile {
		if err := quantileTable(w, scenarios, reps, draws, truth, seed); err != nil {
			return err
		}
	}
	fmt.Fprintf(w, "\n%d of %d version 3 rows fail; %.1fs in all\n", failed, len(scenarios), time.Since(start).Seconds())
	if failed > 0 {
		return errFailed
	}
	return nil
}
