package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"wardload/internal/pool"
	"wardload/internal/stats"
)

func (r *poolReport) write(w io.Writer) {
	fmt.Fprintf(w, "Float pool for the shifts running at %s, cover level %s\n\n", r.At, pct(r.Cover))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "ward\tshift\tstaff\tratio floor\trecommended\town buffer\tchance short with own buffer")
	for _, row := range r.Wards {
		floor := "none"
		if row.Floor != nil {
			floor = strconv.Itoa(*row.Floor)
		}
		fmt.Fprintf(tw, "%s\t%s %s\t%d (%s)\t%s\t%d\t%d\t%s\n", row.Ward, row.Date, row.Shift, row.Staff, row.StaffSource,
			floor, row.Recommended, row.Buffer, chance(row.ShortWithBuffer, r.TableDraws))
	}
	tw.Flush()
	fmt.Fprintln(w, "\nRatio floors used:")
	for _, row := range r.Wards {
		fmt.Fprintf(w, "  %s: %s\n", row.Ward, row.FloorRule)
	}
	for _, l := range r.Left {
		fmt.Fprintf(w, "Left out: %s\n", l)
	}
	x := r.Exact
	fmt.Fprintf(w, "\nEach ward staffed alone to the cover level: %d extra nurses in all; the chance that some ward is short then: %s (independent wards).\n",
		x.SumBuffers, chance(x.AnyShortBuffered, r.TableDraws))
	fewer := ""
	if x.Floats > 0 {
		fewer = fmt.Sprintf(" (with %d: %s)", x.Floats-1, chance(x.ShortFewer, r.TableDraws))
	}
	fmt.Fprintf(w, "Float pool, independent wards (exact convolution): %d nurses; the chance that some ward is still short after sending them where needed: %s%s.\n",
		x.Floats, chance(x.Short, r.TableDraws), fewer)
	fmt.Fprintf(w, "Pooling gain: %d nurses fewer than the sum of the wards' own buffers.\n", x.Gain)
	if len(r.Sensitivity) > 0 {
		fmt.Fprintf(w, "\nIf the wards' needs move together (one-factor Gaussian copula, common correlation ρ; quadrature, and a simulation of %d draws as a check):\n", r.Simulated[0].Draws)
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "ρ\tfloat pool\tchance some ward short\twith own buffers only\tsimulated: pool, chance")
		for i, q := range r.Sensitivity {
			s := r.Simulated[i]
			fmt.Fprintf(tw, "%g\t%d\t%s\t%s\t%d, %s\n", q.Rho, q.Floats, chance(q.Short, r.TableDraws),
				chance(q.AnyShortBuffered, r.TableDraws), s.Floats, stats.ProbabilityText(s.ShortDraws, s.Draws))
		}
		tw.Flush()
	}
	if x.Unplaced > 0 {
		fmt.Fprintf(w, "\nA chance of %s lies beyond the wards' shortfall tables and is counted as short whatever the pool.\n", chance(x.Unplaced, r.TableDraws))
	}
	_, hi := stats.WilsonInterval(0, r.TableDraws)
	fmt.Fprintf(w, "\nChances rest on shortfall tables simulated with at least %d draws each: a chance below %s cannot be told from 0.\n",
		r.TableDraws, pct(hi))
	fmt.Fprintf(w, "Method: need = the projection's headcount law, at least the ratio floor; floats go where needed, so the hospital is short when Σ max(0, need − staff) > F (Eppen 1979, risk pooling; newsvendor critical fractile).\n")
	fmt.Fprintf(w, "\n%s\n", r.Caution)
}

