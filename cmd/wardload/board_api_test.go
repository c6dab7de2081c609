package main

import (
	"context"
	"encoding/json"
	"io"
	"net/http"
	"strings"
	"testing"
	"time"

	"wardload/internal/server"
	"wardload/internal/wardload"
)

// TestBoardAPIOnBothStores is the roster planner's API journey against a
// served wardload on SQLite and on PostgreSQL: one token for two wards
// pushes planned staff (bad input refused, nothing stored) and pulls the
// board, whose rows are gaps (no census yet) carrying the plan.
func TestBoardAPIOnBothStores(t *testing.T) {
	for _, store := range []string{"sqlite", "postgres"} {
		t.Run(store, func(t *testing.T) {
			opts := &storeOptions{DataDir: t.TempDir()}
			args := []string{"--addr", "127.0.0.1:0", "--data-dir", opts.DataDir}
			if store == "postgres" {
				opts.DB = mustCreateDatabase(t)
				args = append(args, "--db", opts.DB)
			}
			ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
			st, err := openStore(ctx, opts, true)
			if err != nil {
				t.Fatal(err)
			}
			defer st.Close()
			for _, code := range []string{"w2", "w3"} {
				w := &wardload.Ward{Code: code, Name: "Ward " + code, TimeZone: "Europe/London"}
				must(t, st.CreateWard(ctx, w))
				must(t, st.CreateTier(ctx, &wardload.Tier{WardID: w.ID, Code: "t1", Label: "Tier 1"}))
				must(t, st.CreateShiftPattern(ctx, &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 8 * 60, NominalHours: 12}))
				must(t, st.CreateShiftPattern(ctx, &wardload.ShiftPattern{WardID: w.ID, Name: "Night", StartMinute: 20 * 60, NominalHours: 12}))
			}
			w2, _ := st.FindWardByCode(ctx, "w2")
			w3, _ := st.FindWardByCode(ctx, "w3")
			secret, hash := server.NewTokenSecret()
			must(t, st.CreateToken(ctx, &wardload.APIToken{Name: "roster", Hash: hash, WardIDs: []int64{w2.ID, w3.ID}, WriteStaffing: true}))

			now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
			s := mustServeAt(t, func() time.Time { return now }, args...)
			call := func(method, path, body string) (int, string) {
				t.Helper()
				req, err := http.NewRequest(method, s.URL+path, strings.NewReader(body))
				if err != nil {
					t.Fatal(err)
				}
				req.Header.Set("Authorization", "Bearer "+secret)
				res, err := http.DefaultClient.Do(req)
				if err != nil {
					t.Fatal(err)
				}
				defer res.Body.Close()
				b, _ := io.ReadAll(res.Body)
				return res.StatusCode, string(b)
			}
			for _, p := range []struct{ ward, shift, body string }{
				{"w2", "Day", `{"nurses": 5}`}, {"w3", "night", `{"nurses": 3, "support_staff": 1}`},
			} {
				if code, out := call("PUT", "/api/v1/wards/"+p.ward+"/shifts/2026-03-02/"+p.shift+"/staffing", p.body); code != 200 || !strings.Contains(out, `"changed":true`) {
					t.Fatalf("PUT %s %s: %d %s", p.ward, p.shift, code, out)
				}
			}
			for _, bad := range []struct {
				path, body string
				code       int
			}{
				{"/api/v1/wards/w2/shifts/2026-03-02/Day/staffing", `{"nurses": -3}`, 400},
				{"/api/v1/wards/w2/shifts/2026-03-02/Day/staffing", `{"nurses": 9999}`, 400},
				{"/api/v1/wards/w2/shifts/2026-03-02/Evening/staffing", `{"nurses": 4}`, 404},
				{"/api/v1/wards/w9/shifts/2026-03-02/Day/staffing", `{"nurses": 4}`, 404},
			} {
				if code, out := call("PUT", bad.path, bad.body); code != bad.code || !strings.Contains(out, `"message"`) {
					t.Errorf("PUT %s %s: %d %s, want %d", bad.path, bad.body, code, out, bad.code)
				}
			}
			plans, err := st.FindPlannedStaff(ctx, wardload.PlannedStaffFilter{})
			if err != nil || len(plans) != 2 || plans[0].Nurses != 5 {
				t.Fatalf("stored plans %+v, %v; want the two good ones", plans, err)
			}

			code, out := call("GET", "/api/v1/board", "")
			if code != 200 {
				t.Fatalf("board: %d %s", code, out)
			}
			var board struct {
				Caution string
				Rows    []map[string]any
			}
			must(t, json.Unmarshal([]byte(out), &board))
			// Day and Night of 2 March and Day of 3 March, for each ward.
			if len(board.Rows) != 6 || !strings.Contains(board.Caution, "collective agreements") {
				t.Fatalf("board: %d rows, caution %q\n%s", len(board.Rows), board.Caution, out)
			}
			found := 0
			for _, r := range board.Rows {
				if r["status"] != "no_census" {
					t.Errorf("row %v: want status no_census", r)
				}
				switch {
				case r["ward"] == "w2" && r["shift"] == "Day" && r["date"] == "2026-03-02":
					found += btoi(r["planned_nurses"] == float64(5) && r["start"] == "2026-03-02T08:00:00+00:00")
				case r["ward"] == "w3" && r["shift"] == "Night" && r["date"] == "2026-03-02":
					found += btoi(r["planned_nurses"] == float64(3) && r["planned_support_staff"] == float64(1))
				}
			}
			if found != 2 {
				t.Errorf("the two plans are not both on their rows:\n%s", out)
			}
		})
	}
}

func must(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}
