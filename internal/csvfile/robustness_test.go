package csvfile

import (
	"math"
	"strings"
	"testing"
)

// 1.7e308 is a finite float64 and passed; two such cells overflowed the
// summaries to Inf and NaN (summarize --json then failed with "writing
// output failed", exit 1). Cells beyond MaxAbs are now refused by line and
// column; MaxAbs itself and ordinary values pass.
func TestMagnitudeLimit(t *testing.T) {
	for _, cell := range []string{"1.7e308", "-1.7e308", "1e16", "1000000000000001", "-2e15"} {
		tab, err := Read(strings.NewReader("care_minutes\n5\n" + cell + "\n"))
		if err != nil {
			t.Fatal(err)
		}
		_, err = tab.Floats("care_minutes")
		wantErr(t, err, `line 3, column "care_minutes": "`+cell+`" is too large to be a number wardload can use`)
	}
	tab, err := Read(strings.NewReader("care_minutes\n1e15\n-1e15\n5e-324\n0\n"))
	if err != nil {
		t.Fatal(err)
	}
	col, err := tab.Floats("care_minutes")
	if err != nil {
		t.Fatal(err)
	}
	if col.Values[0] != MaxAbs || col.Values[1] != -MaxAbs || col.Values[2] != math.SmallestNonzeroFloat64 {
		t.Errorf("values %v", col.Values)
	}
	// The bound keeps sums of squares finite at the row limit.
	if s := float64(MaxRecords) * MaxAbs * MaxAbs; math.IsInf(s, 0) || s > 1e38 {
		t.Errorf("MaxRecords × MaxAbs² = %g", s)
	}
}
