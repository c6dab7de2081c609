package export

import (
	"encoding/json"
	"strings"
	"testing"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// boardProjection is a stored method 3 projection of ward w's dated shift
// with a shortfall table for 4–6 nurses and the given floor.
func boardProjection(t *testing.T, w *wardload.Ward, sp *wardload.ShiftPattern, d wardload.Date, rec int, floor *int) *wardload.Projection {
	t.Helper()
	loc, _ := w.Location()
	start, end, hours := sp.Window(d, loc)
	res := stats.Projection{MethodVersion: stats.MethodVersion, DataSufficient: true, Shortfall: []stats.Shortfall{
		{Nurses: 4, Probability: 0.4, Low: 0.39, High: 0.41, Text: "40% (39–41%)"},
		{Nurses: 5, Probability: 0.1, Low: 0.09, High: 0.11, Text: "10% (9.5–11%)"},
		{Nurses: 6, Probability: 0, Low: 0, High: 0.0002, Text: "< 0.02%"},
	}}
	b, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	return &wardload.Projection{ID: int64(d.Day)*10 + sp.ID, WardID: w.ID, Date: d, ShiftID: sp.ID, ShiftName: sp.Name, Start: start, End: end,
		ShiftHours: hours, TotalPatients: 20, CoverLevel: 0.9, Recommended: rec, Floor: floor, DecidedBy: "cover",
		MethodVersion: stats.MethodVersion, Result: string(b)}
}

// TestBuildBoard checks the window (shifts overlapping the next 24 hours,
// the running one included, across the spring clock change), gap rows,
// the chance read at the planned headcount or bounded outside the table,
// and the order by risk.
func TestBuildBoard(t *testing.T) {
	w := &wardload.Ward{ID: 1, Code: "w1", Name: "Ward 1", TimeZone: "Europe/Dublin"}
	day := &wardload.ShiftPattern{ID: 1, WardID: 1, Name: "Day", StartMinute: 8 * 60, NominalHours: 12}
	night := &wardload.ShiftPattern{ID: 2, WardID: 1, Name: "Night", StartMinute: 20 * 60, NominalHours: 12}
	// 29 March 2026 01:00 UTC is when Dublin moves from GMT to IST (+01:00).
	now := time.Date(2026, 3, 28, 12, 0, 0, 0, time.UTC)
	d28, d29 := wardload.Date{Year: 2026, Month: 3, Day: 28}, wardload.Date{Year: 2026, Month: 3, Day: 29}
	d := &BoardData{Wards: []*wardload.Ward{w}, Patterns: map[int64][]*wardload.ShiftPattern{1: {day, night}},
		Projections: []*wardload.Projection{
			boardProjection(t, w, day, d28, 5, new(4)),
			boardProjection(t, w, night, d28, 5, new(5)),
			boardProjection(t, w, day, d29, 5, nil),
		},
		Planned: []*wardload.PlannedStaff{
			{WardID: 1, Date: d28, ShiftID: 1, Nurses: 5}, // exact row: 10%
			{WardID: 1, Date: d28, ShiftID: 2, Nurses: 3}, // below the table and the floor of 5
			{WardID: 1, Date: d29, ShiftID: 1, Nurses: 9}, // above the table: at most < 0.02%
		}}
	b, err := BuildBoard(d, now, now.Add(BoardDay), now)
	if err != nil {
		t.Fatal(err)
	}
	// Day 28 (running), Night 28 (11 real hours over the change), Day 29
	// (08:00 IST = 07:00 UTC, before noon UTC): three rows; Night 29
	// starts after the window.
	if len(b.Rows) != 3 {
		t.Fatalf("%d rows, want 3: %+v", len(b.Rows), b.Rows)
	}
	got := map[string]BoardRow{}
	for _, r := range b.Rows {
		got[r.Date.String()+" "+r.Shift] = r
	}
	n28 := got["2026-03-28 Night"]
	if h := n28.End.Sub(n28.Start).Hours(); h != 11 || FormatTime(n28.End) != "2026-03-29T08:00:00+01:00" {
		t.Errorf("night over the change: %s–%s (%v h), want 11 h ending 08:00+01:00", FormatTime(n28.Start), FormatTime(n28.End), h)
	}
	if !n28.BelowFloor || n28.Chance == nil || n28.Chance.Bound != ChanceAtLeast || n28.Chance.Nurses != 4 ||
		n28.Chance.ChanceText() != "higher than with 4 nurses: 40% (39–41%)" || *n28.Difference != -2 {
		t.Errorf("night 28: %+v chance %+v", n28, n28.Chance)
	}
	d28r := got["2026-03-28 Day"]
	if d28r.Chance == nil || d28r.Chance.Bound != ChanceExact || d28r.Chance.Text != "10% (9.5–11%)" || *d28r.Difference != 0 || d28r.BelowFloor {
		t.Errorf("day 28: %+v chance %+v", d28r, d28r.Chance)
	}
	d29r := got["2026-03-29 Day"]
	if d29r.Chance == nil || d29r.Chance.ChanceText() != "at most that with 6 nurses: < 0.02%" || d29r.Floor != nil {
		t.Errorf("day 29: %+v chance %+v", d29r, d29r.Chance)
	}
	// Risk order: below the floor first, then by chance.
	order := []string{b.Rows[0].Date.String() + " " + b.Rows[0].Shift, b.Rows[1].Date.String() + " " + b.Rows[1].Shift, b.Rows[2].Date.String() + " " + b.Rows[2].Shift}
	if strings.Join(order, ",") != "2026-03-28 Night,2026-03-28 Day,2026-03-29 Day" {
		t.Errorf("order %v", order)
	}

	// Without projections or plans every row is a gap, said as such.
	d.Projections, d.Planned = nil, nil
	b, err = BuildBoard(d, now, now.Add(BoardDay), now)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range b.Rows {
		if r.Status != StatusNoCensus || r.Recommended != nil || r.Chance != nil {
			t.Errorf("gap row %+v", r)
		}
	}
	var csv, js strings.Builder
	if err := WriteBoardCSV(&csv, b); err != nil {
		t.Fatal(err)
	}
	if err := WriteBoardJSON(&js, b); err != nil {
		t.Fatal(err)
	}
	if strings.Count(csv.String(), stats.Caution) != 1 || strings.Count(js.String(), stats.Caution) != 1 {
		t.Error("the caution is not given exactly once")
	}
	if !strings.Contains(csv.String(), ",no_census,") || !strings.Contains(js.String(), `"status":"no_census"`) {
		t.Errorf("gap status missing:\n%s\n%s", csv.String(), js.String())
	}
}

// TestBoardDecodesOnlyWhatItNeeds: the lean decode gives the board the
// same floor, sufficiency and shortfall table as the full one.
func TestBoardDecodesOnlyWhatItNeeds(t *testing.T) {
	w := &wardload.Ward{ID: 1, Code: "w1", Name: "Ward 1", TimeZone: "Europe/Dublin"}
	sp := &wardload.ShiftPattern{ID: 1, WardID: 1, Name: "Day", StartMinute: 8 * 60, NominalHours: 12}
	p := boardProjection(t, w, sp, wardload.Date{Year: 2026, Month: 3, Day: 2}, 5, new(4))
	full, err := DecodeResult(p)
	if err != nil {
		t.Fatal(err)
	}
	lean, err := decodeBoardResult(p)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := json.Marshal([]any{full.V2.DataSufficient, full.V2.Floor, full.V2.Shortfall})
	b, _ := json.Marshal([]any{lean.V2.DataSufficient, lean.V2.Floor, lean.V2.Shortfall})
	if string(a) != string(b) {
		t.Errorf("lean %s\nfull %s", b, a)
	}
	p.Result = "{"
	if _, err := decodeBoardResult(p); wardload.ErrorCode(err) != wardload.EINTERNAL {
		t.Errorf("broken result: %v, want internal", err)
	}
}
