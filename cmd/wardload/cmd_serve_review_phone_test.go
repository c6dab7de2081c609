package main

import (
	"regexp"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"wardload/internal/demo"
)

// TestPhoneReview is the manager's weekly review on a 390 × 844 phone,
// on the SQLite store (the page reads through the same store interface
// on both): every chart's text is drawn at 12 px or more, every chart
// fits the screen's width, the newest week is the first column of the
// weekly table, and the log switch of the histograms works by its link.
func TestPhoneReview(t *testing.T) {
	ctx := newBrowser(t)
	s := MustServe(t, "--demo", "--addr", "127.0.0.1:0", "--data-dir", t.TempDir())
	m := regexp.MustCompile(`demo\.manager\s+manager\s+(\S+)`).FindStringSubmatch(s.stdout.String())
	if m == nil {
		t.Fatalf("no demo.manager password in:\n%s", s.stdout)
	}
	t.Cleanup(func() {
		if t.Failed() {
			keepFirstScreen(t, ctx, "failure")
		}
	})
	do := func(what string, steps ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		if err := chromedp.Do(ctx, steps...); err != nil {
			t.Fatalf("%s: %v", what, err)
		}
	}
	do("phone viewport", chromedp.EmulateViewport(phoneWidth, phoneHeight, chromedp.EmulateMobile, chromedp.EmulateTouch, chromedp.EmulatePortrait))
	do("sign in",
		chromedp.Navigate(s.URL+"/signin"),
		chromedp.SendKeys(chromedp.CSS("#signin-name"), "demo.manager"),
		chromedp.SendKeys(chromedp.CSS("#signin-password"), m[1]+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="wards"]`)),
	)
	do("open the review", chromedp.Navigate(s.URL+"/wards/"+demo.WardCode+"/review"), chromedp.WaitVisible(chromedp.CSS(`[data-testid="boxplot-svg"]`)))

	// The rendered height of a 12-unit text is its font size times the
	// SVG's scale; getScreenCTM gives that scale as drawn.
	type textSize struct {
		Smallest float64 `json:"smallest"`
		Count    int     `json:"count"`
		Widest   float64 `json:"widest"`
	}
	const measure = `(() => {
		let smallest = 1e9, count = 0, widest = 0;
		for (const svg of document.querySelectorAll('main svg.chart-svg')) {
			const r = svg.getBoundingClientRect();
			widest = Math.max(widest, r.right);
			const scale = svg.getScreenCTM().a;
			for (const t of svg.querySelectorAll('text')) {
				const px = parseFloat(t.getAttribute('font-size') || getComputedStyle(t).fontSize) * scale;
				smallest = Math.min(smallest, px); count++;
			}
		}
		return {smallest, count, widest};
	})()`
	size, err := chromedp.Run(ctx, chromedp.Evaluate[textSize](measure))
	if err != nil {
		t.Fatal(err)
	}
	if size.Count < 20 || size.Smallest < 11.5 || size.Widest > phoneWidth {
		t.Errorf("chart text: %d labels, smallest %.1f px, right edge %.0f px; want ≥ 11.5 px within %d px", size.Count, size.Smallest, size.Widest, phoneWidth)
	}

	// The newest week leads the weekly table, so it is in view unscrolled.
	first, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`(() => {
		const ths = document.querySelectorAll('[data-testid="trend-week"]');
		const r = ths[0].getBoundingClientRect();
		return [ths[0].textContent, ths[ths.length-1].textContent, String(r.right <= window.innerWidth)];
	})()`))
	if err != nil || len(first) != 3 || first[0] <= first[1] || first[2] != "true" {
		t.Errorf("weekly table first and last week %q (%v); want the newest first and in view", first, err)
	}

	do("switch to the log scale", chromedp.Click(chromedp.CSS(`[data-testid="hist-log"]`)), chromedp.WaitVisible(chromedp.CSS(`[data-testid="hist-linear"]`)))
	desc, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.querySelector('[data-testid="histogram-desc"]').textContent`))
	if err != nil || !regexp.MustCompile(`on a logarithmic axis`).MatchString(desc) {
		t.Errorf("after the switch the histogram says %q (%v)", desc, err)
	}
	keepFirstScreen(t, ctx, "review-log")

	// The relationship check: the demo's dependency score against care
	// time, its chart as readable on a phone as the others.
	do("open the relationship check", chromedp.Click(chromedp.CSS(`[data-testid="relation-link"]`)), chromedp.WaitVisible(chromedp.CSS(`[data-testid="relation-svg"]`)))
	size, err = chromedp.Run(ctx, chromedp.Evaluate[textSize](measure))
	if err != nil {
		t.Fatal(err)
	}
	if size.Count < 8 || size.Smallest < 11.5 || size.Widest > phoneWidth {
		t.Errorf("relationship chart text: %d labels, smallest %.1f px, right edge %.0f px; want ≥ 11.5 px within %d px", size.Count, size.Smallest, size.Widest, phoneWidth)
	}
	overflow, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.documentElement.scrollWidth`))
	if err != nil || overflow > phoneWidth {
		t.Errorf("relationship page is %d px wide (%v), want ≤ %d", overflow, err, phoneWidth)
	}
	keepFirstScreen(t, ctx, "relationship")
	do("scroll to the chart", chromedp.ScrollIntoView(chromedp.CSS(`[data-testid="relation-chart"]`)))
	keepFirstScreen(t, ctx, "relationship-chart")
}
