package stats_test

import (
	"fmt"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// Care minutes of one tier in one observation window (invented for the
// example). The 95 is far above the rest and is flagged as extreme.
// R 4.2.2 agrees: fivenum(x) = 18 22 26 29 95, boxplot.stats(x)$out = 95,
// sd(x) = 23.828088.
func ExampleSummarize() {
	minutes := []float64{22, 31, 18, 27, 95, 24, 29, 20, 26}
	s, err := stats.Summarize(minutes, stats.DefaultQuartiles)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("quartiles (%s): %g %g %g, IQR %g\n", s.Quartiles, s.Q1, s.Median, s.Q3, s.IQR)
	fmt.Printf("inner fences %g to %g, outer %g to %g\n", s.InnerFences.Lower, s.InnerFences.Upper, s.OuterFences.Lower, s.OuterFences.Upper)
	for _, o := range s.Outliers {
		fmt.Printf("outlier: value %g at index %d (%s)\n", o.Value, o.Index, o.Kind)
	}
	fmt.Printf("mean %.2f, SD %.2f (n − 1), SE %.2f\n", s.Mean, s.SD.Value, s.SE.Value)
	// Output:
	// quartiles (hinges): 22 26 29, IQR 7
	// inner fences 11.5 to 39.5, outer 1 to 50
	// outlier: value 95 at index 4 (extreme)
	// mean 32.44, SD 23.83 (n − 1), SE 7.94
}

// The same ten values give different quartiles under each convention,
// which is why every output names the one it used.
func ExampleQuartilesOf() {
	x := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}
	for _, c := range []string{wardload.QuartilesHinges, wardload.QuartilesHF6, wardload.QuartilesHF7, wardload.QuartilesHalves} {
		q, _ := stats.QuartilesOf(x, c)
		fmt.Printf("%-6s Q1 %-5g median %-4g Q3 %g\n", q.Convention, q.Q1, q.Median, q.Q3)
	}
	// Output:
	// hinges Q1 3     median 5.5  Q3 8
	// hf6    Q1 2.75  median 5.5  Q3 8.25
	// hf7    Q1 3.25  median 5.5  Q3 7.75
	// halves Q1 3     median 5.5  Q3 8
}

// A one-value tier still has a summary; its SD is undefined, not 0 or NaN.
func ExampleNumber() {
	s, _ := stats.Summarize([]float64{40}, stats.DefaultQuartiles)
	sd, _ := s.SD.MarshalJSON()
	fmt.Println(s.N, s.Median, s.SD, string(sd))
	// Output: 1 40 undefined null
}
