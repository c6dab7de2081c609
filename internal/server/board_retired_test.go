package server

import (
	"context"
	"encoding/json"
	"net/http/httptest"
	"testing"

	"wardload/internal/wardload"
)

// A retired ward leaves the board (no permanent "no census yet" rows), a
// retired shift pattern leaves it too, and neither takes a new plan.
func TestBoardAndPlansLeaveOutRetired(t *testing.T) {
	f := newCensusFixture(t)
	token, _ := f.MustWriteToken(t, "roster", f.wardA.ID, f.wardB.ID)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	rows := func() map[string]int {
		req := httptest.NewRequest("GET", "/api/v1/board", nil)
		req.Header.Set("Authorization", "Bearer "+token)
		res, body := f.do(t, req)
		if res.StatusCode != 200 {
			t.Fatalf("board: %d %s", res.StatusCode, body)
		}
		var out struct {
			Rows []map[string]any `json:"rows"`
		}
		if err := json.Unmarshal([]byte(body), &out); err != nil {
			t.Fatal(err)
		}
		n := map[string]int{}
		for _, r := range out.Rows {
			n[r["ward"].(string)+" "+r["shift"].(string)]++
		}
		return n
	}
	before := rows()
	if before["w-b Day"] == 0 || before["w-a Night"] == 0 {
		t.Fatalf("board before retiring: %v", before)
	}
	yes := true
	if _, err := f.st.UpdateWard(ctx, f.wardB.ID, wardload.WardUpdate{Retired: &yes}); err != nil {
		t.Fatal(err)
	}
	if _, err := f.st.UpdateShiftPattern(ctx, f.a.night.ID, wardload.ShiftPatternUpdate{Retired: &yes}); err != nil {
		t.Fatal(err)
	}
	after := rows()
	if after["w-b Day"] != 0 || after["w-b Night"] != 0 || after["w-a Night"] != 0 || after["w-a Day"] != before["w-a Day"] {
		t.Errorf("board after retiring ward B and A's Night: %v (before %v)", after, before)
	}
	for _, tc := range []struct{ ward, shift, field string }{{"w-b", "Day", "ward"}, {"w-a", "Night", "shift"}} {
		res, body := f.putStaffing(t, token, tc.ward, "2026-03-03", tc.shift, `{"nurses": 5}`)
		if res.StatusCode != 400 || !json.Valid([]byte(body)) {
			t.Errorf("plan for retired %s %s: %d %s", tc.ward, tc.shift, res.StatusCode, body)
		}
	}
	if n := len(f.plans(t)); n != 0 {
		t.Errorf("%d plans stored for retired things", n)
	}
}
