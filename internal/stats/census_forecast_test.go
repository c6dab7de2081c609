package stats

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/wardload"
)

// poissonHistory invents days of census from start on the given shifts:
// tier t1 ~ Poisson(mu1·weekday factor), t2 ~ Poisson(mu2); keep(day,
// shift) false leaves a dated shift out (missing).
func poissonHistory(start string, days int, shifts []string, mu1, mu2 float64, seed uint64, keep func(d int, s string) bool) []CensusCount {
	r := rand.New(rand.NewPCG(seed, 7))
	st, _ := time.Parse(time.DateOnly, start)
	var out []CensusCount
	for d := range days {
		day := st.AddDate(0, 0, d)
		f := 1.0
		if day.Weekday() == time.Monday {
			f = 1.5
		}
		for _, s := range shifts {
			if keep != nil && !keep(d, s) {
				continue
			}
			date := day.Format(time.DateOnly)
			out = append(out,
				CensusCount{Date: date, Shift: s, Tier: "t1", Patients: int(distuv.Poisson{Lambda: mu1 * f, Src: r}.Rand())},
				CensusCount{Date: date, Shift: s, Tier: "t2", Patients: int(distuv.Poisson{Lambda: mu2, Src: r}.Rand())})
		}
	}
	return out
}

func TestForecastCensusShape(t *testing.T) {
	hist := poissonHistory("2026-01-05", 8*7, []string{"Day", "Night"}, 8, 3, 1, nil)
	in := CensusForecastInput{History: hist, From: "2026-03-02", Beds: 40, Seed: 1, Draws: 1000}
	fc, err := ForecastCensus(in)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := len(fc.Shifts), 6*7*2; got != want {
		t.Fatalf("%d dated shifts, want %d (6 weeks × 7 days × 2 shifts)", got, want)
	}
	first, lastShift := fc.Shifts[0], fc.Shifts[len(fc.Shifts)-1]
	if first.Date != "2026-03-02" || first.Shift != "Day" || first.Horizon != 1 || first.Weekday != "Monday" {
		t.Errorf("first shift %+v", first)
	}
	if lastShift.Date != "2026-04-12" || fc.To != "2026-04-12" || lastShift.Shift != "Night" {
		t.Errorf("last shift %s %s, to %s", lastShift.Date, lastShift.Shift, fc.To)
	}
	for _, s := range fc.Shifts {
		for _, q := range append(s.Tiers, s.Total) {
			if len(q.Bands) != 2 || q.Bands[1].Low > q.Bands[0].Low || q.Bands[0].Low > q.Median ||
				q.Median > q.Bands[0].High || q.Bands[0].High > q.Bands[1].High {
				t.Fatalf("%s %s tier %s: bands not nested around the median: %+v", s.Date, s.Shift, q.Tier, q)
			}
		}
	}
	// Mondays have 1.5 times the t1 census of other days in the history:
	// the forecast's Monday mean must show it (ratio within 0.25 of 1.5 —
	// the fitted weekday effect from 8 Mondays × 2 shifts of Poisson(12)
	// has SE ≈ 0.07 on the log scale).
	var mon, other, nm, no float64
	for _, s := range fc.Shifts {
		if s.Weekday == "Monday" {
			mon += s.Tiers[0].Mean
			nm++
		} else {
			other += s.Tiers[0].Mean
			no++
		}
	}
	if r := (mon / nm) / (other / no); math.Abs(r-1.5) > 0.25 {
		t.Errorf("Monday / other day t1 mean = %.2f, want about 1.5", r)
	}
	b1, _ := json.Marshal(fc)
	fc2, _ := ForecastCensus(in)
	b2, _ := json.Marshal(fc2)
	if string(b1) != string(b2) {
		t.Error("the same seed gave different forecasts")
	}
	in.Seed = 2
	fc3, _ := ForecastCensus(in)
	b3, _ := json.Marshal(fc3)
	if string(b1) == string(b3) {
		t.Error("another seed gave the same forecast")
	}
}

// Days missing from the history are missing, not zero: leaving out 40% of
// the dated shifts must not pull the forecast down, while writing them as
// zero patients would (to about 0.6 of the mean).
func TestForecastCensusMissingDays(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	drop := map[[2]int]bool{}
	for d := range 70 {
		for s := range 2 {
			drop[[2]int{d, s}] = r.Float64() < 0.4
		}
	}
	idx := map[string]int{"Day": 0, "Night": 1}
	hist := poissonHistory("2026-01-05", 70, []string{"Day", "Night"}, 10, 10, 5, func(d int, s string) bool { return !drop[[2]int{d, idx[s]}] })
	fc, err := ForecastCensus(CensusForecastInput{History: hist, From: "2026-03-16", Weeks: 1, Beds: 60, Seed: 1, Draws: 1000})
	if err != nil {
		t.Fatal(err)
	}
	mean := 0.0
	for _, s := range fc.Shifts {
		mean += s.Tiers[1].Mean / float64(len(fc.Shifts))
	}
	// t2 ~ Poisson(10) throughout: with ~84 dated shifts its fitted mean
	// has SE ≈ 0.35 plus the trend's extrapolation; 8.5 is far below
	// anything the missing-not-zero model gives and far above the ≈ 6 of
	// zero filling.
	if mean < 8.5 || mean > 11.5 {
		t.Errorf("t2 forecast mean %.2f, want about 10", mean)
	}
	if !strings.Contains(strings.Join(fc.Notes, " "), "not counted as zero patients") {
		t.Errorf("notes do not say missing shifts were left out: %q", fc.Notes)
	}
}

