package export

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// TestWriteObservations: every selected observation is written once, in
// the store's order, across page boundaries; factors not recorded are
// empty; excluded observations appear only with the review state, whose
// free-text reason is neutralised for spreadsheets. Invented data.
func TestWriteObservations(t *testing.T) {
	clock := time.Date(2026, 3, 11, 9, 0, 0, 0, time.UTC)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{UserID: 1, Name: "m.review"})
	st, err := sqlite.Open(context.Background(), sqlite.Config{Path: filepath.Join(t.TempDir(), "w.db"), Now: func() time.Time { return clock }})
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
	must(st.Migrate(context.Background()))
	w := &wardload.Ward{Code: "w9", Name: "Ward 9 (invented)", TimeZone: "America/New_York", FactorNames: []string{"lines"}}
	must(st.CreateWard(ctx, w))
	u := &wardload.User{Name: "m.review", Role: wardload.RoleManager, PasswordHash: "x", WardIDs: []int64{w.ID}}
	must(st.CreateUser(ctx, u))
	var tiers []*wardload.Tier
	for i, code := range []string{"light", "heavy"} {
		tr := &wardload.Tier{WardID: w.ID, Code: code, Label: code, DisplayOrder: i}
		must(st.CreateTier(ctx, tr))
		tiers = append(tiers, tr)
	}
	sp := &wardload.ShiftPattern{WardID: w.ID, Name: "Night", StartMinute: 1200, NominalHours: 12}
	must(st.CreateShiftPattern(ctx, sp))
	var obs []*wardload.Observation
	for i := range 23 {
		o := &wardload.Observation{WardID: w.ID, TierID: tiers[i%2].ID, ShiftID: sp.ID,
			Date: wardload.Date{Year: 2026, Month: time.March, Day: 1}.AddDays(i / 3), WindowHours: 11.5, CareMinutes: 30.25 + float64(i)}
		if i%4 != 0 {
			o.Factors = map[string]float64{"lines": float64(i % 3)}
		}
		obs = append(obs, o)
	}
	_, err = st.CreateObservations(ctx, obs)
	must(err)
	_, err = st.ExcludeObservation(ctx, obs[5].ID, "=1+1 typed twice", u.ID)
	must(err)

	defer func(n int) { observationPage = n }(observationPage)
	observationPage = 5 // 22 included rows: four full pages and a part

	read := func(q ObservationQuery) [][]string {
		t.Helper()
		var b bytes.Buffer
		n, err := WriteObservations(ctx, &b, st, w, q)
		must(err)
		if !strings.Contains(b.String(), "\r\n") {
			t.Errorf("want CRLF line ends")
		}
		recs, err := csv.NewReader(&b).ReadAll()
		must(err)
		if n != len(recs)-1 {
			t.Errorf("returned %d rows, wrote %d", n, len(recs)-1)
		}
		return recs
	}

	recs := read(ObservationQuery{})
	if want := []string{"date", "shift", "tier", "window_hours", "care_minutes", "lines"}; !slices.Equal(recs[0], want) {
		t.Fatalf("header %q, want %q", recs[0], want)
	}
	var want [][]string
	for i, o := range obs {
		if i == 5 {
			continue
		}
		lines := ""
		if o.Factors != nil {
			lines = fmt.Sprint(o.Factors["lines"])
		}
		want = append(want, []string{o.Date.String(), "Night", tiers[i%2].Code, "11.5", fmt.Sprint(o.CareMinutes), lines})
	}
	if !slices.EqualFunc(recs[1:], want, slices.Equal) {
		t.Errorf("rows\n%q\nwant\n%q", recs[1:], want)
	}

	recs = read(ObservationQuery{Review: true})
	if len(recs) != 24 || len(recs[0]) != 10 {
		t.Fatalf("with review: %d rows of %d columns, want 24 of 10", len(recs), len(recs[0]))
	}
	ex := recs[6]
	// 09:00 UTC is 05:00 in New York on 11 March 2026 (EDT since 8 March).
	if got := ex[6:]; !slices.Equal(got, []string{"true", "'=1+1 typed twice", "m.review", "2026-03-11T05:00:00-04:00"}) {
		t.Errorf("excluded row review state %q", got)
	}
	if got := recs[7][6:]; !slices.Equal(got, []string{"false", "", "", ""}) {
		t.Errorf("included row review state %q", got)
	}

	from, to := wardload.Date{Year: 2026, Month: time.March, Day: 2}, wardload.Date{Year: 2026, Month: time.March, Day: 3}
	recs = read(ObservationQuery{From: &from, To: &to})
	if len(recs) != 6 { // days 2 and 3 hold observations 3–8, less the excluded 5
		t.Errorf("from %s to %s: %d rows, want 5", from, to, len(recs)-1)
	}
	for _, r := range recs[1:] {
		if r[0] != from.String() && r[0] != to.String() {
			t.Errorf("row dated %s outside %s–%s", r[0], from, to)
		}
	}
}
