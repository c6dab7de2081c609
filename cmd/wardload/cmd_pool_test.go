package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"
	"time"

	"wardload/internal/pool"
	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// poolNow is the clock of the pool fixture: the morning after the night
// shift of 10 March 2026 it projects.
var poolNow = time.Date(2026, 3, 11, 9, 0, 0, 0, time.UTC)

// seedPoolWards stores four invented wards in Europe/Dublin (UTC in
// March), each with a Day (08:00, 12 h) and a Night (20:00, 12 h) shift and
// two weeks of invented Night observations of tiers t1 and t2:
//
//   - pa: census 10 + 6 on the night of 10 March, 6 nurses on duty entered, floor 1:8 + 1 in charge;
//   - pb: census 8 + 8, no staff entered, floor 1:6 (the nurse in charge counts);
//   - pc: census 12 + 4, no staff entered, no floor;
//   - pd: no census that night (left out).
func seedPoolWards(t *testing.T, so *storeOptions) {
	t.Helper()
	ctx := context.Background()
	st, err := openStore(ctx, so, true)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	svc := &projector.Service{Store: st, Now: func() time.Time { return poolNow }, Draws: 20_000}
	night := wardload.Date{Year: 2026, Month: time.March, Day: 10}
	for wi, spec := range []struct {
		code   string
		t1, t2 int
		staff  *int
		floor  *wardload.RatioFloor
	}{
		{"pa", 10, 6, ptr(6), &wardload.RatioFloor{PatientsPerNurse: 8}},
		{"pb", 8, 8, nil, &wardload.RatioFloor{PatientsPerNurse: 6, ChargeNurseCounts: true}},
		{"pc", 12, 4, nil, nil},
		{"pd", 0, 0, nil, nil},
	} {
		w := &wardload.Ward{Code: spec.code, Name: "Pool ward " + spec.code + " (invented)", TimeZone: "Europe/Dublin"}
		must(st.CreateWard(ctx, w))
		var tiers []*wardload.Tier
		for i, code := range []string{"t1", "t2"} {
			tr := &wardload.Tier{WardID: w.ID, Code: code, Label: "Tier " + code, DisplayOrder: i}
			must(st.CreateTier(ctx, tr))
			tiers = append(tiers, tr)
		}
		must(st.CreateShiftPattern(ctx, &wardload.ShiftPattern{WardID: w.ID, Name: "Day", StartMinute: 480, NominalHours: 12}))
		sp := &wardload.ShiftPattern{WardID: w.ID, Name: "Night", StartMinute: 1200, NominalHours: 12}
		must(st.CreateShiftPattern(ctx, sp))
		settings := &wardload.Settings{WardID: w.ID, DirectCareFraction: 0.8, CoverLevel: 0.9, LookbackWeeks: 2,
			Quartiles: wardload.QuartilesHinges, Floors: []wardload.RatioFloor{}}
		if spec.floor != nil {
			f := *spec.floor
			f.ShiftID = sp.ID
			settings.Floors = append(settings.Floors, f)
		}
		must(st.SaveSettings(ctx, settings))
		var obs []*wardload.Observation
		for i := range 14 {
			d := night.AddDays(-14 + i)
			for k, tr := range tiers {
				for j := range 3 {
					obs = append(obs, &wardload.Observation{WardID: w.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d,
						WindowHours: 12, CareMinutes: float64(60*(k+1) + (i*17+j*11+wi*5)%45)})
				}
			}
		}
		_, err := st.CreateObservations(ctx, obs)
		must(err)
		if spec.t1+spec.t2 == 0 {
			continue
		}
		_, _, err = svc.Save(ctx, w.ID, night, sp.ID,
			[]wardload.TierCount{{TierID: tiers[0].ID, Patients: spec.t1}, {TierID: tiers[1].ID, Patients: spec.t2}},
			wardload.StaffOnDuty{Nurses: spec.staff}, wardload.PlannedMovement{})
		must(err)
	}
}

func ptr[T any](v T) *T { return &v }

// runPoolCLI runs a command against so's database with the fixture's clock.
func runPoolCLI(t *testing.T, so *storeOptions, args ...string) (int, string, string) {
	t.Helper()
	return runStoreCLI(t, so, func() time.Time { return poolNow }, args...)
}