func TestForecastCensusBedsCap(t *testing.T) {
	hist := poissonHistory("2026-01-05", 35, []string{"Day"}, 7, 5, 9, nil)
	beds := 0 // the fullest shift of the history: the forecast must reach it
	tot := map[string]int{}
	for _, c := range hist {
		tot[c.Date] += c.Patients
		beds = max(beds, tot[c.Date])
	}
	fc, err := ForecastCensus(CensusForecastInput{History: hist, From: "2026-02-09", Weeks: 2, Beds: beds, Seed: 1, Draws: 2000})
	if err != nil {
		t.Fatal(err)
	}
	bound := 0.0
	for _, s := range fc.Shifts {
		for _, q := range append(s.Tiers, s.Total) {
			if q.Bands[1].High > beds {
				t.Fatalf("%s: tier %s band above the %d beds: %+v", s.Date, q.Tier, beds, q)
			}
		}
		bound += s.BedsBound
	}
	if bound == 0 {
		t.Errorf("the cap at %d beds never bound", beds)
	}
}

func TestForecastCensusRefuses(t *testing.T) {
	short := poissonHistory("2026-01-05", 20, []string{"Day"}, 5, 5, 1, nil)
	long := poissonHistory("2026-01-05", 35, []string{"Day"}, 5, 5, 1, nil)
	for _, tc := range []struct {
		name, field, text string
		in                CensusForecastInput
	}{
		{"20 days", "history", "2 more weeks", CensusForecastInput{History: short, From: "2026-02-01", Beds: 30}},
		{"27 days", "history", "1 more week", CensusForecastInput{History: poissonHistory("2026-01-05", 27, []string{"Day"}, 5, 5, 1, nil), From: "2026-02-01", Beds: 30}},
		{"14 weeks", "weeks", "1 to 13", CensusForecastInput{History: long, From: "2026-02-09", Weeks: 14, Beds: 30}},
		{"from inside history", "from", "after the newest census date, 2026-02-08", CensusForecastInput{History: long, From: "2026-02-08", Beds: 30}},
		{"from too far", "from", "within 13 weeks", CensusForecastInput{History: long, From: "2026-06-01", Beds: 30}},
		{"beds below history", "beds", "more than the 3 beds", CensusForecastInput{History: long, From: "2026-02-09", Beds: 3}},
		{"no beds", "beds", "Beds must", CensusForecastInput{History: long, From: "2026-02-09"}},
		{"duplicate", "history", "Row 3: 2026-01-05, shift Day, tier t1 is given twice", CensusForecastInput{History: append(long[:2:2], long[0]), From: "2026-02-09", Beds: 30}},
		{"bad date", "history", "Row 1", CensusForecastInput{History: []CensusCount{{Date: "2026-13-01", Shift: "D", Tier: "t", Patients: 1}}, From: "2026-02-09", Beds: 30}},
		{"levels", "levels", "0.01", CensusForecastInput{History: long, From: "2026-02-09", Beds: 30, Levels: []float64{1}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ForecastCensus(tc.in)
			if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != tc.field ||
				!strings.Contains(wardload.ErrorMessage(err), tc.text) {
				t.Errorf("err = %v (field %q), want EINVALID on %s saying %q", err, wardload.ErrorField(err), tc.field, tc.text)
			}
		})
	}
}

// A shift recorded only in the first weeks is retired: not forecast, and
// said so.
func TestForecastCensusRetiredShift(t *testing.T) {
	hist := poissonHistory("2026-01-05", 63, []string{"Day", "Twilight"}, 6, 2, 4, func(d int, s string) bool { return s == "Day" || d < 21 })
	fc, err := ForecastCensus(CensusForecastInput{History: hist, From: "2026-03-09", Weeks: 1, Beds: 30, Seed: 1, Draws: 500})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range fc.Shifts {
		if s.Shift != "Day" {
			t.Fatalf("retired shift %s forecast on %s", s.Shift, s.Date)
		}
	}
	if len(fc.Shifts) != 7 || !strings.Contains(strings.Join(fc.Notes, " "), "Shift Twilight has no census in the last 28 days") {
		t.Errorf("%d shifts, notes %q", len(fc.Shifts), fc.Notes)
	}
}

