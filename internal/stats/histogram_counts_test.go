package stats

import (
	"encoding/csv"
	"math"
	"os"
	"slices"
	"strconv"
	"testing"
)

// readFaithfulWaiting reads R's faithful$waiting (272 waiting times in
// minutes between Old Faithful eruptions; Azzalini & Bowman 1990, as
// shipped with R), written to testdata by R 4.2.2:
//
//	write.csv(data.frame(waiting = faithful$waiting), "faithful_waiting.csv", row.names = FALSE)
func readFaithfulWaiting(t *testing.T) []float64 {
	t.Helper()
	f, err := os.Open("testdata/faithful_waiting.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var x []float64
	for _, r := range rows[1:] {
		v, err := strconv.ParseFloat(r[0], 64)
		if err != nil {
			t.Fatal(err)
		}
		x = append(x, v)
	}
	if len(x) != 272 {
		t.Fatalf("read %d values, want 272", len(x))
	}
	return x
}

// TestCountsMatchR: bin counts equal R 4.2.2's hist(..., plot = FALSE)$counts
// (right-closed bins, include.lowest) on the same breaks; exact integers.
//
//	x <- faithful$waiting
//	hist(x, breaks = seq(43, by = 5, length.out = 12), plot = FALSE)$counts
//	  16 28 26 20 11 19 50 57 30 13 2      (integer data on the breaks)
//	w <- 2*IQR(x)*length(x)^(-1/3)         # 7.4082950279833, k = 8
//	hist(x, breaks = seq(min(x), by = w, length.out = k + 1), plot = FALSE)$counts
//	  26 40 31 16 75 63 20 1
//	lx <- log(x); w2 <- 2*IQR(lx)*length(lx)^(-1/3)   # 0.10688818844939582, k = 8
//	hist(lx, breaks = seq(min(lx), by = w2, length.out = k2 + 1), plot = FALSE)$counts
//	  13 31 33 20 23 81 65 6
func TestCountsMatchR(t *testing.T) {
	x := readFaithfulWaiting(t)
	logs := make([]float64, len(x))
	for i, v := range x {
		logs[i] = math.Log(v)
	}
	for _, tc := range []struct {
		name string
		x    []float64
		b    Binning
		want []int
	}{
		{"width 5 from 43", x, Binning{Bins: 11, Width: 5, Start: 43}, []int{16, 28, 26, 20, 11, 19, 50, 57, 30, 13, 2}},
		{"R's FD width", x, Binning{Bins: 8, Width: 7.4082950279833, Start: 43}, []int{26, 40, 31, 16, 75, 63, 20, 1}},
		{"log", logs, Binning{Bins: 8, Width: 0.10688818844939582, Start: math.Log(43)}, []int{13, 31, 33, 20, 23, 81, 65, 6}},
	} {
		got, below, above := Counts(tc.x, tc.b)
		if !slices.Equal(got, tc.want) || below != 0 || above != 0 {
			t.Errorf("%s: counts %v (below %d, above %d), want %v", tc.name, got, below, above, tc.want)
		}
	}
}

// TestCountsEdges: values off either end, NaN and a zero-width binning
// (hand-checked from the doc comment's rules).
func TestCountsEdges(t *testing.T) {
	got, below, above := Counts([]float64{-1, 0, 1, 2, 2.0000000001, 3, math.NaN()}, Binning{Bins: 2, Width: 1, Start: 0})
	if !slices.Equal(got, []int{2, 2}) || below != 1 || above != 1 {
		t.Errorf("counts %v below %d above %d, want [2 2] 1 1", got, below, above)
	}
	got, below, above = Counts([]float64{4, 4, 3, 5}, Binning{Bins: 1, Width: 0, Start: 4})
	if !slices.Equal(got, []int{2}) || below != 1 || above != 1 {
		t.Errorf("zero width: counts %v below %d above %d, want [2] 1 1", got, below, above)
	}
}
