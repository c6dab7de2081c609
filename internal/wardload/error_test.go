package wardload

import (
	"errors"
	"fmt"
	"testing"
)

func TestInvalidGathersFields(t *testing.T) {
	if Invalid(nil, nil) != nil {
		t.Error("Invalid of no errors is not nil")
	}
	one := FieldErrorf(EINVALID, "beds", "Beds.")
	if got := Invalid(nil, one); got != one {
		t.Errorf("Invalid of one error = %v, want it unchanged", got)
	}
	two := Invalid(one, FieldErrorf(EINVALID, "cover_level", "Cover."))
	three := fmt.Errorf("wrapped: %w", Invalid(two, FieldErrorf(EINVALID, "escalation", "Escalation.")))
	fs := ErrorFields(three)
	if len(fs) != 3 || fs[0].Field != "beds" || fs[1].Field != "cover_level" || fs[2].Field != "escalation" {
		t.Fatalf("fields = %v", fs)
	}
	if ErrorCode(three) != EINVALID || ErrorField(three) != "beds" || ErrorMessage(three) != "Beds." {
		t.Errorf("whole: code %q field %q message %q", ErrorCode(three), ErrorField(three), ErrorMessage(three))
	}
	internal := errors.New("disk on fire")
	if got := Invalid(one, internal); got != internal {
		t.Errorf("an internal error among field errors = %v, want it alone", got)
	}
	if ErrorFields(internal) != nil || ErrorFields(nil) != nil {
		t.Error("ErrorFields of a non-domain error is not nil")
	}
}

// TestSettingsValidateEveryField: every bad field is reported, not only
// the first.
func TestSettingsValidateEveryField(t *testing.T) {
	s := DefaultSettings(1)
	s.DirectCareFraction, s.CoverLevel, s.Beds = 0.01, 1, -1
	var got []string
	for _, e := range ErrorFields(s.Validate()) {
		got = append(got, e.Field)
	}
	if fmt.Sprint(got) != "[direct_care_fraction cover_level beds]" {
		t.Errorf("fields = %v", got)
	}
}