// Type 1 quantiles. Values from R 4.2.2:
// quantile(c(3,1,4,1,5,9,2,6,5,3), c(0.05,0.1,0.5,0.9,0.95), type=1) → 1 1 3 6 9.
func TestCountQuantileType1(t *testing.T) {
	sorted := []int32{1, 1, 2, 3, 3, 4, 5, 5, 6, 9}
	for i, p := range []float64{0.05, 0.1, 0.5, 0.9, 0.95} {
		if got, want := countQuantile(sorted, p), []int{1, 1, 3, 6, 9}[i]; got != want {
			t.Errorf("q(%g) = %d, want %d", p, got, want)
		}
	}
}

// pitBandShare by hand: PIT uniform on [0.05, 0.15] is half inside
// [0.1, 0.9]; a point mass at 0.5 is inside; at 0.95 outside.
func TestPITBandShare(t *testing.T) {
	for _, tc := range []struct{ a, b, want float64 }{{0.05, 0.15, 0.5}, {0.5, 0.5, 1}, {0.95, 0.95, 0}, {0.2, 0.6, 1}, {0.85, 1, 1.0 / 3}} {
		if got := pitBandShare(tc.a, tc.b, 0.1, 0.9); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("pitBandShare(%g, %g) = %g, want %g", tc.a, tc.b, got, tc.want)
		}
	}
}

// A tier never present is forecast as none; one never present on nights
// has its night cells forecast as none and its days fitted; NB2 reports θ.
func TestForecastCensusZerosAndNB2(t *testing.T) {
	hist := poissonHistory("2026-01-05", 42, []string{"Day", "Night"}, 6, 4, 8, nil)
	for i := range hist {
		switch {
		case hist[i].Tier == "t2" && hist[i].Shift == "Night":
			hist[i].Patients = 0
		}
	}
	hist = append(hist, CensusCount{Date: "2026-01-05", Shift: "Day", Tier: "t9", Patients: 0})
	for _, fam := range []CountFamily{FamilyQuasiPoisson, FamilyNegBin2} {
		fc, err := ForecastCensus(CensusForecastInput{History: hist, From: "2026-02-16", Weeks: 1, Beds: 40, Seed: 1, Draws: 500, Family: fam})
		if err != nil {
			t.Fatal(fam, err)
		}
		if m := fc.Models[2]; m.Tier != "t9" || !m.NeverPresent {
			t.Errorf("%v: tier t9 model %+v", fam, m)
		}
		if m := fc.Models[1]; m.NoneCells != 7 || (fam == FamilyNegBin2) != (m.Theta > 0) {
			t.Errorf("%v: tier t2 model %+v, want 7 night cells forecast as none", fam, m)
		}
		for _, s := range fc.Shifts {
			t2, t9 := s.Tiers[1], s.Tiers[2]
			if t9.Bands[1].High != 0 || (s.Shift == "Night") != (t2.Bands[1].High == 0) {
				t.Errorf("%v %s %s: t2 %+v, t9 %+v", fam, s.Date, s.Shift, t2, t9)
			}
		}
	}
}

// Underdispersed counts (a ward near full: 20 − Binomial(20, 0.1)) give
// φ̂ < 1 and bands narrower than Poisson's: the 90% band of a Poisson(18)
// is 11–25 wide (R 4.2.2: qpois(c(0.05, 0.95), 18) → 11 25); the truth's
// is 16–20.
func TestForecastCensusUnderdispersed(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	var hist []CensusCount
	st, _ := time.Parse(time.DateOnly, "2026-01-05")
	for d := range 56 {
		n := 20 - int(distuv.Binomial{N: 20, P: 0.1, Src: r}.Rand())
		hist = append(hist, CensusCount{Date: st.AddDate(0, 0, d).Format(time.DateOnly), Shift: "Day", Tier: "t1", Patients: n})
	}
	fc, err := ForecastCensus(CensusForecastInput{History: hist, From: "2026-03-02", Weeks: 1, Beds: 40, Seed: 1, Draws: 2000})
	if err != nil {
		t.Fatal(err)
	}
	if phi := fc.Models[0].Dispersion; !(phi < 0.5) {
		t.Errorf("dispersion %.2f, want well under 1 (truth 0.1)", phi)
	}
	for _, s := range fc.Shifts {
		if b := s.Tiers[0].Bands[1]; b.High-b.Low >= 14 {
			t.Errorf("%s: 90%% band %d–%d as wide as Poisson's", s.Date, b.Low, b.High)
		}
	}
}

// A shift recorded on Saturdays only, the only Saturday shift, is the
// Saturday effect itself: the design is singular and the refusal says so.
func TestForecastCensusConfounded(t *testing.T) {
	hist := poissonHistory("2026-01-05", 35, []string{"Day"}, 6, 4, 8, func(d int, s string) bool { return (d+1)%7 != 6 })
	hist = append(hist, poissonHistory("2026-01-05", 35, []string{"Sat"}, 6, 4, 9, func(d int, s string) bool { return (d+1)%7 == 6 })...)
	_, err := ForecastCensus(CensusForecastInput{History: hist, From: "2026-02-09", Beds: 40})
	if wardload.ErrorField(err) != "history" || !strings.Contains(wardload.ErrorMessage(err), "recorded on only one weekday") {
		t.Errorf("err = %v", err)
	}
}
