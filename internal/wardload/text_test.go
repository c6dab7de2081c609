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
	for _, s := range []string{"Day", "Früh", "夜勤", "Late (+1)", "3rd shift"} {
		p := wardload.ShiftPattern{WardID: 1, Name: s, StartMinute: 0, NominalHours: 8}
		if err := p.Validate(); err != nil {
			t.Errorf("shift name %q: %v", s, err)
		}
	}
}

// Issue 15: names and labels go into CSV exports, so they must begin with
// a letter or digit (any script); a formula trigger, a space, a separator
// or a full-width trigger first is EINVALID naming the field. The
// payloads are the OWASP CSV-injection variants.
func TestNamesBeginWithLetterOrDigit(t *testing.T) {
	bad := []string{"=SUM(1)", "+1", "-2+3", "@SUM(A1)", " =1+1", " Day", ";=1+1", ",Day", "\"Day", "'Day",
		"\uff1d1+1", "\uff0b1", "\uff0d1", "\uff20x", "\u3000Day", "(Late)", "·Day"}
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
	good := []string{"Day", "7 East", "Ärzte", "夜勤", "\uff13病棟", "Ward 4 (Medicine) = acute", "T1 Self-caring"}
	for _, s := range good {
		w := wardload.Ward{Code: "w1", Name: s, TimeZone: "UTC"}
		if err := w.Validate(); err != nil {
			t.Errorf("ward name %q: %v", s, err)
		}
		tr := wardload.Tier{WardID: 1, Code: "t1", Label: s}
		if err := tr.Validate(); err != nil {
			t.Errorf("tier label %q: %v", s, err)
		}
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
