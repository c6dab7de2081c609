package main

import (
	"context"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// The phone the charge nurse's journey is checked on: 390 × 844 CSS
// pixels, the first screen of a common phone held upright.
const phoneWidth, phoneHeight = 390, 844

// TestPhoneChangeover is the charge nurse's two minutes at the start of a
// day shift, on a phone, with the server's clock set: at 06:45 and 07:15
// in the ward's time zone the census page preselects the day shift about
// to start (not the night shift that is ending), fills the counts from the
// night's census and marks them as carried, keeps Save on the first
// screen, and its script updates the total against the beds while typing.
// With two nurses on duty the projection page states the gap, the chance
// of a shortfall and the ward's escalation text on its first screen; at
// 09:00 the night's end-of-shift record is saved from the shift list's link.
// On failure the first screen is saved as a PNG in $WARDLOAD_TEST_ARTIFACTS
// (or the test's temporary directory, named in the log).
func TestPhoneChangeover(t *testing.T) {
	t.Parallel()
	onEachStore(t, phoneJourney)
}

// changeoverClock runs from the next 06:45 in London (the demo ward's
// zone), so cookies set by the server are not already expired in the
// browser; set moves it to another wall-clock time of that day.
type changeoverClock struct {
	day    time.Time // 00:00 of the chosen day, London
	offset atomic.Int64
	start  time.Time
}

func newChangeoverClock(t *testing.T) *changeoverClock {
	loc, err := time.LoadLocation("Europe/London")
	if err != nil {
		t.Fatal(err)
	}
	now := time.Now().In(loc)
	day := time.Date(now.Year(), now.Month(), now.Day(), 0, 0, 0, 0, loc).AddDate(0, 0, 1)
	c := &changeoverClock{day: day, start: time.Now()}
	c.set(6, 45)
	return c
}

func (c *changeoverClock) set(h, m int) {
	at := time.Date(c.day.Year(), c.day.Month(), c.day.Day(), h, m, 0, 0, c.day.Location())
	c.offset.Store(int64(time.Until(at)))
}

func (c *changeoverClock) now() time.Time { return time.Now().Add(time.Duration(c.offset.Load())) }

func phoneJourney(t *testing.T, so *storeOptions, storeArgs ...string) {
	ctx := newBrowser(t)
	clock := newChangeoverClock(t)
	s := mustServeAt(t, clock.now, append([]string{"--demo", "--addr", "127.0.0.1:0"}, storeArgs...)...)
	m := regexp.MustCompile(`demo\.charge1\s+charge_nurse\s+(\S+)`).FindStringSubmatch(s.stdout.String())
	if m == nil {
		t.Fatalf("no demo.charge1 password in:\n%s", s.stdout)
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
		chromedp.SendKeys(chromedp.CSS("#signin-name"), "demo.charge1"),
		chromedp.SendKeys(chromedp.CSS("#signin-password"), m[1]+kb.Enter),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="wards"]`)),
	)

	st, err := openStore(context.Background(), so, false)
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	night := nightBefore(t, st.Store, clock.day)
	dayName := "Day shift on " + clock.day.Format("Mon 2 Jan 2006")

	for _, at := range [][2]int{{6, 45}, {7, 15}} {
		clock.set(at[0], at[1])
		label := strconv.Itoa(at[0]) + ":" + strconv.Itoa(at[1])
		do(label+": open the census page",
			chromedp.Navigate(s.URL+"/wards/"+demo.WardCode+"/census"),
			chromedp.WaitVisible(chromedp.CSS(`[data-testid="census-form"]`)),
		)
		target, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="census-save-target"]`)))
		if !strings.Contains(strings.Join(strings.Fields(target), " "), dayName) {
			t.Errorf("%s: save target %q, want the %s", label, target, dayName)
		}
		first, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`(document.querySelector('[data-testid="shift-choice"]')||{}).textContent || ""`))
		selected, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`(document.querySelector('[data-testid="shift-choice"][aria-current="true"]')||{}).textContent || ""`))
		if !strings.HasPrefix(first, "Day shift") || first != selected {
			t.Errorf("%s: first choice %q, selected %q; want the day shift first and selected", label, first, selected)
		}

		// Carried forward: every count is the night's, marked.
		values, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[data-testid="tier-field"] input')).map(e => e.value)`))
		if err != nil || len(values) != len(night.Counts) {
			t.Fatalf("%s: tier values %q (%v), want %d", label, values, err, len(night.Counts))
		}
		for i, c := range night.Counts {
			if values[i] != strconv.Itoa(c.Patients) {
				t.Errorf("%s: tier %d shows %q, the night's census has %d", label, i, values[i], c.Patients)
			}
		}
		marks, _ := chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll('[data-testid="tier-carried"]').length`))
		carried, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`(document.querySelector('[data-testid="census-carried"]')||{}).textContent || ""`))
		if marks != len(night.Counts) || !strings.Contains(carried, "Night shift") {
			t.Errorf("%s: %d counts marked carried, notice %q; want %d and the night shift named", label, marks, carried, len(night.Counts))
		}

		// Save on the first screen, with the page not scrolled.
		bottom, err := chromedp.Run(ctx, chromedp.Evaluate[float64](`window.scrollTo(0, 0); document.querySelector('[data-testid="census-save"]').getBoundingClientRect().bottom`))
		if err != nil || bottom <= 0 || bottom > phoneHeight {
			t.Errorf("%s: Save's bottom edge at %v px (%v), want within the first %d px", label, bottom, err, phoneHeight)
		}
	}
	keepFirstScreen(t, ctx, "census")

	// The script (allowed by the CSP as a file of the site) keeps the
	// total current: one more patient in the first tier.
	ids, _ := chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[data-testid="tier-field"] input')).map(e => e.id)`))
	do("type a count",
		chromedp.Focus(chromedp.CSS("#"+ids[0])),
		chromedp.KeyEvent("a", chromedp.KeyModifiers(chromedp.ModifierCtrl)),
		chromedp.KeyEvent(kb.Delete),
		chromedp.KeyEvent(strconv.Itoa(night.Counts[0].Patients+1)),
	)
	total, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="census-total"]`)))
	if want := strconv.Itoa(night.Total()+1) + " patients"; !strings.HasPrefix(total, want) {
		t.Errorf("running total %q after typing, want it to start %q", total, want)
	}
	// Two nurses on duty, fewer than any estimate for this census: the
	// projection page says how many short, the chance of a shortfall with
	// them and the demo ward's escalation text, on the first screen.
	do("staff on duty", chromedp.SendKeys(chromedp.CSS("#staff-nurses"), "2"))
	// Two planned admissions from theatre, in the section folded below
	// Save; the page then says what they add to the band.
	do("planned admissions",
		chromedp.Click(chromedp.CSS(`[data-testid="planned-movement"] summary`)),
		chromedp.WaitVisible(chromedp.CSS("#planned-admissions")),
		chromedp.SendKeys(chromedp.CSS("#planned-admissions"), "2"),
	)
	do("save", chromedp.Click(chromedp.CSS(`[data-testid="census-save"]`)), chromedp.WaitVisible(chromedp.CSS("#recommended")))
	keepFirstScreen(t, ctx, "projection")
	movement, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="movement"]`)))
	t.Logf("movement sentence: %s", movement)
	if !strings.Contains(movement, "2 admissions") || !strings.Contains(movement, "they add +") || strings.Contains(movement, "they add +0.0 ") {
		t.Errorf("movement sentence %q, want the 2 planned admissions and what they add", movement)
	}
	rec, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="recommended"]`)))
	gap, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="duty-gap"]`)))
	if n, err := strconv.Atoi(strings.TrimSpace(rec)); err != nil || !strings.HasPrefix(gap, "You have 2 nurses on duty; the estimate is "+strconv.Itoa(n)+" — "+strconv.Itoa(n-2)+" short") {
		t.Errorf("staff gap %q with %q recommended", gap, rec)
	}
	chance, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="duty-chance"]`)))
	if !strings.HasPrefix(chance, "Chance of a shortfall with the 2 nurses on duty: ") {
		t.Errorf("chance %q", chance)
	}
	escalation, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`(document.querySelector('[data-testid="duty-escalation"]')||{}).textContent || ""`))
	if !strings.Contains(escalation, "site nurse manager") {
		t.Errorf("escalation %q, want the demo ward's text", escalation)
	}
	if top, err := chromedp.Run(ctx, chromedp.Evaluate[float64](`window.scrollTo(0, 0); document.querySelector('[data-testid="duty-gap"]').getBoundingClientRect().top`)); err != nil || top <= 0 || top > phoneHeight {
		t.Errorf("staff gap at %v px (%v), want on the first screen", top, err)
	}

	// At 09:00 the night has ended: its end-of-shift record, from the
	// link the shift list gives it.
	clock.set(9, 0)
	do("shift list", chromedp.Navigate(s.URL+"/wards/"+demo.WardCode+"/projections"), chromedp.WaitVisible(chromedp.CSS(`[data-testid="projections"]`)))
	recordURL := "/wards/" + demo.WardCode + "/shift-record?date=" + night.Date.String() + "&shift=" + strconv.FormatInt(night.ShiftID, 10)
	links, _ := chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[data-testid="row-record-link"]')).map(a => a.getAttribute('href'))`))
	if !slices.Contains(links, recordURL) {
		t.Errorf("shift list record links %q, want %q", links, recordURL)
	}
	do("end-of-shift form",
		chromedp.Navigate(s.URL+recordURL),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid="record-form"]`)),
		chromedp.SendKeys(chromedp.CSS("#record-nurses"), "5"),
		chromedp.SendKeys(chromedp.CSS("#record-admissions"), "1"),
		chromedp.SendKeys(chromedp.CSS("#record-discharges"), "2"),
		chromedp.Click(chromedp.CSS("#care-yes")),
		chromedp.SetValue(chromedp.CSS("#care-category"), wardload.CareMobility),
	)
	keepFirstScreen(t, ctx, "record")
	if bottom, err := chromedp.Run(ctx, chromedp.Evaluate[float64](`window.scrollTo(0, 0); document.querySelector('[data-testid="record-save"]').getBoundingClientRect().bottom`)); err != nil || bottom <= 0 || bottom > phoneHeight {
		t.Errorf("end-of-shift Save's bottom edge at %v px (%v), want within the first %d px", bottom, err, phoneHeight)
	}
	do("save the record", chromedp.Click(chromedp.CSS(`[data-testid="record-save"]`)), chromedp.WaitVisible(chromedp.CSS(`[data-testid="record-latest"]`)))
	latest, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`[data-testid="record-latest"]`)))
	if !strings.Contains(latest, "5 nurses, 1 admission, 2 discharges; care left undone or delayed: Mobility or repositioning.") {
		t.Errorf("saved record %q", latest)
	}
}

// nightBefore is the newest census of the night shift that ends on day.
func nightBefore(t *testing.T, st wardload.Store, day time.Time) *wardload.Census {
	t.Helper()
	ctx := context.Background()
	w, err := st.FindWardByCode(ctx, demo.WardCode)
	if err != nil {
		t.Fatal(err)
	}
	prev := wardload.DateOf(day.AddDate(0, 0, -1))
	cs, _, err := st.FindCensus(ctx, wardload.CensusFilter{WardID: &w.ID, From: &prev, To: &prev, LatestOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	// Ordered by shift start: the night is the last of the day.
	if len(cs) == 0 {
		t.Fatalf("the demo has no census on %s", prev)
	}
	return cs[len(cs)-1]
}

// keepFirstScreen writes what a phone shows without scrolling to
// $WARDLOAD_TEST_ARTIFACTS, or the test's temporary directory.
func keepFirstScreen(t *testing.T, ctx context.Context, name string) {
	dir := os.Getenv("WARDLOAD_TEST_ARTIFACTS")
	if dir == "" {
		dir = t.TempDir()
	}
	png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Logf("screenshot %s: %v", name, err)
		return
	}
	path := filepath.Join(dir, "phone-"+strings.ReplaceAll(t.Name(), "/", "-")+"-"+name+".png")
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Logf("screenshot %s: %v", name, err)
		return
	}
	t.Logf("first screen saved: %s", path)
}
