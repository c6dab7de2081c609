package demo_test

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	"wardload/internal/demo"
	"wardload/internal/password"
	"wardload/internal/projector"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// testParams hash the demo accounts' passwords cheaply: four accounts at
// 64 MiB each would dominate the test time; the hashing itself is tested
// in internal/password.
var testParams = password.Params{MemoryKiB: 64, Time: 1, Threads: 1, SaltLen: 16, KeyLen: 32}

func TestMain(m *testing.M) {
	code := m.Run()
	if seeded.st != nil {
		seeded.st.(*sqlite.Store).Close()
	}
	if seeded.dir != "" {
		os.RemoveAll(seeded.dir)
	}
	os.Exit(code)
}

// now is a fixed clock whose ten-week period spans the end of British
// Summer Time on 2026-10-25.
var now = time.Date(2026, 11, 20, 9, 0, 0, 0, time.UTC)

func mustOpen(t *testing.T) wardload.Store {
	t.Helper()
	ctx := context.Background()
	st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(t.TempDir(), "demo.db"), Now: func() time.Time { return now }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	if err := st.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	return st
}

func mustSeed(t *testing.T, st wardload.Store) *demo.Result {
	t.Helper()
	res, err := demo.Seed(context.Background(), st, now, testParams)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// seeded is one fresh SQLite store seeded for now, shared by the tests
// that only read it: seeding costs seconds, most of it projections.
var seeded struct {
	once sync.Once
	st   wardload.Store
	res  *demo.Result
	err  error
	dir  string // removed by TestMain
}

// mustSeeded returns the shared seeded store and its seed's result.
func mustSeeded(t *testing.T) (wardload.Store, *demo.Result) {
	t.Helper()
	seeded.once.Do(func() {
		ctx := context.Background()
		if seeded.dir, seeded.err = os.MkdirTemp("", "wardload-demo-"); seeded.err != nil {
			return
		}
		st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(seeded.dir, "demo.db"), Now: func() time.Time { return now }})
		if err != nil {
			seeded.err = err
			return
		}
		seeded.st = st
		if seeded.err = st.Migrate(ctx); seeded.err == nil {
			seeded.res, seeded.err = demo.Seed(ctx, st, now, testParams)
		}
	})
	if seeded.err != nil {
		t.Fatal(seeded.err)
	}
	return seeded.st, seeded.res
}

func TestSeed(t *testing.T) {
	t.Parallel() // the seeds are independent; PostgreSQL's mostly waits
	st, res := mustSeeded(t)
	checkSeeded(t, st, res)
}

// checkSeed seeds st, a fresh store, and checks the scenario.
func checkSeed(t *testing.T, st wardload.Store) {
	t.Helper()
	checkSeeded(t, st, mustSeed(t, st))
}

