package main

import (
	"fmt"
	"io"
	"math/rand/v2"

	"wardload/internal/simstudy"
	"wardload/internal/stats"
)

// quantileTable prints, per scenario, how often the true next shift total
// exceeds each version's predictive cover-level quantile (in minutes,
// before rounding to nurses), averaged over reps histories. A calibrated
// predictive gives 1 − cover (0.10); the battery's main table judges the
// rounded recommendation, where rounding up hides a quantile that is too
// low, so this table shows what the rounding hides. Histories come from
// PCG(seed, i) as in simstudy.Run; the truth from its own stream.
func quantileTable(w io.Writer, scenarios []*simstudy.Scenario, reps, draws, truthDraws int, seed uint64) error {
	fmt.Fprintf(w, "\nPredictive %g quantile in minutes, before rounding: true chance the next shift exceeds it (calibrated: %.2f)\n",
		simstudy.Cover, 1-simstudy.Cover)
	fmt.Fprintf(w, "%-16s %10s %10s %10s %12s %12s\n", "scenario", "v1 sim", "v2", "v3", "v3 declined", "truth q")
	for _, s := range scenarios {
		sd := s.Seed(seed)
		truth := simstudy.NewTruth(s, truthDraws, sd^0x7175616e74696c65)
		var e1 float64
		e := map[string]float64{}
		n := map[string]int{}
		declined := 0
		for i := range reps {
			r := rand.New(rand.NewPCG(sd, uint64(i)))
			in, _ := s.History(r, draws, sd+uint64(i))
			v1, err := stats.ProjectV1(in)
			if err != nil {
				return err
			}
			e1 += truth.Exceed(v1.Simulation.Cover)
			for name, project := range map[string]func(stats.ProjectionInput) (*stats.Projection, error){"v2": stats.ProjectV2, "v3": stats.Project} {
				p, err := project(in)
				if err != nil {
					return err
				}
				if !p.DataSufficient {
					if name == "v3" {
						declined++
					}
					continue
				}
				e[name] += truth.Exceed(p.CoverMinutes.Value)
				n[name]++
			}
		}
		cell := func(name string) string {
			if n[name] == 0 {
				return "—"
			}
			return fmt.Sprintf("%.3f", e[name]/float64(n[name]))
		}
		fmt.Fprintf(w, "%-16s %10.3f %10s %10s %11.0f%% %12.0f\n", s.Name, e1/float64(reps), cell("v2"), cell("v3"), 100*float64(declined)/float64(reps), truth.Quantile(simstudy.Cover))
	}
	return nil
}