// runStoreCLI runs a command against so's database with the clock now
// (nil: time.Now).
func runStoreCLI(t *testing.T, so *storeOptions, now func() time.Time, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }, now: now}
	full := append([]string{}, args...)
	if so.DB != "" {
		full = append(full, "--db", so.DB)
	} else {
		full = append(full, "--data-dir", so.DataDir)
	}
	code := run(context.Background(), full, e)
	return code, out.String(), errb.String()
}

func TestPoolSQLite(t *testing.T) {
	t.Parallel()
	so := &storeOptions{DataDir: t.TempDir()}
	seedPoolWards(t, so)
	checkPool(t, so)
}

func TestPoolPostgres(t *testing.T) {
	t.Parallel()
	so := &storeOptions{DB: mustCreateDatabase(t)}
	seedPoolWards(t, so)
	checkPool(t, so)
}

// checkPool runs `wardload pool` on the fixture and checks its figures
// against internal/pool run on the stored projections read independently.
func checkPool(t *testing.T, so *storeOptions) {
	t.Helper()
	const at = "2026-03-10T23:00:00Z"
	code, out, errs := runPoolCLI(t, so, "pool", "--ward", "pa,pb,pc,pd", "--at", at, "--draws", "20000")
	if code != exitOK {
		t.Fatalf("pool = %d, %q, %q", code, out, errs)
	}
	t.Logf("wardload pool:\n%s", out)
	for _, want := range []string{
		stats.Caution, "Ratio floors used:", "at most 8 patients per nurse", "at most 6 patients per nurse",
		"6 (on duty)", "(ratio floor)", "none entered, no floor", "Left out: pd: no census yet for 2026-03-10 Night",
		"Pooling gain:", "Gaussian copula",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, " 0%") || strings.Contains(out, " 100%") {
		t.Errorf("a chance shown as a bare 0%% or 100%%:\n%s", out)
	}

	code, js, errs := runPoolCLI(t, so, "pool", "--ward", "pa,pb,pc", "--at", at, "--json", "--staff", "pc=3", "--draws", "20000")
	if code != exitOK {
		t.Fatalf("pool --json = %d, %q", code, errs)
	}
	var got struct {
		Wards []struct {
			Ward        string `json:"ward"`
			StaffSource string `json:"staff_source"`
			Staff       int    `json:"staff"`
			Floor       *int   `json:"ratio_floor"`
		} `json:"wards"`
		Sensitivity []struct {
			Rho    float64 `json:"rho"`
			Floats int     `json:"floats"`
		} `json:"correlation_sensitivity"`
		Simulated []struct {
			Method string `json:"method"`
			Draws  int    `json:"draws"`
		} `json:"correlation_simulated"`
		Caution string `json:"caution"`
	}
	if err := json.Unmarshal([]byte(js), &got); err != nil {
		t.Fatal(err)
	}
	var raw struct {
		Independent struct {
			Floats     int `json:"floats"`
			SumBuffers int `json:"sum_of_own_buffers"`
			Gain       int `json:"pooling_gain"`
		} `json:"independent"`
	}
	if err := json.Unmarshal([]byte(js), &raw); err != nil {
		t.Fatal(err)
	}

	// The same pool from the stored projections, read here on their own.
	want := expectedPool(t, so, map[string]int{"pc": 3})
	if raw.Independent.Floats != want.Floats || raw.Independent.SumBuffers != want.SumBuffers || raw.Independent.Gain != want.Gain {
		t.Errorf("CLI floats %d buffers %d gain %d; pool.Exact on the stored tables %d %d %d",
			raw.Independent.Floats, raw.Independent.SumBuffers, raw.Independent.Gain, want.Floats, want.SumBuffers, want.Gain)
	}
	if len(got.Wards) != 3 || got.Wards[0].Staff != 6 || got.Wards[2].Staff != 3 || got.Wards[2].StaffSource != "--staff" || got.Wards[2].Floor != nil || got.Caution != stats.Caution {
		t.Errorf("wards %+v caution %q", got.Wards, got.Caution)
	}
	if len(got.Sensitivity) != 3 || got.Sensitivity[2].Rho != 0.6 || got.Sensitivity[2].Floats < got.Sensitivity[0].Floats {
		t.Errorf("sensitivity %+v", got.Sensitivity)
	}
	if len(got.Simulated) != 3 || got.Simulated[0].Method != "simulation" || got.Simulated[0].Draws != 20000 {
		t.Errorf("simulated %+v", got.Simulated)
	}

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"pool", "--ward", "pa", "--cover", "1"}, "--cover"},
		{[]string{"pool", "--ward", "pa,pa"}, "twice"},
		{[]string{"pool", "--ward", "nope", "--at", at}, "no ward"},
		{[]string{"pool", "--ward", "pa", "--at", "tonight"}, "--at"},
		{[]string{"pool", "--ward", "pa", "--staff", "pb=3"}, "not in --ward"},
		{[]string{"pool", "--ward", "pa", "--rho", "1.2"}, "--rho"},
		{[]string{"pool", "--ward", "pd", "--at", at}, "no census yet"},
	} {
		code, _, errs := runPoolCLI(t, so, c.args...)
		if code != exitUsage || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") > 2 {
			t.Errorf("%v = %d, %q; want exit 2 naming %q", c.args, code, errs, c.want)
		}
	}
}

