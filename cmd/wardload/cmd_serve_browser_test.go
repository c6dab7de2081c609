package main

import (
	"context"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"wardload/internal/demo"
)

const chromiumPath = "/usr/bin/chromium"

// newBrowser starts headless Chromium with a fresh profile. Without
// Chromium the test is skipped, except under CI=true, where it must run.
func newBrowser(t *testing.T) context.Context {
	t.Helper()
	needChromium(t)
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 900),
	}
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelCtx := chromedp.NewContext(actx)
	ctx, cancelTimeout := context.WithTimeout(ctx, 90*time.Second)
	t.Cleanup(func() { cancelTimeout(); cancelCtx(); cancelAlloc() })
	return ctx
}

// TestBrowserCensusToProjection runs the real wiring with the demo ward,
// signs in as a demo charge nurse, enters a census by keyboard alone and
// reads the recommended headcount off the projection page.
//
// It runs once per store: on the embedded SQLite store, and on PostgreSQL
// when WARDLOAD_TEST_DATABASE_URL is set (required under CI=true).
//
// The journey needs the demo as it is, so each store is a copy of the
// demo seeded once for the test binary (mustDemoDataDir, mustDemoDatabase).
func TestBrowserCensusToProjection(t *testing.T) {
	t.Parallel()
	needChromium(t)
	t.Run("sqlite", func(t *testing.T) {
		dir, accounts := mustDemoDataDir(t)
		browserJourney(t, &storeOptions{DataDir: dir}, accounts["demo.charge1"], "--data-dir", dir)
	})
	t.Run("postgres", func(t *testing.T) {
		dbURL, accounts := mustDemoDatabase(t)
		browserJourney(t, &storeOptions{DB: dbURL}, accounts["demo.charge1"], "--db", dbURL, "--data-dir", t.TempDir())
	})
}

// needChromium skips the test without Chromium, or fails it under CI=true.
func needChromium(t *testing.T) {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI=true but %s is missing: %v", chromiumPath, err)
		}
		t.Skipf("%s not installed; browser test skipped", chromiumPath)
	}
}

// onEachStore runs a journey as two subtests: on the embedded SQLite
// store, and on PostgreSQL when WARDLOAD_TEST_DATABASE_URL is set. The
// journey gets the store for reading back and the arguments for serve.
func onEachStore(t *testing.T, journey func(t *testing.T, so *storeOptions, storeArgs ...string)) {
	needChromium(t) // before creating a database only to skip
	t.Run("sqlite", func(t *testing.T) {
		dir := t.TempDir()
		journey(t, &storeOptions{DataDir: dir}, "--data-dir", dir)
	})
	t.Run("postgres", func(t *testing.T) {
		dbURL := mustCreateDatabase(t)
		journey(t, &storeOptions{DB: dbURL}, "--db", dbURL, "--data-dir", t.TempDir())
	})
}

