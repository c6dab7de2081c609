package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"time"
)

// backtestTier is one invented tier of historyCSV: log-scale location and
// patient-to-patient SD of its per-shift care minutes.
type backtestTier struct {
	code      string
	logMedian float64
	sd        float64
}

// historyCSV writes an invented ward history for the backtest and project
// tests: weeks×7 days from Monday 5 January 2026, Day and Night shifts (the
// night at 0.75 of the day), tiers t1–t3 with lognormal per-patient shift
// minutes exp(μ_k + b_g + σ_k·ε), a shift-level effect b_g ~ N(0, 0.2²)
// shared by every patient of the occurrence, 1 to 3 timed patients per tier
// and occurrence, and windows of 12 or 6 hours (the minutes written are for
// the window, at a constant rate). The last jumpWeeks weeks are multiplied
// by jump. It returns the file, its newest date and the number of
// observations in the last checked weeks.
func historyCSV(seed uint64, weeks, jumpWeeks int, jump float64, checkedWeeks int) (csv, newest string, checkedObs int) {
	r := rand.New(rand.NewPCG(seed, 0x77617264))
	tiers := []backtestTier{{"t1", math.Log(40), 0.45}, {"t2", math.Log(90), 0.35}, {"t3", math.Log(200), 0.3}}
	start := time.Date(2026, time.January, 5, 0, 0, 0, 0, time.UTC)
	var b strings.Builder
	b.WriteString("date,shift,tier,care_minutes,window_hours\n")
	days := 7 * weeks
	for d := range days {
		date := start.AddDate(0, 0, d).Format(time.DateOnly)
		newest = date
		for _, shift := range []string{"Day", "Night"} {
			level := 0.0
			if shift == "Night" {
				level = math.Log(0.75)
			}
			if d >= days-7*jumpWeeks {
				level += math.Log(jump)
			}
			effect := 0.2 * r.NormFloat64()
			for _, t := range tiers {
				for range 1 + r.IntN(3) {
					minutes := math.Exp(t.logMedian + level + effect + t.sd*r.NormFloat64())
					window := 12.0
					if r.IntN(2) == 0 {
						window = 6
					}
					fmt.Fprintf(&b, "%s,%s,%s,%.3f,%g\n", date, shift, t.code, minutes*window/12, window)
					if d >= days-7*checkedWeeks {
						checkedObs++
					}
				}
			}
		}
	}
	return b.String(), newest, checkedObs
}
