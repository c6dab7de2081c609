package simstudy

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
)

// Row is one scenario's results, one per method, in the methods' order.
type Row struct {
	Scenario *Scenario
	Results  []Result
}

// WriteTable prints the battery's table: per scenario its observations per
// tier, census and oracle, then per method the mean true shortfall at the
// recommendation (± its SE), the declined share, the mean recommendation
// and its difference from the oracle; the last column is the verdict of
// the last method (the one judged) under the rule on point estimates.
func WriteTable(w io.Writer, rows []Row, cover float64) error {
	if len(rows) == 0 {
		return nil
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	head := []string{"scenario", "obs/tier", "census", "oracle"}
	for _, r := range rows[0].Results {
		tag := strings.Fields(r.Method)[0]
		head = append(head, tag+" short", "±se", "declined", "rec", "rec−oracle")
	}
	head = append(head, "verdict")
	fmt.Fprintln(tw, strings.Join(head, "\t"))
	for _, row := range rows {
		s := row.Scenario
		cells := []string{s.Name, s.ObsText(), fmt.Sprint(s.Census()), fmt.Sprint(row.Results[0].Oracle)}
		for _, r := range row.Results {
			short, se := r.MeanShortfall()
			rec, _ := r.MeanRecommended()
			cells = append(cells, num(short, "%.3f"), num(se, "%.3f"), fmt.Sprintf("%.0f%%", 100*r.DeclinedShare()),
				num(rec, "%.2f"), num(rec-float64(r.Oracle), "%+.2f"))
		}
		verdict := "pass"
		if f := row.Results[len(row.Results)-1].Failures(cover, 0); len(f) > 0 {
			verdict = "FAIL: " + strings.Join(f, "; ")
		}
		cells = append(cells, verdict)
		fmt.Fprintln(tw, strings.Join(cells, "\t"))
	}
	return tw.Flush()
}

// num formats x, or "—" for NaN (nothing to average).
func num(x float64, format string) string {
	if math.IsNaN(x) {
		return "—"
	}
	return fmt.Sprintf(format, x)
}
