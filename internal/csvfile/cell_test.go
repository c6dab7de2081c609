package csvfile

import (
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// TestFloatReadsACellAsFloatsReadsItsColumn: for every kind of cell,
// good or bad, Float gives Floats's value or Floats's message, line
// number included.
func TestFloatReadsACellAsFloatsReadsItsColumn(t *testing.T) {
	cells := []string{"12.5", " 7 ", "-0.5", "1e1", "", "12x", "NaN", "Inf", "0x10", "1_000", "1e400", "1e300",
		strings.Repeat("9", 65), "٣"}
	for _, cell := range cells {
		in := "other,factor\n\nx,\"" + cell + "\"\n"
		tab, err := Read(strings.NewReader(in))
		if err != nil {
			t.Fatalf("%q: %v", cell, err)
		}
		got, gotErr := tab.Float(0, "factor")
		col, wantErr := tab.Floats("factor")
		if wardload.ErrorMessage(gotErr) != wardload.ErrorMessage(wantErr) || wardload.ErrorField(gotErr) != wardload.ErrorField(wantErr) {
			t.Errorf("%q: Float error %v, Floats error %v", cell, gotErr, wantErr)
		}
		if wantErr == nil && got != col.Values[0] {
			t.Errorf("%q: Float %v, Floats %v", cell, got, col.Values[0])
		}
		if (gotErr == nil) != (wantErr == nil) {
			t.Errorf("%q: Float err %v, Floats err %v", cell, gotErr, wantErr)
		}
		if gotErr != nil && !strings.HasPrefix(wardload.ErrorMessage(gotErr), `line 3, column "factor": `) {
			t.Errorf("%q: message %q does not name line 3 and the column", cell, wardload.ErrorMessage(gotErr))
		}
	}
	if _, err := (&Table{Header: []string{"a"}, Records: [][]string{{"1"}}, Lines: []int{2}}).Float(0, "b"); wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("missing column: %v", err)
	}
}
