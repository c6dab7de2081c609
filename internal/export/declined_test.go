package export_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"strconv"
	"strings"
	"testing"
	"time"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// exportRecord reads the CSV and the JSON of rows and returns, for the row
// of the given date and shift, each CSV column's text and each JSON value.
func exportRecord(t *testing.T, f *fixture, from, to wardload.Date, date, shift string) (map[string]string, map[string]json.RawMessage) {
	t.Helper()
	tiers, rows, err := export.Rows(ctx, f.st, f.ward, from, to)
	must(t, err)
	var c, j bytes.Buffer
	must(t, export.WriteCSV(&c, tiers, rows))
	must(t, export.WriteJSON(&j, f.ward, from, to, tiers, rows))
	recs, err := csv.NewReader(&c).ReadAll()
	must(t, err)
	var doc struct{ Rows []map[string]json.RawMessage }
	must(t, json.Unmarshal(j.Bytes(), &doc))
	for i, rec := range recs[1:] {
		row := map[string]string{}
		for k, col := range recs[0] {
			row[col] = rec[k]
		}
		if row["date"] == date && row["shift"] == shift {
			return row, doc.Rows[i]
		}
	}
	t.Fatalf("no row %s %s in the export", date, shift)
	return nil, nil
}

// A tier with patients and only three observations: the projection
// declines. The export says so, carries the floor as the recommendation
// where one is configured (Night) and no recommendation where none is
// (Day), and has no care-time figure or probability at all.
func TestExportOfDeclinedProjection(t *testing.T) {
	f := seed(t)
	thin := &wardload.Tier{WardID: f.ward.ID, Code: "t3", Label: "Tier t3", DisplayOrder: 2}
	must(t, f.st.CreateTier(ctx, thin))
	shifts, err := f.st.FindShiftPatterns(ctx, f.ward.ID)
	must(t, err)
	var obs []*wardload.Observation
	for _, sp := range shifts {
		for i, m := range []float64{200, 240, 260} {
			obs = append(obs, &wardload.Observation{WardID: f.ward.ID, TierID: thin.ID, ShiftID: sp.ID,
				Date: day("2026-03-20").AddDays(i), WindowHours: 12.5, CareMinutes: m})
		}
	}
	_, err = f.st.CreateObservations(ctx, obs)
	must(t, err)
	svc := &projector.Service{Store: f.st, Now: func() time.Time { return time.Date(2026, 3, 30, 6, 0, 0, 0, time.UTC) }, Draws: 2000}
	for _, sp := range shifts {
		_, p, err := svc.Save(ctx, f.ward.ID, day("2026-03-30"), sp.ID, []wardload.TierCount{
			{TierID: f.tiers[0].ID, Patients: 6}, {TierID: f.tiers[1].ID, Patients: 6}, {TierID: thin.ID, Patients: 2}}, wardload.StaffOnDuty{}, wardload.PlannedMovement{})
		must(t, err)
		if p.DecidedBy != stats.DecidedByInsufficient {
			t.Fatalf("%s: decided by %q, want a declined projection", sp.Name, p.DecidedBy)
		}
	}
	for _, tc := range []struct {
		shift, floor, recommended string
	}{
		{"Night", "3", "3"}, // ceil(14/7) + the nurse in charge
		{"Day", "", ""},
	} {
		t.Run(tc.shift, func(t *testing.T) {
			c, j := exportRecord(t, f, day("2026-03-30"), day("2026-03-30"), "2026-03-30", tc.shift)
			if c["data_sufficient"] != "false" || string(j["data_sufficient"]) != "false" {
				t.Errorf("data_sufficient CSV %q, JSON %s", c["data_sufficient"], j["data_sufficient"])
			}
			if c["decided_by"] != stats.DecidedByInsufficient {
				t.Errorf("decided_by %q", c["decided_by"])
			}
			if !strings.Contains(c["insufficient"], "tier t3") || !strings.Contains(c["insufficient"], "need about 5 more") {
				t.Errorf("insufficient %q does not say tier t3 needs about 5 more", c["insufficient"])
			}
			if c["ratio_floor_nurses"] != tc.floor || c["recommended_nurses"] != tc.recommended {
				t.Errorf("floor %q recommended %q, want %q and %q", c["ratio_floor_nurses"], c["recommended_nurses"], tc.floor, tc.recommended)
			}
			wantRec := tc.recommended
			if wantRec == "" {
				wantRec = "null"
			}
			if string(j["recommended_nurses"]) != wantRec {
				t.Errorf("JSON recommended_nurses %s, want %s", j["recommended_nurses"], wantRec)
			}
			for _, col := range []string{"expected_nurse_hours", "band_level", "band_method", "band_low_nurse_hours", "band_high_nurse_hours",
				"nurses_at_cover", "shortfall_method", "shortfall_simulated_share", "shortfall_wilson95_low", "shortfall_wilson95_high", "shortfall_text"} {
				if c[col] != "" || string(j[col]) != "null" {
					t.Errorf("%s: CSV %q, JSON %s; a declined projection has no such figure", col, c[col], j[col])
				}
			}
			if c["caution"] != stats.Caution || c["ratio_floor_rule"] == "" {
				t.Errorf("caution %q, floor rule %q", c["caution"], c["ratio_floor_rule"])
			}
		})
	}
}

