package csvfile

import (
	"bytes"
	"errors"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// FuzzObservations is the fuzz target of ReadObservations.
// Properties: it never panics; a failure is an EINVALID *wardload.Error
// whose message names a line (or says the file is empty or has no rows);
// a success returns one observation per line number, each passing
// Validate and usable by the model (within stats.MaxShiftMinutes), of
// this ward and of one of its tiers and shifts, with only the ward's
// factors. Seeds are in testdata/fuzz/FuzzObservations and run with
// go test.
func FuzzObservations(f *testing.F) {
	ward := &wardload.Ward{ID: 7, Code: "w7", Name: "W7", TimeZone: "Europe/London", FactorNames: []string{"dependency_score"}}
	tiers := []*wardload.Tier{{ID: 11, WardID: 7, Code: "t1", Label: "T1"}, {ID: 12, WardID: 7, Code: "t2", Label: "T2"}}
	shifts := []*wardload.ShiftPattern{{ID: 21, WardID: 7, Name: "Day", StartMinute: 450, NominalHours: 12.5},
		{ID: 22, WardID: 7, Name: "Night", StartMinute: 1170, NominalHours: 12.5}}
	f.Fuzz(func(t *testing.T, data []byte) {
		obs, lines, err := ReadObservations(bytes.NewReader(data), ward, tiers, shifts)
		if err != nil {
			var e *wardload.Error
			if !errors.As(err, &e) || e.Code != wardload.EINVALID {
				t.Fatalf("error %v is not EINVALID", err)
			}
			if m := e.Message; !strings.HasPrefix(m, "line ") && !strings.HasPrefix(m, "The file") {
				t.Fatalf("message names no line: %q", m)
			}
			if obs != nil || lines != nil {
				t.Fatal("observations returned with an error")
			}
			return
		}
		if len(obs) == 0 || len(obs) != len(lines) {
			t.Fatalf("%d observations, %d lines", len(obs), len(lines))
		}
		for i, o := range obs {
			if err := o.Validate(); err != nil {
				t.Fatalf("row %d fails Validate: %v", i+1, err)
			}
			// Every stored observation must be usable by the model on a
			// shift of up to 25 real hours.
			if !(o.CareMinutes/o.WindowHours*maxRealShiftHours <= stats.MaxShiftMinutes) {
				t.Fatalf("row %d: %g minutes in %g hours passed", i+1, o.CareMinutes, o.WindowHours)
			}
			if o.WardID != ward.ID || (o.TierID != 11 && o.TierID != 12) || (o.ShiftID != 21 && o.ShiftID != 22) {
				t.Fatalf("row %d: ward %d tier %d shift %d", i+1, o.WardID, o.TierID, o.ShiftID)
			}
			for k := range o.Factors {
				if k != "dependency_score" {
					t.Fatalf("row %d: factor %q", i+1, k)
				}
			}
			if lines[i] < 2 || (i > 0 && lines[i] <= lines[i-1]) {
				t.Fatalf("line %d after %v", lines[i], lines[:i])
			}
		}
	})
}
