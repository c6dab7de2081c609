package wardload_test

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"wardload/internal/wardload"
)

func TestErrorHelpers(t *testing.T) {
	e := wardload.FieldErrorf(wardload.EINVALID, "care_minutes", "bad %d", 1)
	wrapped := fmt.Errorf("import: %w", e)
	if wardload.ErrorCode(wrapped) != wardload.EINVALID || wardload.ErrorField(wrapped) != "care_minutes" || wardload.ErrorMessage(wrapped) != "bad 1" {
		t.Errorf("wrapped error lost its code, field or message: %v", wrapped)
	}
	raw := errors.New("pq: duplicate key value violates unique constraint")
	if wardload.ErrorCode(raw) != wardload.EINTERNAL || wardload.ErrorMessage(raw) != "Internal error." {
		t.Errorf("a foreign error must read as internal, got %q %q", wardload.ErrorCode(raw), wardload.ErrorMessage(raw))
	}
	if wardload.ErrorCode(nil) != "" {
		t.Error("nil error has a code")
	}
}

func TestWardValidate(t *testing.T) {
	ok := wardload.Ward{Code: "w7-east", Name: "Ward 7 East", TimeZone: "Europe/London"}
	if err := ok.Validate(); err != nil {
		t.Fatal(err)
	}
	cases := map[string]func(w *wardload.Ward){
		"code":         func(w *wardload.Ward) { w.Code = "Ward 7" },
		"name":         func(w *wardload.Ward) { w.Name = "" },
		"time_zone":    func(w *wardload.Ward) { w.TimeZone = "Mars/Olympus" },
		"factor_names": func(w *wardload.Ward) { w.FactorNames = []string{"dep", "dep"} },
	}
	for field, mutate := range cases {
		w := ok
		mutate(&w)
		if err := w.Validate(); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != field {
			t.Errorf("%s: got %v", field, err)
		}
	}
	local := ok
	local.TimeZone = "Local"
	if err := local.Validate(); wardload.ErrorField(err) != "time_zone" {
		t.Errorf("Local time zone accepted: %v", err)
	}
}

func TestObservationValidate(t *testing.T) {
	d, _ := wardload.ParseDate("2026-11-02")
	ok := wardload.Observation{WardID: 1, TierID: 1, ShiftID: 1, Date: d, WindowHours: 12, CareMinutes: 0}
	if err := ok.Validate(); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		field  string
		mutate func(o *wardload.Observation)
	}{
		{"window_hours", func(o *wardload.Observation) { o.WindowHours = 0 }},
		{"window_hours", func(o *wardload.Observation) { o.WindowHours = 24.01 }},
		{"window_hours", func(o *wardload.Observation) { o.WindowHours = math.NaN() }},
		{"care_minutes", func(o *wardload.Observation) { o.CareMinutes = -1 }},
		{"care_minutes", func(o *wardload.Observation) { o.CareMinutes = math.Inf(1) }},
		{"tier", func(o *wardload.Observation) { o.TierID = 0 }},
		{"date", func(o *wardload.Observation) { o.Date = wardload.Date{} }},
		{"factors", func(o *wardload.Observation) { o.Factors = map[string]float64{"Patient Name": 1} }},
	}
	for _, c := range cases {
		o := ok
		c.mutate(&o)
		if err := o.Validate(); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != c.field {
			t.Errorf("%s: got %v", c.field, err)
		}
	}
	w := ok
	w.WindowHours = 24
	if err := w.Validate(); err != nil {
		t.Errorf("a 24-hour window is allowed: %v", err)
	}
}

func TestCensusValidate(t *testing.T) {
	d, _ := wardload.ParseDate("2026-11-02")
	c := wardload.Census{WardID: 1, ShiftID: 1, Date: d, Counts: []wardload.TierCount{{1, 3}, {2, 0}}}
	if err := c.Validate(); err != nil || c.Total() != 3 {
		t.Fatalf("valid census: %v, total %d", err, c.Total())
	}
	c.Counts[1].Patients = -1
	if err := c.Validate(); wardload.ErrorField(err) != "patients" {
		t.Errorf("negative count: %v", err)
	}
	c.Counts[1] = wardload.TierCount{1, 2}
	if err := c.Validate(); wardload.ErrorField(err) != "tier" {
		t.Errorf("duplicate tier: %v", err)
	}
}

