package main

import (
	"strings"
	"testing"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"
)

// TestPhoneNewWardSetup is the admin's first minutes in headless Chromium
// at phone width (390 px), from a fresh data directory without the demo:
// create a ward with the form (the time zone from the <select>), land on
// the set-up checklist, add a shift pattern and a tier on the settings
// page, and find the census form ready. No page may scroll sideways.
func TestPhoneNewWardSetup(t *testing.T) {
	t.Parallel()
	ctx := newBrowser(t)
	dir := t.TempDir()
	if code, _, errs := runCLI(t, dir, "first admin passphrase\n", "user", "add", "--role", "admin", "ada.admin"); code != exitOK {
		t.Fatalf("user add: %d %s", code, errs)
	}
	s := MustServe(t, "--addr", "127.0.0.1:0", "--data-dir", dir)
	do := func(what string, steps ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		if err := chromedp.Do(ctx, steps...); err != nil {
			t.Fatalf("%s: %v", what, err)
		}
	}
	fits := func(page string) {
		t.Helper()
		w, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.documentElement.scrollWidth`))
		if err != nil || w > phoneWidth {
			t.Errorf("%s: page is %d px wide (%v), want at most %d", page, w, err, phoneWidth)
		}
	}
	do("phone viewport", chromedp.EmulateViewport(phoneWidth, phoneHeight, chromedp.EmulateMobile, chromedp.EmulateTouch, chromedp.EmulatePortrait))
	do("sign in",
		chromedp.Navigate(s.URL+"/signin"),
		chromedp.SendKeys(chromedp.CSS("#signin-name"), "ada.admin"),
		chromedp.SendKeys(chromedp.CSS("#signin-password"), "first admin passphrase"+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="wards-empty-new"]`)),
	)
	do("open the new ward form",
		chromedp.Click(chromedp.CSS(`[data-testid="wards-empty-new"]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="ward-form"]`)),
	)
	fits("new ward")
	do("create the ward",
		chromedp.SendKeys(chromedp.CSS("#ward-code"), "w6-west"),
		chromedp.SendKeys(chromedp.CSS("#ward-name"), "Ward 6 West"),
		chromedp.SetValue(chromedp.CSS("#ward-time-zone"), "America/Chicago"),
		chromedp.SendKeys(chromedp.CSS("#ward-beds"), "18"),
		chromedp.Click(chromedp.CSS(`[data-testid="ward-create"]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="setup-steps"]`)),
	)
	fits("set-up")
	states, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[data-testid="setup-step-state"]')).map(e => e.textContent)`))
	if err != nil || strings.Join(states, ",") != "Not done,Not done,Not done,Done,Optional,Not done" {
		t.Errorf("set-up states = %q (%v)", states, err)
	}
	do("add a shift pattern",
		chromedp.Click(chromedp.CSS(`[data-testid="setup-step-link"]`)), // Shift patterns
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="new-shift-form"]`)),
		chromedp.SendKeys(chromedp.CSS("#sh-new-name"), "Day"),
		chromedp.SendKeys(chromedp.CSS("#sh-new-start"), "07:00"),
		chromedp.SendKeys(chromedp.CSS("#sh-new-hours"), "12"+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="shift-form"]`)),
	)
	fits("settings")
	do("add a tier",
		chromedp.SendKeys(chromedp.CSS("#t-new-code"), "light"),
		chromedp.SendKeys(chromedp.CSS("#t-new-label"), "Light care"),
		chromedp.Click(chromedp.CSS(`[data-testid="new-tier-form"] button`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="tier-form"]`)),
	)
	do("back to the set-up",
		chromedp.Navigate(s.URL+"/wards/w6-west/setup"),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="setup-census"]`)),
	)
	states, _ = chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[data-testid="setup-step-state"]')).map(e => e.textContent)`))
	if strings.Join(states[:2], ",") != "Done,Done" {
		t.Errorf("set-up states after a shift and a tier = %q", states)
	}
	do("open the census",
		chromedp.Click(chromedp.CSS(`[data-testid="setup-census"]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="census-form"]`)),
	)
	fits("census")
	do("open the ward's edit page",
		chromedp.Navigate(s.URL+"/admin/wards/w6-west/edit"),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="retire-form"]`)),
	)
	fits("edit ward")
	zone, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`document.getElementById("ward-time-zone").value`))
	if zone != "America/Chicago" {
		t.Errorf("stored zone shown as %q, want America/Chicago", zone)
	}
}
