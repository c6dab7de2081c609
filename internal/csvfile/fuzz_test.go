package csvfile

import (
	"bytes"
	"errors"
	"math"
	"testing"

	"wardload/internal/wardload"
)

// FuzzRead checks that no input makes Read or Floats panic, that every
// failure is an EINVALID *wardload.Error, and that what is read is
// consistent: rectangular rows, increasing line numbers after the header,
// finite numbers no larger than MaxAbs. Seeds live in
// testdata/fuzz/FuzzRead and run with go test.
func FuzzRead(f *testing.F) {
	f.Fuzz(func(t *testing.T, data []byte) {
		tab, err := Read(bytes.NewReader(data))
		if err != nil {
			mustBeInvalid(t, err)
			return
		}
		if len(tab.Records) == 0 || len(tab.Records) != len(tab.Lines) {
			t.Fatalf("%d records, %d lines", len(tab.Records), len(tab.Lines))
		}
		prev := 1
		for i, rec := range tab.Records {
			if len(rec) != len(tab.Header) {
				t.Fatalf("record %d has %d fields, header %d", i, len(rec), len(tab.Header))
			}
			if tab.Lines[i] <= prev {
				t.Fatalf("line %d after line %d", tab.Lines[i], prev)
			}
			prev = tab.Lines[i]
		}
		for _, name := range tab.Header {
			col, err := tab.Floats(name)
			if err != nil {
				mustBeInvalid(t, err)
				continue
			}
			for i, v := range col.Values {
				if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > MaxAbs {
					t.Fatalf("column %q row %d: %v", name, col.Rows[i], v)
				}
			}
			if _, err := tab.Groups(name); err != nil {
				mustBeInvalid(t, err)
			}
		}
	})
}

func mustBeInvalid(t *testing.T, err error) {
	t.Helper()
	var we *wardload.Error
	if !errors.As(err, &we) || we.Code != wardload.EINVALID || we.Message == "" {
		t.Fatalf("error %v is not an EINVALID *wardload.Error", err)
	}
}
