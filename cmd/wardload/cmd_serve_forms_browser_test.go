package main

import (
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"wardload/internal/demo"
)

// TestBrowserSettingsErrorsInView: on a phone-sized window a manager
// sends the last tier form of the settings page, far down the page, with
// two mistakes. The page comes back opened at that form's error summary,
// which has focus; after the fix the 303 reopens the page at the form,
// with "Saved" in view. No script is involved (the page has none).
func TestBrowserSettingsErrorsInView(t *testing.T) {
	t.Parallel()
	needChromium(t)
	dir, accounts := mustDemoDataDir(t)
	ctx := newBrowser(t)
	s := MustServe(t, "--addr", "127.0.0.1:0", "--data-dir", dir)
	do := func(what string, steps ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		if err := chromedp.Do(ctx, steps...); err != nil {
			t.Fatalf("%s: %v", what, err)
		}
	}
	retype := func(id, v, end string) []chromedp.Action[chromedp.Void] {
		return []chromedp.Action[chromedp.Void]{chromedp.Focus(chromedp.CSS("#" + id)),
			chromedp.KeyEvent("a", chromedp.KeyModifiers(chromedp.ModifierCtrl)), chromedp.KeyEvent(kb.Delete), chromedp.KeyEvent(v + end)}
	}
	type view struct {
		Hash, Active   string
		ScrollY        float64
		ActiveTop      float64
		SavedTop       float64
		Height, Errors float64
	}
	look := func() view {
		t.Helper()
		v, err := chromedp.Run(ctx, chromedp.Evaluate[view](`(() => {
			const saved = document.querySelector('.saved-note');
			return {Hash: location.hash, Active: document.activeElement.id, ScrollY: scrollY,
				ActiveTop: document.activeElement.getBoundingClientRect().top,
				SavedTop: saved ? saved.getBoundingClientRect().top : -1e6, Height: innerHeight,
				Errors: document.querySelectorAll('[data-testid="form-error-summary"] a').length};
		})()`))
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	do("phone width", chromedp.EmulateViewport(390, 800))
	do("sign in",
		chromedp.Navigate(s.URL+"/signin"),
		chromedp.SendKeys(chromedp.CSS("#signin-name"), "demo.manager"),
		chromedp.SendKeys(chromedp.CSS("#signin-password"), accounts["demo.manager"]+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="wards"]`)),
	)
	do("open settings", chromedp.Navigate(s.URL+"/wards/"+demo.WardCode+"/settings"), chromedp.WaitVisible(chromedp.CSS(`[data-testid="general-form"]`)))
	last, err := chromedp.Run(ctx, chromedp.Evaluate[string](`[...document.querySelectorAll('[data-testid="tier-form"]')].pop().id`))
	if err != nil || !strings.HasPrefix(last, "tier-") {
		t.Fatalf("last tier form %q: %v", last, err)
	}
	id := strings.TrimPrefix(last, "tier-")
	do("send two mistakes", append(retype("t-"+id+"-label", "", ""), retype("t-"+id+"-order", "x", kb.Enter)...)...)
	do("wait for the summary", chromedp.WaitVisible(chromedp.CSS("#"+last+"-errors")), chromedp.Sleep(300*time.Millisecond))
	v := look()
	if v.Active != last+"-errors" || v.Errors != 2 {
		t.Errorf("after a refused post: focus on %q with %v linked errors, want %s-errors with 2", v.Active, v.Errors, last)
	}
	if v.ScrollY < 1000 || v.ActiveTop < 0 || v.ActiveTop > v.Height-100 {
		t.Errorf("after a refused post: scrollY %v, summary at %v of %v: not opened at the form", v.ScrollY, v.ActiveTop, v.Height)
	}
	do("fix and save", append(retype("t-"+id+"-label", "Constant care", ""), retype("t-"+id+"-order", "4", kb.Enter)...)...)
	do("wait for Saved", chromedp.WaitVisible(chromedp.CSS(".saved-note")), chromedp.Sleep(300*time.Millisecond))
	v = look()
	if v.Hash != "#"+last || v.SavedTop < 0 || v.SavedTop > v.Height-50 || v.ScrollY < 1000 {
		t.Errorf("after the save: hash %q, Saved at %v of %v, scrollY %v; want #%s with Saved in view", v.Hash, v.SavedTop, v.Height, v.ScrollY, last)
	}
}
