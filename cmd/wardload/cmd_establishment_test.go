package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/establishment"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func TestEstablishmentSQLite(t *testing.T) {
	t.Parallel()
	dir, _ := mustDemoDataDir(t)
	checkEstablishment(t, &storeOptions{DataDir: dir})
}

func TestEstablishmentPostgres(t *testing.T) {
	t.Parallel()
	url, _ := mustDemoDatabase(t)
	checkEstablishment(t, &storeOptions{DB: url})
}

// checkEstablishment runs `wardload establishment` on the demo ward's last
// four weeks (the demo is seeded up to today) and checks the point figure
// against the stored projections read independently: per shift pattern
// the mean of recommended × shift hours, × 365.2425 days, ÷ (1950 × 0.78).
func checkEstablishment(t *testing.T, so *storeOptions) {
	t.Helper()
	args := []string{"establishment", "--ward", demo.WardCode, "--weeks", "4", "--fte-hours", "1950", "--headroom", "0.22"}
	code, out, errs := runStoreCLI(t, so, nil, args...)
	if code != exitOK {
		t.Fatalf("establishment = %d, %q, %q", code, out, errs)
	}
	t.Logf("wardload establishment:\n%s", out)
	for _, want := range []string{stats.Caution, "Ratio floors used:", "patients per nurse", "÷(1 − h)", "1521.0 available hours per FTE"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}

	code, js, errs := runStoreCLI(t, so, nil, append(args, "--format", "json")...)
	if code != exitOK {
		t.Fatalf("--format json = %d, %q", code, errs)
	}
	var got struct {
		From  string `json:"from"`
		To    string `json:"to"`
		Wards []struct {
			establishment.WardResult
			Floors []string `json:"ratio_floors"`
		} `json:"wards"`
		Total   establishment.WardResult `json:"total"`
		Caution string                   `json:"caution"`
	}
	if err := json.Unmarshal([]byte(js), &got); err != nil {
		t.Fatal(err)
	}
	w := got.Wards[0]
	want := expectedFTE(t, so, got.From, got.To)
	if math.Abs(w.FTE.Value-want) > 1e-9 || w.FTE.Value != got.Total.FTE.Value || w.Shifts != 56 {
		t.Errorf("FTE %.6f (total %.6f, %d shifts); from the stored projections %.6f over 56 shifts", w.FTE.Value, got.Total.FTE.Value, w.Shifts, want)
	}
	if !(w.FTE.Low < w.FTE.Value && w.FTE.Value < w.FTE.High) || len(w.Floors) != 2 || got.Caution != stats.Caution {
		t.Errorf("band %+v floors %v", w.FTE, w.Floors)
	}

	code, c, errs := runStoreCLI(t, so, nil, append(args, "--format", "csv")...)
	if code != exitOK {
		t.Fatalf("--format csv = %d, %q", code, errs)
	}
	r := csv.NewReader(strings.NewReader(c))
	r.FieldsPerRecord = -1 // the caution row is shorter
	records, err := r.ReadAll()
	if err != nil || len(records) != 3 || records[0][10] != "fte" || records[2][0] != "caution" || !strings.Contains(records[1][16], "patients per nurse") {
		t.Errorf("csv %q, %v", records, err)
	}

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--fte-hours", "0", "--headroom", "0.2"}, "--fte-hours: Hours per FTE must be above 0"},
		{[]string{"--fte-hours", "-1950", "--headroom", "0.2"}, "--fte-hours"},
		{[]string{"--fte-hours", "1950", "--headroom", "1"}, "--headroom: Headroom must be below 100%"},
		{[]string{"--fte-hours", "1950", "--headroom", "1.3"}, "below 100%"},
		{[]string{"--fte-hours", "1950", "--headroom", "-0.1"}, "must not be negative"},
		{[]string{"--fte-hours", "1950"}, "--headroom is required"},
		{[]string{"--headroom", "0.2"}, "--fte-hours is required"},
		{[]string{"--fte-hours", "1950", "--headroom", "0.2", "--basis", "mean"}, "--basis"},
	} {
		code, _, errs := runStoreCLI(t, so, nil, append([]string{"establishment", "--ward", demo.WardCode}, c.args...)...)
		if code != exitUsage || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v = %d, %q; want exit 2 naming %q", c.args, code, errs, c.want)
		}
	}
}

// expectedFTE recomputes the point FTE from the store.
func expectedFTE(t *testing.T, so *storeOptions, from, to string) float64 {
	t.Helper()
	ctx := context.Background()
	st, err := openStore(ctx, so, false)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	w, err := st.FindWardByCode(ctx, demo.WardCode)
	if err != nil {
		t.Fatal(err)
	}
	f, _ := wardload.ParseDate(from)
	l, _ := wardload.ParseDate(to)
	ps, _, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &w.ID, From: &f, To: &l, LatestOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	sum, n := map[int64]float64{}, map[int64]float64{}
	for _, p := range ps {
		sum[p.ShiftID] += float64(p.Recommended) * p.ShiftHours
		n[p.ShiftID]++
	}
	perDay := 0.0
	for id := range sum {
		perDay += sum[id] / n[id]
	}
	return perDay * 365.2425 / (1950 * (1 - 0.22))
}