// browserJourney is the charge nurse's journey against one store holding
// the demo: so selects the store for reading back, storeArgs for serve;
// pw is demo.charge1's password.
func browserJourney(t *testing.T, so *storeOptions, pw string, storeArgs ...string) {
	ctx := newBrowser(t)
	s := MustServe(t, append([]string{"--addr", "127.0.0.1:0"}, storeArgs...)...)
	do := func(what string, steps ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		if err := chromedp.Do(ctx, steps...); err != nil {
			t.Fatalf("%s: %v", what, err)
		}
	}
	do("sign in",
		chromedp.Navigate(s.URL+"/signin"),
		chromedp.SendKeys(chromedp.CSS("#signin-name"), "demo.charge1"),
		chromedp.SendKeys(chromedp.CSS("#signin-password"), pw+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="wards"]`)),
	)
	do("open the census page",
		chromedp.Navigate(s.URL+"/wards/"+demo.WardCode+"/census"),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="census-form"]`)),
	)
	tierIDs, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[data-testid="tier-field"] input')).map(e => e.id)`))
	if err != nil || len(tierIDs) < 2 {
		t.Fatalf("tier inputs %q: %v", tierIDs, err)
	}
	saveScreenshots(t, ctx, "census")

	// A bad count first: the form comes back with the error summary
	// focused, the field marked invalid and nothing stored.
	do("submit a bad count",
		chromedp.Focus(chromedp.CSS("#"+tierIDs[0])),
		chromedp.KeyEvent("a", chromedp.KeyModifiers(chromedp.ModifierCtrl)),
		chromedp.KeyEvent(kb.Delete),
		chromedp.KeyEvent("x"+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="error-summary"]`)),
	)
	state, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`[document.activeElement.dataset.testid || "", document.getElementById("`+tierIDs[0]+`").getAttribute("aria-invalid") || "", document.getElementById("`+tierIDs[0]+`").value]`))
	if err != nil || len(state) != 3 || state[0] != "error-summary" || state[1] != "true" || state[2] != "x" {
		t.Errorf("after a bad count: focus, aria-invalid, value = %q (%v); want error-summary, true, x", state, err)
	}
	saveScreenshots(t, ctx, "census-error")

	// Keyboard only: focus the first count, then for each tier select
	// what is there, type the count and Tab to the next field; Enter in
	// the last field submits the form with its first button, Save.
	counts := []string{"3", "5", "2", "1", "1", "1"}
	do("focus the first tier", chromedp.Focus(chromedp.CSS("#"+tierIDs[0])))
	for i, id := range tierIDs {
		active, err := chromedp.Run(ctx, chromedp.Evaluate[string](`document.activeElement.id`))
		if err != nil || active != id {
			t.Fatalf("tab order: focus on %q, want %q (%v)", active, id, err)
		}
		last := kb.Tab
		if i == len(tierIDs)-1 {
			last = kb.Enter
		}
		do("type tier "+id,
			chromedp.KeyEvent("a", chromedp.KeyModifiers(chromedp.ModifierCtrl)),
			chromedp.KeyEvent(kb.Delete),
			chromedp.KeyEvent(counts[i%len(counts)]),
			chromedp.KeyEvent(last),
		)
	}
	do("wait for the projection", chromedp.WaitVisible(chromedp.CSS("#recommended")))
	recommended, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS("#recommended")))
	if err != nil {
		t.Fatal(err)
	}
	location, err := chromedp.Run(ctx, chromedp.Location())
	if err != nil {
		t.Fatal(err)
	}
	idm := regexp.MustCompile(`/wards/` + demo.WardCode + `/projections/([0-9]+)$`).FindStringSubmatch(location)
	if idm == nil {
		t.Fatalf("after saving, at %s", location)
	}
	saveScreenshots(t, ctx, "projection")
	do("open the shift list",
		chromedp.Navigate(s.URL+"/wards/"+demo.WardCode+"/projections"),
		chromedp.WaitVisible(chromedp.CSS(`a[href$="/projections/`+idm[1]+`"]`)),
	)
	saveScreenshots(t, ctx, "shift-list")

	st, err := openStore(context.Background(), so, false)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	id, _ := strconv.ParseInt(idm[1], 10, 64)
	p, err := st.Store.FindProjectionByID(context.Background(), id)
	if err != nil {
		t.Fatal(err)
	}
	if strings.TrimSpace(recommended) != strconv.Itoa(p.Recommended) {
		t.Errorf("page recommends %q, stored projection %d", recommended, p.Recommended)
	}
	want := 0
	for i := range tierIDs {
		n, _ := strconv.Atoi(counts[i%len(counts)])
		want += n
	}
	if p.TotalPatients != want || p.CreatedBy == 0 {
		t.Errorf("stored census total %d by user %d, want %d typed by the nurse", p.TotalPatients, p.CreatedBy, want)
	}
}

// saveScreenshots writes full-page screenshots at desktop and phone width
// to $WARDLOAD_SCREENSHOTS, when set, for a person to look at.
func saveScreenshots(t *testing.T, ctx context.Context, name string) {
	t.Helper()
	dir := os.Getenv("WARDLOAD_SCREENSHOTS")
	if dir == "" {
		return
	}
	for _, size := range []struct {
		label string
		w, h  int64
		opts  []chromedp.EmulateViewportOption
	}{{"desktop", 1280, 900, nil}, {"phone", 390, 844, []chromedp.EmulateViewportOption{chromedp.EmulateMobile, chromedp.EmulateTouch, chromedp.EmulatePortrait}}} {
		if err := chromedp.Do(ctx, chromedp.EmulateViewport(size.w, size.h, size.opts...)); err != nil {
			t.Fatalf("viewport %s: %v", size.label, err)
		}
		png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100)) // quality 100 gives a PNG
		if err != nil {
			t.Fatalf("screenshot %s %s: %v", name, size.label, err)
		}
		if err := os.WriteFile(filepath.Join(dir, "wardload-"+name+"-"+size.label+".png"), png, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := chromedp.Do(ctx, chromedp.ResetViewport()); err != nil {
		t.Fatal(err)
	}
}
