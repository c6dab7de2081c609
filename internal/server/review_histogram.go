package server

import (
	"math"
	"net/http"
	"net/url"
	"slices"

	"wardload/internal/stats"
	"wardload/web"
)

// maxHistBars caps the bars of one histogram: beyond about a hundred, bars
// are narrower than a pixel on a phone and the shape is no clearer.
const maxHistBars = 100

// histScale reads the review's histogram scale from the query: "log" or,
// by default, "linear". Anything else is the default, since the choice
// only changes a picture.
func histScale(q url.Values) string {
	if q.Get("scale") == "log" {
		return "log"
	}
	return "linear"
}

// histScaleURLs returns the review page's address with each scale, every
// other query parameter kept, anchored at the histograms.
func histScaleURLs(r *http.Request, base string) (linear, log string) {
	q := r.URL.Query()
	q.Del("scale")
	linear = base + "?" + q.Encode() + "#histograms"
	q.Set("scale", "log")
	log = base + "?" + q.Encode() + "#histograms"
	return linear, log
}

// tierHistogram lays out one tier's histogram on the chosen scale.
//
// Bins follow the Freedman–Diaconis rule (stats.BinsFor) with the tier's
// n and IQR under the ward's quartile convention, from the smallest value
// shown; values past the outer fences (Tukey's "far out" values, most of
// them entry errors the review lists) are counted in a note rather than
// drawn, so that one 2,600-minute typo does not squeeze every other bar
// into one. On the log scale the same is done on log-minutes, and values
// of 0, which have no logarithm, are counted in a note.
func tierHistogram(tr *tierReview, log bool) *web.HistogramVM {
	s, xs := tr.summary, tr.values
	if log {
		s, xs = tr.logSummary, tr.logs
	}
	if s == nil {
		return nil
	}
	lo, hi := s.Min, math.Min(s.Max, s.OuterFences.Upper)
	if log {
		lo = math.Max(s.Min, s.OuterFences.Lower)
	}
	b := stats.BinsFor(s.N, s.IQR, lo, hi)
	if b.Bins > maxHistBars {
		b.Bins, b.Width = maxHistBars, (hi-lo)/maxHistBars
	}
	counts, below, above := stats.Counts(xs, b)
	in := web.HistInput{Label: tr.tier.Label, Unit: reviewUnit, N: len(xs), Start: b.Start, Width: b.Width,
		Counts: counts, Below: below, Above: above, BelowMin: slices.Min(xs), AboveMax: slices.Max(xs), Log: log,
		Zeros: len(tr.values) - len(tr.logs)}
	if log {
		in.BelowMin, in.AboveMax = math.Exp(in.BelowMin), math.Exp(in.AboveMax)
	}
	return web.NewHistogram(in)
}
