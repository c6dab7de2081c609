package server

import (
	"net/url"
	"slices"
	"strconv"
	"testing"

	"wardload/internal/wardload"
)

var formTiers = []*wardload.Tier{{ID: 11, WardID: 1, Code: "t1"}, {ID: 12, WardID: 1, Code: "t2"}, {ID: 13, WardID: 1, Code: "t3"}}

func TestParseCensusForm(t *testing.T) {
	for _, tc := range []struct {
		name       string
		form       url.Values
		wantCounts []wardload.TierCount
		wantErrs   map[string]string
	}{
		{"all tiers", url.Values{"tier_t1": {"4"}, "tier_t2": {" 10 "}, "tier_t3": {"0"}},
			[]wardload.TierCount{{TierID: 11, Patients: 4}, {TierID: 12, Patients: 10}, {TierID: 13, Patients: 0}}, nil},
		{"fields not of a tier are ignored", url.Values{"tier_t1": {"1"}, "tier_t2": {"2"}, "tier_t3": {"3"}, "tier_t9": {"-5"}, "tier_id": {"x"}, "ward": {"7"}},
			[]wardload.TierCount{{TierID: 11, Patients: 1}, {TierID: 12, Patients: 2}, {TierID: 13, Patients: 3}}, nil},
		{"largest plausible", url.Values{"tier_t1": {strconv.Itoa(wardload.MaxCensusCount)}, "tier_t2": {"0"}, "tier_t3": {"007"}},
			[]wardload.TierCount{{TierID: 11, Patients: wardload.MaxCensusCount}, {TierID: 12, Patients: 0}, {TierID: 13, Patients: 7}}, nil},
		{"blank and missing", url.Values{"tier_t1": {" "}, "tier_t2": {"3"}}, nil,
			map[string]string{"tier_t1": "Enter the number of patients (0 if none).", "tier_t3": "Enter the number of patients (0 if none)."}},
		{"negative", url.Values{"tier_t1": {"-1"}, "tier_t2": {"0"}, "tier_t3": {"0"}}, nil,
			map[string]string{"tier_t1": "Patients are counted from 0; a count cannot be negative."}},
		{"not whole numbers", url.Values{"tier_t1": {"1.5"}, "tier_t2": {"+2"}, "tier_t3": {"1e2"}}, nil,
			map[string]string{"tier_t1": "Enter a whole number, such as 4.", "tier_t2": "Enter a whole number, such as 4.", "tier_t3": "Enter a whole number, such as 4."}},
		{"implausible and overflowing", url.Values{"tier_t1": {strconv.Itoa(wardload.MaxCensusCount + 1)}, "tier_t2": {"99999999999999999999999"}, "tier_t3": {"٣"}}, nil,
			map[string]string{"tier_t1": "That count is not plausible for one ward; please check it.",
				"tier_t2": "That count is not plausible for one ward; please check it.", "tier_t3": "Enter a whole number, such as 4."}},
		{"a field twice", url.Values{"tier_t1": {"1", "2"}, "tier_t2": {"0"}, "tier_t3": {"0"}}, nil,
			map[string]string{"tier_t1": "Enter one number."}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			counts, errs := parseCensusForm(tc.form, formTiers)
			if !slices.Equal(counts, tc.wantCounts) {
				t.Errorf("counts = %v, want %v", counts, tc.wantCounts)
			}
			if len(errs) != len(tc.wantErrs) {
				t.Errorf("errors = %v, want %v", errs, tc.wantErrs)
			}
			for k, v := range tc.wantErrs {
				if errs[k] != v {
					t.Errorf("errors[%s] = %q, want %q", k, errs[k], v)
				}
			}
		})
	}
}

// FuzzParseCensusForm: any form body parses without panicking; what is
// accepted has one count per tier, in tier order, each a whole number
// from 0 to wardload.MaxCensusCount, and passes wardload.Census.Validate; what is
// refused names only tier fields.
func FuzzParseCensusForm(f *testing.F) {
	for _, s := range []string{"tier_t1=4&tier_t2=10&tier_t3=0", "tier_t1=-1", "tier_t1=1&tier_t1=2",
		"tier_t1=%00&tier_t2=1e3", "tier_t1=10001&tier_t2=&tier_t3=+1", "x=1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, body string) {
		form, err := url.ParseQuery(body)
		if err != nil {
			return // the server refuses an unreadable form before parsing
		}
		counts, errs := parseCensusForm(form, formTiers)
		if len(errs) > 0 {
			if counts != nil {
				t.Fatalf("counts %v returned with errors %v", counts, errs)
			}
			for k := range errs {
				if !slices.ContainsFunc(formTiers, func(tr *wardload.Tier) bool { return censusField(tr) == k }) {
					t.Fatalf("error for field %q, which is not a tier field", k)
				}
			}
			return
		}
		if len(counts) != len(formTiers) {
			t.Fatalf("%d counts for %d tiers", len(counts), len(formTiers))
		}
		for i, c := range counts {
			if c.TierID != formTiers[i].ID || c.Patients < 0 || c.Patients > wardload.MaxCensusCount {
				t.Fatalf("accepted %+v", c)
			}
		}
		cen := &wardload.Census{WardID: 1, ShiftID: 1, Date: wardload.Date{Year: 2026, Month: 3, Day: 2}, Counts: counts}
		if err := cen.Validate(); err != nil {
			t.Fatalf("accepted counts fail Census.Validate: %v", err)
		}
	})
}