// jsonForm is the report as JSON, with chances as numbers and each as text.
func (r *poolReport) jsonForm() any {
	type result struct {
		Method           string   `json:"method"`
		Rho              float64  `json:"rho"`
		Floats           int      `json:"floats"`
		Short            float64  `json:"short"`
		ShortText        string   `json:"short_text"`
		ShortFewer       *float64 `json:"short_with_one_fewer"`
		Draws            int      `json:"draws,omitempty"`
		SumBuffers       int      `json:"sum_of_own_buffers"`
		Gain             int      `json:"pooling_gain"`
		AnyShortBuffered float64  `json:"short_with_own_buffers"`
		Unplaced         float64  `json:"beyond_tables"`
	}
	conv := func(x *pool.Result, n int) result {
		out := result{Method: x.Method, Rho: x.Rho, Floats: x.Floats, Short: x.Short, ShortText: chance(x.Short, n), Draws: x.Draws,
			SumBuffers: x.SumBuffers, Gain: x.Gain, AnyShortBuffered: x.AnyShortBuffered, Unplaced: x.Unplaced}
		if x.Method == "simulation" {
			out.ShortText = stats.ProbabilityText(x.ShortDraws, x.Draws)
		}
		if !math.IsNaN(x.ShortFewer) {
			f := x.ShortFewer
			out.ShortFewer = &f
		}
		return out
	}
	sens, sims := []result{}, []result{}
	for i, s := range r.Sensitivity {
		sens = append(sens, conv(s, r.TableDraws))
		sims = append(sims, conv(r.Simulated[i], r.Simulated[i].Draws))
	}
	return struct {
		At          string    `json:"at"`
		Cover       float64   `json:"cover_level"`
		Wards       []poolRow `json:"wards"`
		Left        []string  `json:"left_out"`
		TableDraws  int       `json:"fewest_table_draws"`
		Exact       result    `json:"independent"`
		Sensitivity []result  `json:"correlation_sensitivity"`
		Simulated   []result  `json:"correlation_simulated"`
		Caution     string    `json:"caution"`
	}{r.At, r.Cover, r.Wards, r.Left, r.TableDraws, conv(r.Exact, r.TableDraws), sens, sims, r.Caution}
}

// chance says a probability that rests on simulations of at least n
// draws, never as a bare 0% or 100%: below the 95% Wilson upper bound of
// 0 in n (stats.WilsonInterval) it is "< that bound", above the lower
// bound of n in n "> that bound".
func chance(p float64, n int) string {
	_, hi := stats.WilsonInterval(0, max(n, 1))
	switch {
	case p < hi:
		return "< " + pct(hi)
	case p > 1-hi:
		return "> " + pct(1-hi)
	}
	return pct(p)
}

// pct prints a share as a percentage with two significant digits below
// 10%, never rounding to 0% or 100%.
func pct(p float64) string {
	x := 100 * p
	prec := 0
	switch {
	case x < 1:
		prec = 2
	case x < 10:
		prec = 1
	}
	s := strconv.FormatFloat(x, 'f', prec, 64)
	for prec < 8 {
		v, _ := strconv.ParseFloat(s, 64)
		if !(v == 0 && x > 0) && !(v == 100 && x < 100) {
			break
		}
		prec++
		s = strconv.FormatFloat(x, 'f', prec, 64)
	}
	return s + "%"
}

// wardList splits a comma-separated --ward value.
func wardList(s string) ([]string, error) {
	if strings.TrimSpace(s) == "" {
		return nil, errors.New("--ward is required")
	}
	var codes []string
	seen := map[string]bool{}
	for _, c := range strings.Split(s, ",") {
		c = strings.TrimSpace(c)
		if c == "" || seen[c] {
			return nil, fmt.Errorf("--ward: %q names a ward twice or not at all", s)
		}
		seen[c] = true
		codes = append(codes, c)
	}
	return codes, nil
}

// parseStaff reads CODE=N,... for wards named in --ward.
func parseStaff(s string, codes []string) (map[string]int, error) {
	out := map[string]int{}
	if strings.TrimSpace(s) == "" {
		return out, nil
	}
	known := map[string]bool{}
	for _, c := range codes {
		known[c] = true
	}
	for _, item := range strings.Split(s, ",") {
		code, v, ok := strings.Cut(strings.TrimSpace(item), "=")
		n, err := strconv.Atoi(v)
		if !ok || err != nil || n < 0 || n > pool.MaxHeadcount {
			return nil, fmt.Errorf("%q is not CODE=N with N a whole number from 0 to %d", item, pool.MaxHeadcount)
		}
		if !known[code] {
			return nil, fmt.Errorf("ward %q is not in --ward", code)
		}
		out[code] = n
	}
	return out, nil
}

// parseRhos reads the comma-separated correlations; "" or "none" gives none.
func parseRhos(s string) ([]float64, error) {
	if s = strings.TrimSpace(s); s == "" || s == "none" {
		return nil, nil
	}
	var out []float64
	for _, item := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(item), 64)
		if err != nil || !(v >= 0 && v <= pool.MaxRho) {
			return nil, fmt.Errorf("%q is not a correlation from 0 to %g", item, pool.MaxRho)
		}
		out = append(out, v)
	}
	return out, nil
}