// expectedPool reads the night's stored projections of pa, pb and pc and
// runs pool.Exact on their shortfall tables with the staff they record.
func expectedPool(t *testing.T, so *storeOptions, override map[string]int) *pool.Result {
	t.Helper()
	ctx := context.Background()
	st, err := openStore(ctx, so, false)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	var wards []pool.Ward
	for _, code := range []string{"pa", "pb", "pc"} {
		w, err := st.FindWardByCode(ctx, code)
		if err != nil {
			t.Fatal(err)
		}
		ps, _, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &w.ID, LatestOnly: true})
		if err != nil || len(ps) != 1 {
			t.Fatalf("%s: %d projections, %v", code, len(ps), err)
		}
		var res stats.Projection
		if err := json.Unmarshal([]byte(ps[0].Result), &res); err != nil {
			t.Fatal(err)
		}
		var nurses []int
		var chances []float64
		for _, s := range res.Shortfall {
			nurses = append(nurses, s.Nurses)
			chances = append(chances, s.Probability)
		}
		floor := 0
		if res.Nurses.Floor != nil {
			floor = *res.Nurses.Floor
		}
		need, err := pool.FromShortfall(code, nurses, chances, floor)
		if err != nil {
			t.Fatal(err)
		}
		staff := floor
		revs, _ := st.FindShiftRevisions(ctx, w.ID, ps[0].Date, ps[0].ShiftID)
		if len(revs) > 0 && revs[0].Staff.Nurses != nil {
			staff = *revs[0].Staff.Nurses
		}
		if n, ok := override[code]; ok {
			staff = n
		}
		wards = append(wards, pool.Ward{Need: need, Staff: staff})
	}
	res, err := pool.Exact(wards, 0.9)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestChanceText: never a bare 0% or 100%. For n = 20,000 the 95% Wilson
// upper bound of 0 in n is z²/(n + z²) = 3.8415/20003.84 = 0.0192%
// (z = 1.959964, R 4.2.2: qnorm(0.975)).
func TestChanceText(t *testing.T) {
	for _, c := range []struct {
		p    float64
		n    int
		want string
	}{
		{0, 20000, "< 0.02%"}, {0.0001, 20000, "< 0.02%"}, {1, 20000, "> 99.98%"}, {0.9999, 20000, "> 99.98%"},
		{0.0021, 20000, "0.21%"}, {0.057, 20000, "5.7%"}, {0.372, 20000, "37%"}, {0.9996, 1_000_000, "99.96%"},
	} {
		if got := chance(c.p, c.n); got != c.want {
			t.Errorf("chance(%g, %d) = %q; want %q", c.p, c.n, got, c.want)
		}
	}
	if got := pct(0.99999); got == "100%" {
		t.Errorf("pct(0.99999) = %q", got)
	}
}
