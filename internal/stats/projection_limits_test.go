package stats

import (
	"math"
	"testing"

	"wardload/internal/wardload"
)

// A direct-care fraction or patients-per-nurse ratio that is more than 0
// but tiny made the nurse counts +Inf; ceilNurses(+Inf) is int(+Inf),
// which Go leaves undefined, and the CLI printed "recommended 0" for 220
// care minutes (the web census stored 22 billion nurses on SQLite and
// failed with a 500 on PostgreSQL's int4). Each is now EINVALID naming
// the setting, and a merely small fraction still projects.
func TestProjectTinyFractionAndRatio(t *testing.T) {
	for _, tc := range []struct {
		name  string
		edit  func(*ProjectionInput)
		field string
	}{
		{"direct care 1e-320", func(in *ProjectionInput) { in.DirectCareFraction = 1e-320 }, "direct_care_fraction"},
		{"direct care smallest", func(in *ProjectionInput) { in.DirectCareFraction = math.SmallestNonzeroFloat64 }, "direct_care_fraction"},
		{"direct care 1e-10", func(in *ProjectionInput) { in.DirectCareFraction = 1e-10 }, "direct_care_fraction"},
		{"ratio 1e-320", func(in *ProjectionInput) { in.Floor = &FloorSpec{PatientsPerNurse: 1e-320} }, "patients_per_nurse"},
		{"ratio 1e-10", func(in *ProjectionInput) { in.Floor = &FloorSpec{PatientsPerNurse: 1e-10} }, "patients_per_nurse"},
		{"tier ratio 1e-320", func(in *ProjectionInput) {
			in.Floor = &FloorSpec{PatientsPerNurse: 4, TierPatientsPerNurse: map[string]float64{"a": 1e-320}}
		}, "patients_per_nurse"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			in := handInput()
			tc.edit(&in)
			p, err := ProjectV1(in)
			if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != tc.field {
				if p != nil {
					t.Fatalf("Project = recommended %d (cover unrounded %g), %v; want EINVALID field %s", p.Nurses.Recommended, p.Nurses.CoverSimulatedUnrounded, err, tc.field)
				}
				t.Fatalf("Project error %v; want EINVALID field %s", err, tc.field)
			}
		})
	}
	// 0.01 is odd but finite: 220 minutes / (8 h · 60 · 0.01) = 45.8 nurses
	// at the mean (hand computation as in TestProjectHand).
	in := handInput()
	in.DirectCareFraction = 0.01
	p, err := ProjectV1(in)
	if err != nil {
		t.Fatal(err)
	}
	if p.Nurses.Expected != 46 || p.Nurses.Recommended < p.Nurses.Expected {
		t.Errorf("direct care 0.01: expected %d, recommended %d; want 46 and at least that", p.Nurses.Expected, p.Nurses.Recommended)
	}
}
