package server

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"testing"
	"time"

	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// benchBoardWards and benchBoardShifts are the board benchmark's size:
// issue 10's 100 wards × 3 shifts (target ≤ 300 ms server time).
const (
	benchBoardWards  = 100
	benchBoardShifts = 3
)

// newBenchBoard is a server on a SQLite file with benchBoardWards wards of
// benchBoardShifts 8-hour shifts (07:00, 15:00, 23:00, Europe/Dublin),
// each with a stored projection for every dated shift of the next day but
// every fourth (gap rows) and planned staff for every other one. Each
// projection is a copy of the demo ward's newest, so the stored result is
// a real model result of realistic size. It returns the handler and an
// admin's session cookie.
func newBenchBoard(b *testing.B) (http.Handler, *http.Cookie) {
	b.Helper()
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "bench"})
	demoStore, demoWard := MustOpenDemo(b)
	tmpl, _, err := demoStore.FindProjections(ctx, wardload.ProjectionFilter{WardID: &demoWard.ID, LatestOnly: true, Limit: 1})
	if err != nil || len(tmpl) == 0 {
		b.Fatalf("no demo projection: %v", err)
	}
	src := tmpl[0]
	now := demoNow
	st := MustOpenSQLite(b)
	must := func(err error) {
		b.Helper()
		if err != nil {
			b.Fatal(err)
		}
	}
	for i := range benchBoardWards {
		w := &wardload.Ward{Code: fmt.Sprintf("w%03d", i), Name: fmt.Sprintf("Ward %d", i), TimeZone: "Europe/Dublin"}
		must(st.CreateWard(ctx, w))
		tier := &wardload.Tier{WardID: w.ID, Code: "t1", Label: "Tier 1"}
		must(st.CreateTier(ctx, tier))
		loc, _ := w.Location()
		set := wardload.DefaultSettings(w.ID)
		var shifts []*wardload.ShiftPattern
		for k := range benchBoardShifts {
			sp := &wardload.ShiftPattern{WardID: w.ID, Name: []string{"Early", "Late", "Night"}[k], StartMinute: (7 + 8*k) * 60, NominalHours: 8}
			must(st.CreateShiftPattern(ctx, sp))
			shifts = append(shifts, sp)
			set.Floors = append(set.Floors, wardload.RatioFloor{ShiftID: sp.ID, PatientsPerNurse: 6})
		}
		must(st.SaveSettings(ctx, set))
		n := 0
		for d := wardload.DateOf(now).AddDays(-1); !wardload.DateOf(now).AddDays(1).Before(d); d = d.AddDays(1) {
			for _, sp := range shifts {
				n++
				start, end, hours := sp.Window(d, loc)
				if !end.After(now) || !start.Before(now.Add(24*time.Hour)) || n%4 == 0 {
					continue
				}
				c := &wardload.Census{WardID: w.ID, Date: d, ShiftID: sp.ID, Counts: []wardload.TierCount{{TierID: tier.ID, Patients: src.TotalPatients}}}
				p := *src
				p.ID, p.WardID, p.Date, p.ShiftID, p.ShiftName, p.Start, p.End, p.ShiftHours = 0, w.ID, d, sp.ID, sp.Name, start, end, hours
				must(st.CreateCensusProjection(ctx, c, &p))
				if n%2 == 0 {
					_, err := st.SetPlannedStaff(ctx, &wardload.PlannedStaff{WardID: w.ID, Date: d, ShiftID: sp.ID, Nurses: max(0, p.Recommended-1)})
					must(err)
				}
			}
		}
	}
	cfg := DefaultConfig()
	cfg.Password = testPassword
	cfg.Store = st
	cfg.Logger = slog.New(slog.NewTextHandler(io.Discard, nil))
	cfg.Now = func() time.Time { return now }
	cfg.SessionStore = sqlite.NewSessionStore(st, 0)
	s, err := New(cfg)
	must(err)
	h, err := testPassword.Hash("bench admin pw 1")
	must(err)
	admin := &wardload.User{Name: "bench.admin", Role: wardload.RoleAdmin, PasswordHash: h}
	must(st.CreateUser(ctx, admin))
	return s.Handler(), MustSession(b, s, admin.ID)
}

// BenchmarkBoard is one GET /board (the next 24 hours) of 100 wards × 3
// shifts by an admin, through the whole handler: session, store reads,
// board building and page rendering. bench/board.sh judges it.
func BenchmarkBoard(b *testing.B) {
	h, cookie := newBenchBoard(b)
	for _, target := range []string{"/board", "/board.json"} {
		b.Run(target[1:], func(b *testing.B) {
			req := httptest.NewRequest("GET", target, nil)
			req.AddCookie(cookie)
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, req)
			if rec.Code != 200 {
				b.Fatalf("%s: %d %s", target, rec.Code, rec.Body)
			}
			rows := bytes.Count(rec.Body.Bytes(), []byte(`data-testid="board-row"`)) + bytes.Count(rec.Body.Bytes(), []byte("\n{"))
			// CPU time of the process per request, beside the wall time: on
			// a shared machine the wall time includes waiting for a core.
			cpu0 := processCPU()
			n := 0
			for b.Loop() {
				rec := httptest.NewRecorder()
				h.ServeHTTP(rec, req)
				if rec.Code != 200 {
					b.Fatalf("%s: %d", target, rec.Code)
				}
				n++
			}
			b.ReportMetric(float64(rows), "rows")
			if cpu0 >= 0 && n > 0 {
				b.ReportMetric(float64(processCPU()-cpu0)/1e6/float64(n), "cpu-ms/op")
			}
		})
	}
}