func TestSettingsValidate(t *testing.T) {
	s := wardload.DefaultSettings(1)
	if err := s.Validate(); err != nil {
		t.Fatal(err)
	}
	cases := map[string]func(s *wardload.Settings){
		"direct_care_fraction": func(s *wardload.Settings) { s.DirectCareFraction = 0 },
		"cover_level":          func(s *wardload.Settings) { s.CoverLevel = 1 },
		"lookback_weeks":       func(s *wardload.Settings) { s.LookbackWeeks = 0 },
		"quartiles":            func(s *wardload.Settings) { s.Quartiles = "type9" },
		"floors":               func(s *wardload.Settings) { s.Floors = []wardload.RatioFloor{{ShiftID: 1, PatientsPerNurse: 0}} },
	}
	for field, mutate := range cases {
		c := *wardload.DefaultSettings(1)
		mutate(&c)
		if err := c.Validate(); wardload.ErrorField(err) != field {
			t.Errorf("%s: got %v", field, err)
		}
	}
}

func TestDate(t *testing.T) {
	d, err := wardload.ParseDate("2026-02-28")
	if err != nil {
		t.Fatal(err)
	}
	if got := d.AddDays(1).String(); got != "2026-03-01" {
		t.Errorf("AddDays: %s", got)
	}
	if _, err := wardload.ParseDate("2026-02-30"); wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("impossible date accepted")
	}
	if !d.Before(d.AddDays(1)) || d.After(d) {
		t.Error("ordering")
	}
}

// Typing errors such as 0.0075 for 0.75 must not reach the model, where they
// would turn into absurd headcounts.
func TestSettingsLowerBounds(t *testing.T) {
	s := wardload.DefaultSettings(1)
	s.DirectCareFraction = 0.0075
	if err := s.Validate(); wardload.ErrorField(err) != "direct_care_fraction" {
		t.Errorf("direct-care 0.0075: %v", err)
	}
	s.DirectCareFraction = wardload.MinDirectCareFraction
	s.Floors = []wardload.RatioFloor{{ShiftID: 1, PatientsPerNurse: 0.4}}
	if err := s.Validate(); wardload.ErrorField(err) != "floors" {
		t.Errorf("0.4 patients per nurse: %v", err)
	}
	s.Floors[0].PatientsPerNurse = wardload.MinPatientsPerNurse
	if err := s.Validate(); err != nil {
		t.Errorf("the bounds themselves are allowed: %v", err)
	}
}

// A right-to-left override would make a name display as something else.
func TestNamesRefuseBidiControls(t *testing.T) {
	for _, name := range []string{"Ward \u202Etsae 7", "Night \u2066x\u2069"} {
		w := wardload.Ward{Code: "w7", Name: name, TimeZone: "Europe/London"}
		if err := w.Validate(); wardload.ErrorField(err) != "name" {
			t.Errorf("ward name %q: %v", name, err)
		}
		p := wardload.ShiftPattern{WardID: 1, Name: name, StartMinute: 0, NominalHours: 8}
		if err := p.Validate(); wardload.ErrorField(err) != "name" {
			t.Errorf("shift name %q: %v", name, err)
		}
	}
	w := wardload.Ward{Code: "w7", Name: "Station 7 — Innere Medizin (العناية)", TimeZone: "Europe/Berlin"}
	if err := w.Validate(); err != nil {
		t.Errorf("ordinary non-Latin name refused: %v", err)
	}
}

// The token's name is stored as given, so a name with spaces around it is
// refused rather than stored with them.
func TestTokenNameIsNotTrimmed(t *testing.T) {
	tok := wardload.APIToken{Hash: "0123456789abcdef0123456789abcdef0123456789abcdef0123456789abcdef", WardIDs: []int64{1}}
	for _, name := range []string{" tok", "tok ", "\ttok", "tok\n"} {
		tok.Name = name
		if err := tok.Validate(); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "name" {
			t.Errorf("name %q: %v, want EINVALID name", name, err)
		}
	}
	tok.Name = "tok"
	if err := tok.Validate(); err != nil {
		t.Errorf("name %q: %v", tok.Name, err)
	}
}