// A projection stored by method 1 (as existing databases hold them)
// exports with its normal band named as such and its simulated shortfall
// at the recommendation restated with a Wilson interval.
func TestExportOfMethod1Projection(t *testing.T) {
	f := seed(t)
	shifts, err := f.st.FindShiftPatterns(ctx, f.ward.ID)
	must(t, err)
	svc := &projector.Service{Store: f.st, Now: func() time.Time { return time.Date(2026, 3, 30, 6, 0, 0, 0, time.UTC) }, Draws: 2000}
	c, p, err := svc.Prepare(ctx, f.ward.ID, day("2026-03-30"), shifts[0].ID, []wardload.TierCount{
		{TierID: f.tiers[0].ID, Patients: 6}, {TierID: f.tiers[1].ID, Patients: 6}})
	must(t, err)
	v1 := MustMethod1(t, p)
	must(t, f.st.CreateCensusProjection(ctx, c, p))

	row, j := exportRecord(t, f, day("2026-03-30"), day("2026-03-30"), "2026-03-30", shifts[0].Name)
	if row["method_version"] != stats.MethodVersionV1 || row["band_method"] != export.BandNormal || row["shortfall_method"] != export.ShortfallBootstrap {
		t.Errorf("method %q, band %q, shortfall %q", row["method_version"], row["band_method"], row["shortfall_method"])
	}
	if row["data_sufficient"] != "true" || row["recommended_nurses"] != strconv.Itoa(v1.Nurses.Recommended) || row["band_low_nurse_hours"] != export.FormatHours(p.BandLowNurseHours) {
		t.Errorf("row %v, stored %+v", row, p)
	}
	var want *float64
	for _, sf := range v1.Shortfall {
		if sf.Nurses == v1.Nurses.Recommended {
			want = &sf.SimulatedProbability
		}
	}
	if want == nil || row["shortfall_simulated_share"] != export.FormatProbability(*want) {
		t.Errorf("shortfall share %q, stored %v", row["shortfall_simulated_share"], want)
	}
	lo, hi := stats.WilsonInterval(int(*want*2000+0.5), 2000)
	if row["shortfall_wilson95_low"] != export.FormatProbability(lo) || row["shortfall_wilson95_high"] != export.FormatProbability(hi) {
		t.Errorf("Wilson %q–%q, want %v–%v", row["shortfall_wilson95_low"], row["shortfall_wilson95_high"], lo, hi)
	}
	if strings.Contains(row["shortfall_text"], "±") || row["shortfall_text"] == "0%" || string(j["shortfall_text"]) == "null" {
		t.Errorf("shortfall text %q", row["shortfall_text"])
	}
}

// MustMethod1 turns a prepared projection into the one method 1 would
// have stored: its result is stats.ProjectV1 of the same model input, and
// the columns are read from that result as the method 1 projector did.
func MustMethod1(tb testing.TB, p *wardload.Projection) *stats.ProjectionV1 {
	tb.Helper()
	var in projector.Input
	must(tb, json.Unmarshal([]byte(p.Input), &in))
	v1, err := stats.ProjectV1(in.Model)
	must(tb, err)
	b, err := json.Marshal(v1)
	must(tb, err)
	p.Result, p.MethodVersion = string(b), stats.MethodVersionV1
	nh := func(m float64) float64 { return m / 60 / v1.DirectCareFraction }
	p.ExpectedNurseHours, p.CoverNurseHours = v1.NurseHours.Expected, v1.NurseHours.CoverSimulated
	p.BandLowNurseHours, p.BandHighNurseHours = nh(v1.Bands[0].Low), nh(v1.Bands[0].High)
	p.NursesCover, p.Floor, p.Recommended, p.DecidedBy = v1.Nurses.CoverSimulated, v1.Nurses.Floor, v1.Nurses.Recommended, v1.Nurses.DecidedBy
	return v1
}

// A method 1 share restated never reads as a bare 0% or 100% or with
// "± 0", at the edges least of all, and its Wilson interval always has
// width (Wilson 1927; stats.WilsonInterval).
func TestShortfallV1Text(t *testing.T) {
	for _, n := range []int{1000, 2000, 20000} {
		for _, k := range []int{0, 1, n / 2, n - 1, n} {
			sf := export.ShortfallV1(5, float64(k)/float64(n), n)
			text := strings.TrimSpace(sf.Text)
			if text == "0%" || text == "100%" || strings.HasPrefix(text, "0% ") || strings.Contains(text, "±") {
				t.Errorf("%d of %d: text %q", k, n, sf.Text)
			}
			if !(sf.WilsonHigh > sf.WilsonLow) || sf.WilsonLow > sf.Probability || sf.Probability > sf.WilsonHigh {
				t.Errorf("%d of %d: share %g outside or on a collapsed interval %g–%g", k, n, sf.Probability, sf.WilsonLow, sf.WilsonHigh)
			}
			if got := int(sf.Probability*float64(n) + 0.5); got != k {
				t.Errorf("%d of %d: recovered %d", k, n, got)
			}
		}
	}
}
