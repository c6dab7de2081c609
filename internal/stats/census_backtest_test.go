package stats

import (
	"encoding/json"
	"math"
	"testing"
)

// The benchmarks by hand on 15 days of one shift, counts 0..14 on day d
// = d (tier 0) and 5 (tier 1): the fixed average is 7 and 5; every
// one-week seasonal difference is 7 and 0, so the MASE scales are 7 and 0;
// from origin day 14 the seasonal-naive forecast of a day is the same
// weekday's count in the newest week up to the origin: day 16 → 9,
// 15 → 8, 21 → 14, 28 → 14.
func TestCensusBenchmarksByHand(t *testing.T) {
	var recs []censusRecord
	for d := range 15 {
		recs = append(recs, censusRecord{day: d, weekday: (d + 4) % 7, shift: "D", counts: []int{d, 5}})
	}
	b := newCensusBenchmarks(recs)
	if b.average(0, "D") != 7 || b.average(1, "D") != 5 {
		t.Errorf("averages %g, %g; want 7, 5", b.average(0, "D"), b.average(1, "D"))
	}
	if b.scale(0, "D") != 7 || b.scale(1, "D") != 0 {
		t.Errorf("scales %g, %g; want 7, 0", b.scale(0, "D"), b.scale(1, "D"))
	}
	for _, tc := range []struct{ day, want int }{{16, 9}, {21, 14}, {28, 14}, {15, 8}} {
		got, ok := b.naive(0, censusTarget{day: tc.day, shift: "D"}, 14)
		if !ok || got != float64(tc.want) {
			t.Errorf("naive for day %d from origin 14 = %g, %v; want %d", tc.day, got, ok, tc.want)
		}
	}
	// Day 9 missing: the week before (day 2) stands in.
	delete(b.byDay, occKey{9, "D"})
	if got, ok := b.naive(0, censusTarget{day: 16, shift: "D"}, 14); !ok || got != 2 {
		t.Errorf("naive with day 9 missing = %g, %v; want 2", got, ok)
	}
}

func TestBacktestCensus(t *testing.T) {
	hist := poissonHistory("2026-01-05", 12*7, []string{"Day", "Night"}, 8, 3, 2, nil)
	o := CensusBacktestOptions{Beds: 40, Seed: 3, Draws: 400}
	res, err := BacktestCensus(hist, o)
	if err != nil {
		t.Fatal(err)
	}
	// 84 days (0..83): origins on days 27, 34, …, 76 (while origin + 1 ≤
	// 83): 8 of them; horizon 14 lands in the history from the 7 up to day
	// 69, horizon 28 from the 5 up to day 55.
	if res.Origins != 8 || res.FirstOrigin != "2026-02-01" || res.LastOrigin != "2026-03-22" {
		t.Errorf("origins %d, %s to %s", res.Origins, res.FirstOrigin, res.LastOrigin)
	}
	wantChecked := map[int]int{1: 8 * 2 * 2, 7: 8 * 2 * 2, 14: 7 * 2 * 2, 28: 5 * 2 * 2}
	for _, h := range res.Horizons {
		if h.Checked != wantChecked[h.Horizon] || h.Compared != h.Checked {
			t.Errorf("h=%d: checked %d, compared %d; want %d", h.Horizon, h.Checked, h.Compared, wantChecked[h.Horizon])
		}
		for i := range h.Coverage {
			if h.Coverage[i] < 0 || h.Coverage[i] > 1 || h.PITCoverage[i] < 0 || h.PITCoverage[i] > h.Coverage[i]+1e-12 {
				t.Errorf("h=%d level %d: coverage %g, PIT %g (the PIT share can never exceed the integer band's)", h.Horizon, i, h.Coverage[i], h.PITCoverage[i])
			}
		}
		if !(h.MAE > 0 && h.MAENaive > 0 && h.MAEAverage > 0) || math.Abs(h.RelMAE-h.MAE/h.MAENaive) > 1e-12 {
			t.Errorf("h=%d: MAE %g, naive %g, average %g, relative %g", h.Horizon, h.MAE, h.MAENaive, h.MAEAverage, h.RelMAE)
		}
	}
	a, _ := json.Marshal(res)
	res2, _ := BacktestCensus(hist, o)
	b, _ := json.Marshal(res2)
	if string(a) != string(b) {
		t.Error("the same seed gave different backtests")
	}
	o.Origins = 2
	res3, err := BacktestCensus(hist, o)
	if err != nil || res3.Origins != 2 || res3.LastOrigin != res.LastOrigin {
		t.Errorf("Origins 2: %v, %+v", err, res3)
	}
}