// checkSeeded checks the scenario in st, which res says was just seeded
// into a fresh store.
func checkSeeded(t *testing.T, st wardload.Store, res *demo.Result) {
	ctx := context.Background()
	if !res.Created || res.Ward == nil || res.Ward.Code != demo.WardCode {
		t.Fatalf("Seed = %+v; want Created with the demo ward", res)
	}

	t.Run("accounts sign in with the returned passwords", func(t *testing.T) {
		roles := map[string]int{}
		for _, a := range res.Accounts {
			roles[a.Role]++
			u, err := st.FindUserByName(ctx, a.Name)
			if err != nil {
				t.Fatal(err)
			}
			if u.Role != a.Role {
				t.Errorf("%s: role %s; want %s", a.Name, u.Role, a.Role)
			}
			if ok, err := password.Verify(a.Password, u.PasswordHash); err != nil || !ok {
				t.Errorf("%s: password does not verify (%v)", a.Name, err)
			}
			if _, err := password.Check(a.Password, a.Name); err != nil {
				t.Errorf("%s: the generated password breaks the password rule: %v", a.Name, err)
			}
			if a.Role != wardload.RoleAdmin && !slices.Contains(u.WardIDs, res.Ward.ID) {
				t.Errorf("%s: not a member of the demo ward", a.Name)
			}
		}
		want := map[string]int{wardload.RoleAdmin: 1, wardload.RoleManager: 1, wardload.RoleChargeNurse: 2}
		if fmt.Sprint(roles) != fmt.Sprint(want) {
			t.Errorf("roles = %v; want %v", roles, want)
		}
	})

	tiers, err := st.FindTiers(ctx, res.Ward.ID)
	if err != nil || len(tiers) != 4 {
		t.Fatalf("FindTiers = %d tiers, %v; want 4", len(tiers), err)
	}
	planted, err := demo.PlantedErrors(now)
	if err != nil {
		t.Fatal(err)
	}
	last := wardload.DateOf(now.In(mustLoc(t))).AddDays(-1)

	t.Run("each tier has at least 8 weeks of right-skewed observations", func(t *testing.T) {
		prevMedian := 0.0
		for _, tier := range tiers {
			obs := find(t, st, wardload.ObservationFilter{WardID: &res.Ward.ID, TierID: &tier.ID, IncludeExcluded: true})
			if len(obs) < 100 {
				t.Errorf("tier %s: %d observations; want at least 100", tier.Code, len(obs))
			}
			if first := obs[0].Date; first.After(last.AddDays(-8*7 + 1)) {
				t.Errorf("tier %s: first observation %s; want on or before %s", tier.Code, first, last.AddDays(-8*7+1))
			}
			if got := obs[len(obs)-1].Date; got != last {
				t.Errorf("tier %s: last observation %s; want %s", tier.Code, got, last)
			}
			// Minutes per hour of window, leaving out planted errors.
			var rates []float64
			for _, o := range obs {
				if !isPlanted(o, tier.Code, planted) {
					rates = append(rates, o.CareMinutes/o.WindowHours)
				}
			}
			mean, median := meanMedian(rates)
			if !(mean > median) {
				t.Errorf("tier %s: mean %.2f ≤ median %.2f min/h; want right skew", tier.Code, mean, median)
			}
			if !(median > prevMedian) {
				t.Errorf("tier %s: median %.2f min/h not above previous tier's %.2f", tier.Code, median, prevMedian)
			}
			prevMedian = median
		}
	})

	t.Run("planted entry errors are stored", func(t *testing.T) {
		if len(planted) < 3 {
			t.Fatalf("%d planted errors; want at least 3", len(planted))
		}
		kinds := map[string]bool{}
		for _, p := range planted {
			kinds[p.Kind] = true
			d := p.Date
			n := 0
			for _, o := range find(t, st, wardload.ObservationFilter{WardID: &res.Ward.ID, From: &d, To: &d, IncludeExcluded: true}) {
				tier, err := st.FindTierByID(ctx, o.TierID)
				if err != nil {
					t.Fatal(err)
				}
				if isPlanted(o, tier.Code, []demo.PlantedError{p}) && shiftName(t, st, o.ShiftID) == p.Shift {
					n++
				}
			}
			if n != 1 {
				t.Errorf("planted %+v: found %d matching observations; want 1", p, n)
			}
		}
		if !kinds[demo.ErrorExtraZero] || !kinds[demo.ErrorHours] {
			t.Errorf("planted kinds = %v; want both %s and %s", kinds, demo.ErrorExtraZero, demo.ErrorHours)
		}
	})

	t.Run("full windows follow the clock change", func(t *testing.T) {
		// The night of 2026-10-24 runs 19:30 BST to 08:00 GMT: 13.5 hours.
		d := wardload.Date{Year: 2026, Month: time.October, Day: 24}
		full := 0
		for _, o := range find(t, st, wardload.ObservationFilter{WardID: &res.Ward.ID, From: &d, To: &d, IncludeExcluded: true}) {
			if shiftName(t, st, o.ShiftID) != "Night" {
				continue
			}
			switch o.WindowHours {
			case 13.5:
				full++
			case 4:
			default:
				t.Errorf("night of %s: window %v h; want 13.5 or 4", d, o.WindowHours)
			}
		}
		if full == 0 {
			t.Errorf("night of %s: no full-window observation", d)
		}
	})

	t.Run("census for every dated shift", func(t *testing.T) {
		latest, total, err := st.FindCensus(ctx, wardload.CensusFilter{WardID: &res.Ward.ID, LatestOnly: true})
		if err != nil {
			t.Fatal(err)
		}
		if want := demo.Weeks * 7 * 2; total != want || len(latest) != want {
			t.Errorf("latest census: %d (total %d); want %d", len(latest), total, want)
		}
		revised := 0
		for _, c := range latest {
			if c.Revision > 1 {
				revised++
			}
			if n := c.Total(); n < 20 || n > 28 {
				t.Errorf("census %s: %d patients; want 20..28 for 28 beds", c.Date, n)
			}
		}
		if revised == 0 {
			t.Error("no corrected census; want a few revisions")
		}
	})

	t.Run("projections for the census history", func(t *testing.T) {
		ps, total, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &res.Ward.ID, LatestOnly: true})
		if err != nil {
			t.Fatal(err)
		}
		// Only the first days, before every tier has two observations of
		// the shift, may lack one.
		if want := demo.Weeks*7*2 - 14; total < want || len(ps) != total {
			t.Errorf("latest projections: %d (total %d); want at least %d", len(ps), total, want)
		}
		latest, _, err := st.FindCensus(ctx, wardload.CensusFilter{WardID: &res.Ward.ID, LatestOnly: true})
		if err != nil {
			t.Fatal(err)
		}
		type key struct {
			d     wardload.Date
			shift int64
		}
		rev := map[key]int{}
		for _, c := range latest {
			rev[key{c.Date, c.ShiftID}] = c.Revision
		}
		for _, p := range ps {
			if p.CensusRevision != rev[key{p.Date, p.ShiftID}] {
				t.Errorf("projection %s %s is of revision %d; the census is at %d", p.Date, p.ShiftName, p.CensusRevision, rev[key{p.Date, p.ShiftID}])
			}
			if p.Floor == nil || p.Recommended < *p.Floor || p.Recommended < p.NursesCover || p.TotalPatients < 20 {
				t.Errorf("projection %s %s: %d patients, floor %v, cover %d, recommended %d", p.Date, p.ShiftName, p.TotalPatients, p.Floor, p.NursesCover, p.Recommended)
			}
		}
		got, err := projector.Recompute(ps[0])
		if err != nil {
			t.Fatal(err)
		}
		if b, _ := json.Marshal(got); string(b) != ps[0].Result {
			t.Error("the newest demo projection does not recompute to its stored result")
		}
	})

	t.Run("settings", func(t *testing.T) {
		s, err := st.FindSettings(ctx, res.Ward.ID)
		if err != nil {
			t.Fatal(err)
		}
		if s.Beds != 28 || s.CoverLevel != 0.9 || s.LookbackWeeks != 8 || len(s.Floors) != 2 {
			t.Errorf("settings = %+v; want 28 beds, cover 0.9, 8 weeks, 2 floors", s)
		}
	})

	t.Run("second seed does nothing", func(t *testing.T) {
		count := func() (obs, census, users int) {
			_, obs, err1 := st.FindObservations(ctx, wardload.ObservationFilter{IncludeExcluded: true, Limit: 1})
			_, census, err2 := st.FindCensus(ctx, wardload.CensusFilter{Limit: 1})
			_, users, err3 := st.FindUsers(ctx, wardload.UserFilter{Limit: 1})
			if err := errors.Join(err1, err2, err3); err != nil {
				t.Fatal(err)
			}
			return obs, census, users
		}
		o1, c1, u1 := count()
		again := mustSeed(t, st)
		if again.Created || len(again.Accounts) != 0 || again.Ward == nil || again.Ward.ID != res.Ward.ID {
			t.Errorf("second Seed = %+v; want Created=false, no accounts, the same ward", again)
		}
		if o2, c2, u2 := count(); o2 != o1 || c2 != c1 || u2 != u1 {
			t.Errorf("after second Seed: %d observations, %d census, %d users; want %d, %d, %d", o2, c2, u2, o1, c1, u1)
		}
	})
}

