package wardload

import (
	"fmt"
	"testing"
	"time"
)

// TestDateStringAndOrder checks the hand-written formatting against
// fmt's and the field order against the order of the texts, which is
// what Before and After compared until imports made that too slow.
func TestDateStringAndOrder(t *testing.T) {
	var ds []Date
	for _, y := range []int{0, 7, 99, 999, 2000, 2026, 9999} {
		for _, m := range []time.Month{1, 2, 9, 10, 12} {
			for _, d := range []int{1, 9, 10, 28, 31} {
				ds = append(ds, Date{y, m, d})
			}
		}
	}
	ds = append(ds, Date{}, Date{Year: 12345, Month: 1, Day: 1}, Date{Year: -5, Month: 3, Day: 4})
	for _, d := range ds {
		if got, want := d.String(), fmt.Sprintf("%04d-%02d-%02d", d.Year, d.Month, d.Day); got != want {
			t.Fatalf("%#v.String() = %q, want %q", d, got, want)
		}
	}
	for _, a := range ds[:len(ds)-2] { // the texts order only 4-digit years
		for _, b := range ds[:len(ds)-2] {
			if a.Before(b) != (a.String() < b.String()) || a.After(b) != (a.String() > b.String()) {
				t.Fatalf("%v vs %v: Before %v After %v", a, b, a.Before(b), a.After(b))
			}
		}
	}
}
