package stats

import (
	"math"
	"strings"
	"testing"
)

// TestWilsonIntervalR compares with R 4.2.2 (Debian r-base-core):
//
//	prop.test(k, n, correct = FALSE)$conf.int
//
// printed with sprintf("%.17g"). Tolerance 1e-12 absolute: both evaluate
// the same closed form (R through the score test's quadratic).
func TestWilsonIntervalR(t *testing.T) {
	for _, c := range []struct {
		k, n      int
		low, high float64
	}{
		{0, 1000, 0, 0.0038267584855551221},
		{1, 1000, 0.00017654637062607817, 0.0056425585979579338},
		{50, 1000, 0.038130262392748818, 0.065313820244250809},
		{500, 1000, 0.46906960036810419, 0.53093039963189581},
		{1000, 1000, 0.99617324151444486, 1},
		{3, 7, 0.1582198552514697, 0.74954163547234265},
	} {
		lo, hi := WilsonInterval(c.k, c.n)
		if math.Abs(lo-c.low) > 1e-12 || math.Abs(hi-c.high) > 1e-12 {
			t.Errorf("WilsonInterval(%d, %d) = %.17g, %.17g; R %.17g, %.17g", c.k, c.n, lo, hi, c.low, c.high)
		}
	}
}

// TestProbabilityTextNeverCertain: no share is said as a bare 0% or 100%.
func TestProbabilityTextNeverCertain(t *testing.T) {
	for _, c := range []struct {
		k, n int
		want string
	}{
		{0, 20000, "< 0.019%"},
		{20000, 20000, "> 99.98%"},
		{2000, 20000, "10% (9.6–10%)"},
		{1, 20000, "0.005% (0.00088–0.028%)"},
	} {
		got := ProbabilityText(c.k, c.n)
		if got != c.want {
			t.Errorf("ProbabilityText(%d, %d) = %q, want %q", c.k, c.n, got, c.want)
		}
	}
	for _, n := range []int{1000, 4000, 20000, 1_000_000} {
		for _, k := range []int{0, 1, n / 2, n - 1, n} {
			s := ProbabilityText(k, n)
			if s == "0%" || s == "100%" || strings.Contains(s, "± 0") || strings.HasPrefix(s, "0% ") {
				t.Errorf("ProbabilityText(%d, %d) = %q reads as certain", k, n, s)
			}
		}
	}
}