func TestSeedIsDeterministic(t *testing.T) {
	t.Parallel() // the seeds are independent; PostgreSQL's mostly waits
	a, ra := mustSeeded(t)
	b := mustOpen(t)
	rb := mustSeed(t, b)
	da, db := dump(t, a, ra.Ward.ID), dump(t, b, rb.Ward.ID)
	if len(da) == 0 {
		t.Fatal("no observations seeded")
	}
	if !slices.Equal(da, db) {
		for i := range min(len(da), len(db)) {
			if da[i] != db[i] {
				t.Fatalf("observation %d differs:\n%s\n%s", i, da[i], db[i])
			}
		}
		t.Fatalf("observation counts differ: %d vs %d", len(da), len(db))
	}
	if ra.Accounts[0].Password == rb.Accounts[0].Password {
		t.Error("two seeds gave the same password; passwords must come from crypto/rand")
	}
}

// dump renders a ward's observations, census and projections without IDs or times.
func dump(t *testing.T, st wardload.Store, wardID int64) []string {
	t.Helper()
	var out []string
	for _, o := range find(t, st, wardload.ObservationFilter{WardID: &wardID, IncludeExcluded: true}) {
		tier, err := st.FindTierByID(context.Background(), o.TierID)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, fmt.Sprintf("obs %s %s %s %g %g %v", o.Date, tier.Code, shiftName(t, st, o.ShiftID), o.WindowHours, o.CareMinutes, o.Factors))
	}
	cs, _, err := st.FindCensus(context.Background(), wardload.CensusFilter{WardID: &wardID})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cs {
		var counts strings.Builder
		for _, tc := range c.Counts {
			counts.WriteString(fmt.Sprintf(" %d", tc.Patients))
		}
		out = append(out, fmt.Sprintf("census %s %s r%d%s", c.Date, shiftName(t, st, c.ShiftID), c.Revision, counts.String()))
	}
	ps, _, err := st.FindProjections(context.Background(), wardload.ProjectionFilter{WardID: &wardID})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range ps {
		out = append(out, fmt.Sprintf("projection %s %s r%d %g %g %d %s", p.Date, p.ShiftName, p.CensusRevision, p.ShiftHours, p.ExpectedNurseHours, p.Recommended, p.Result))
	}
	return out
}

