package server

import (
	"context"
	"encoding/json"
	"net/http/httptest"
	"testing"

	"wardload/internal/wardload"
)

// A token for wards A and B lists both until B is retired, then A only;
// B's projections stay readable by code (the route answers, not 403/404).
func TestAPIWardsLeavesOutRetired(t *testing.T) {
	f := newFixture(t)
	secret, _ := f.MustToken(t, "planner", f.wardA.ID, f.wardB.ID)
	list := func() []string {
		req := httptest.NewRequest("GET", "/api/v1/wards", nil)
		req.Header.Set("Authorization", "Bearer "+secret)
		res, body := f.do(t, req)
		if res.StatusCode != 200 {
			t.Fatalf("status %d: %s", res.StatusCode, body)
		}
		var out struct {
			Wards []struct{ Code string } `json:"wards"`
		}
		if err := json.Unmarshal([]byte(body), &out); err != nil {
			t.Fatal(err)
		}
		var codes []string
		for _, w := range out.Wards {
			codes = append(codes, w.Code)
		}
		return codes
	}
	if got := list(); len(got) != 2 {
		t.Fatalf("before retiring: %v, want both wards", got)
	}
	yes := true
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	if _, err := f.st.UpdateWard(ctx, f.wardB.ID, wardload.WardUpdate{Retired: &yes}); err != nil {
		t.Fatal(err)
	}
	if got := list(); len(got) != 1 || got[0] != "w-a" {
		t.Errorf("after retiring ward B: %v, want [w-a]", got)
	}
	req := httptest.NewRequest("GET", "/api/v1/projections?ward=w-b&from=2026-02-01&to=2026-03-01", nil)
	req.Header.Set("Authorization", "Bearer "+secret)
	if res, body := f.do(t, req); res.StatusCode != 200 {
		t.Errorf("retired ward's projections: %d %s", res.StatusCode, body)
	}
}
