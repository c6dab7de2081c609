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

// horizonAcc by hand. Draws 1..10 (median type 1: 5; 80% band q(0.1)–q(0.9)
// = 1–9). y = 9: inside; F(8) = 0.8, F(9) = 0.9, so the PIT share inside
// [0.1, 0.9] is 1. y = 10: outside; F(9) = 0.9, F(10) = 1: share 0.
// Errors |9 − 5| = 4 and |10 − 5| = 5; naive 7 and 10 → |2| and |0|;
// average 6 → 3 and 4; scales 2 and 0 (the second left out of MASE).
func TestHorizonAccByHand(t *testing.T) {
	draws := []int32{10, 9, 8, 7, 6, 5, 4, 3, 2, 1}
	var a horizonAcc
	a.add(9, draws, []float64{0.8}, true, 7, 6, 2)
	a.add(10, draws, []float64{0.8}, true, 10, 6, 0)
	a.add(3, draws, []float64{0.8}, false, 0, 0, 0) // no naive: coverage only; PIT [0.2, 0.3] inside
	h := a.finish(7, 1)
	want := CensusHorizon{Horizon: 7, Checked: 3, Compared: 2, Scaled: 1, Coverage: []float64{2.0 / 3}, PITCoverage: []float64{2.0 / 3},
		MAE: 4.5, MAENaive: 1, MAEAverage: 3.5, MASE: 2, RelMAE: 4.5}
	if h.Horizon != want.Horizon || h.Checked != want.Checked || h.Compared != want.Compared || h.Scaled != want.Scaled ||
		math.Abs(h.Coverage[0]-want.Coverage[0]) > 1e-12 || math.Abs(h.PITCoverage[0]-want.PITCoverage[0]) > 1e-12 ||
		h.MAE != want.MAE || h.MAENaive != want.MAENaive || h.MAEAverage != want.MAEAverage || h.MASE != want.MASE || h.RelMAE != want.RelMAE {
		t.Errorf("got %+v\nwant %+v", h, want)
	}
	if draws[0] != 10 {
		t.Error("draws modified")
	}
}
