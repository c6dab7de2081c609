package server

import (
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// TestDutyGap checks the sentence of the staff on duty against each kind
// of recommendation (wording is wardload's own; the figures are the
// arguments, so the expected strings follow from them).
func TestDutyGap(t *testing.T) {
	floor := func(n int) *int { return &n }
	for _, tc := range []struct {
		name  string
		p     wardload.Projection
		n     int
		want  string
		below bool
	}{
		{"issue 11's example", wardload.Projection{Recommended: 8, Floor: floor(7), DecidedBy: stats.DecidedByCover}, 6,
			"You have 6 nurses on duty; the estimate is 8 — 2 short; the ratio floor needs 7 — 1 short.", true},
		{"below the estimate, floor met", wardload.Projection{Recommended: 8, Floor: floor(5), DecidedBy: stats.DecidedByCover}, 7,
			"You have 7 nurses on duty; the estimate is 8 — 1 short; the ratio floor needs 5.", true},
		{"as many", wardload.Projection{Recommended: 8, Floor: floor(8), DecidedBy: stats.DecidedByBoth}, 8,
			"You have 8 nurses on duty; the estimate is 8 — as many; the ratio floor needs 8.", false},
		{"more, no floor", wardload.Projection{Recommended: 4, DecidedBy: stats.DecidedByCover}, 5,
			"You have 5 nurses on duty; the estimate is 4 — 1 more; no ratio floor is configured for this shift.", false},
		{"one nurse, declined with a floor", wardload.Projection{Recommended: 3, Floor: floor(3), DecidedBy: stats.DecidedByInsufficient}, 1,
			"You have 1 nurse on duty; the estimate is the ratio floor alone, 3 — 2 short.", true},
		{"declined without a floor", wardload.Projection{DecidedBy: stats.DecidedByInsufficient}, 4,
			"You have 4 nurses on duty; there is no estimate (too few observations and no ratio floor); no ratio floor is configured for this shift.", false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, below := dutyGap(&tc.p, tc.n)
			if got != tc.want || below != tc.below {
				t.Errorf("got %q below %v,\nwant %q below %v", got, below, tc.want, tc.below)
			}
		})
	}
}

// TestDutyChance checks that the chance is read from the table, and that
// outside its range it errs on the unsafe side: above the first row's
// chance for fewer nurses, at most the last row's for more.
func TestDutyChance(t *testing.T) {
	rows := []web.ShortfallRowVM{{Nurses: "5", Chance: "62% (61–63%)"}, {Nurses: "6", Chance: "21% (20–22%)"}, {Nurses: "7", Chance: "< 0.02%"}}
	for _, tc := range []struct {
		n    int
		want string
	}{
		{6, "Chance of a shortfall with the 6 nurses on duty: 21% (20–22%)."},
		{7, "Chance of a shortfall with the 7 nurses on duty: < 0.02%."},
		{3, "Chance of a shortfall with the 3 nurses on duty: higher than with 5 nurses, which is 62% (61–63%)."},
		{9, "Chance of a shortfall with the 9 nurses on duty: at most that with 7 nurses, which is < 0.02%."},
		{1, "Chance of a shortfall with the 1 nurse on duty: higher than with 5 nurses, which is 62% (61–63%)."},
	} {
		if got := dutyChance(rows, tc.n); got != tc.want {
			t.Errorf("%d nurses: %q, want %q", tc.n, got, tc.want)
		}
	}
	if got := dutyChance(nil, 4); got != "" {
		t.Errorf("no table: %q", got)
	}
}
