package stats

import (
	"math"
	"testing"
)

// Hand computations from the rule definitions in BinsFor's doc comment.
// Sturges for n = 16 is ⌈log₂16 + 1⌉ = 5, as R 4.2.2 nclass.Sturges(1:16).
func TestBinsFor(t *testing.T) {
	for _, tc := range []struct {
		name          string
		n             int
		iqr, min, max float64
		want          Binning
	}{
		{"FD", 8, 2, 0, 10, Binning{BinsFreedmanDiaconis, 5, 2, 0}}, // width 2·2·8^(−1/3) = 2
		{"FD rounds up", 8, 2, 0, 10.5, Binning{BinsFreedmanDiaconis, 6, 2, 0}},
		{"Sturges when IQR is 0", 16, 0, 1, 11, Binning{BinsSturges, 5, 2, 1}},
		{"constant", 3, 0, 4, 4, Binning{BinsSturges, 1, 0, 4}},
		{"capped", 8, 1e-9, 0, 1e12, Binning{BinsFreedmanDiaconis, MaxBins, 1e12 / MaxBins, 0}},
	} {
		got := BinsFor(tc.n, tc.iqr, tc.min, tc.max)
		if got.Rule != tc.want.Rule || got.Bins != tc.want.Bins || math.Abs(got.Width-tc.want.Width) > 1e-12 || got.Start != tc.want.Start {
			t.Errorf("%s: %+v, want %+v", tc.name, got, tc.want)
		}
	}
}

func TestBinsForPanics(t *testing.T) {
	for _, f := range []func(){
		func() { BinsFor(0, 1, 0, 1) },
		func() { BinsFor(3, -1, 0, 1) },
		func() { BinsFor(3, 1, 2, 1) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Error("no panic")
				}
			}()
			f()
		}()
	}
}