func find(t *testing.T, st wardload.Store, f wardload.ObservationFilter) []*wardload.Observation {
	t.Helper()
	obs, _, err := st.FindObservations(context.Background(), f)
	if err != nil {
		t.Fatal(err)
	}
	return obs
}

func shiftName(t *testing.T, st wardload.Store, id int64) string {
	t.Helper()
	p, err := st.FindShiftPatternByID(context.Background(), id)
	if err != nil {
		t.Fatal(err)
	}
	return p.Name
}

// isPlanted reports whether o, of tier tierCode, is one of planted.
func isPlanted(o *wardload.Observation, tierCode string, planted []demo.PlantedError) bool {
	for _, p := range planted {
		if p.Tier == tierCode && p.Date == o.Date && p.Recorded == o.CareMinutes && p.WindowHours == o.WindowHours {
			return true
		}
	}
	return false
}

func meanMedian(xs []float64) (mean, median float64) {
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	for _, x := range s {
		mean += x
	}
	mean /= float64(len(s))
	if n := len(s); n%2 == 1 {
		median = s[n/2]
	} else {
		median = (s[n/2-1] + s[n/2]) / 2
	}
	return mean, median
}

func mustLoc(t *testing.T) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation("Europe/London")
	if err != nil {
		t.Fatal(err)
	}
	return loc
}
