package wardload_test

import (
	"testing"

	"wardload/internal/wardload"
)

// Names with NUL or invalid UTF-8 passed validation and then failed on
// PostgreSQL with SQLSTATE 22021, a 500 on the settings page; tabs, CRs
// and newlines made invisible or broken names. Each is now EINVALID naming
// the field; ordinary names, including non-ASCII ones, still pass.
func TestNamesRefuseControlCharactersAndBadUTF8(t *testing.T) {
	bad := []string{"a\x00b", "\xff\xfe", "Day\r", "\tDay", "Da\ny", "Night\x7f", "Night\u0085"}
	for _, s := range bad {
		w := wardload.Ward{Code: "w1", Name: s, TimeZone: "UTC"}
		if err := w.Validate(); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "name" {
			t.Errorf("ward name %q: %v", s, err)
		}
		tr := wardload.Tier{WardID: 1, Code: "t1", Label: s}
		if err := tr.Validate(); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "label" {
			t.Errorf("tier label %q: %v", s, err)
		}
		p := wardload.ShiftPattern{WardID: 1, Name: s, StartMinute: 0, NominalHours: 8}
		if err := p.Validate(); wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "name" {
			t.Errorf("shift name %q: %v", s, err)
		}
	}
	for _, s := range []string{"a\x00b", "\xff", "x\x1b[31m"} {
		tr := wardload.Tier{WardID: 1, Code: "t1", Label: "T1", Description: s}
		if err := tr.Validate(); wardload.ErrorField(err) != "description" {
			t.Errorf("tier description %q: %v", s, err)
		}
	}
	// A description may have line breaks and tabs.
	tr := wardload.Tier{WardID: 1, Code: "t1", Label: "Stufe 1 · Selbstversorger", Description: "Line one.\r\nLine\ttwo."}
	if err := tr.Validate(); err != nil {
		t.Error(err)
	}
	for _, s := range []string{"Day", "Früh", "夜勤", "=SUM(1)", "Late (+1)"} {
		p := wardload.ShiftPattern{WardID: 1, Name: s, StartMinute: 0, NominalHours: 8}
		if err := p.Validate(); err != nil {
			t.Errorf("shift name %q: %v", s, err)
		}
	}
}

func TestStorableText(t *testing.T) {
	for s, want := range map[string]bool{"": true, "a.b": true, "Früh": true, "a\x00": false, "\xc3": false, "tab\tok": true} {
		if got := wardload.StorableText(s); got != want {
			t.Errorf("StorableText(%q) = %v, want %v", s, got, want)
		}
	}
}
