package storetest

import (
	"bytes"
	"errors"
	"fmt"
	"slices"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// signInRule is the account rule of the server (internal/signin): waits
// from the third attempt, at most 15 minutes, forgotten after a day.
var signInRule = wardload.ThrottleRule{After: 3, MaxWait: 15 * time.Minute, Forget: 24 * time.Hour}

func signInCases() []testCase {
	return []testCase{
		{"SignIn/SwapRoundTrip", func(t *testing.T, f *fixture) {
			c, err := f.store.FindSignInAttempts(f.ctx, "acct:1")
			noErr(t, err)
			if c != (wardload.SignInAttempts{Key: "acct:1"}) {
				t.Fatalf("nothing stored: %+v", c)
			}
			next := wardload.SignInAttempts{Key: "acct:1", Attempts: 1, Last: startTime}
			ok, err := f.store.SwapSignInAttempts(f.ctx, c, next)
			noErr(t, err)
			if !ok {
				t.Fatal("first swap refused")
			}
			// A second insert from the same empty old value loses.
			if ok, err := f.store.SwapSignInAttempts(f.ctx, c, next); err != nil || ok {
				t.Fatalf("stale insert = %v %v, want refused", ok, err)
			}
			got, err := f.store.FindSignInAttempts(f.ctx, "acct:1")
			noErr(t, err)
			if got.Attempts != 1 || !got.Last.Equal(startTime) {
				t.Fatalf("reread %+v", got)
			}
			later := wardload.SignInAttempts{Key: "acct:1", Attempts: 2, Last: startTime.Add(time.Second)}
			for _, stale := range []wardload.SignInAttempts{
				{Key: "acct:1", Attempts: 2, Last: startTime},                  // other count
				{Key: "acct:1", Attempts: 1, Last: startTime.Add(time.Second)}, // other time
			} {
				if ok, err := f.store.SwapSignInAttempts(f.ctx, stale, later); err != nil || ok {
					t.Fatalf("swap from %+v = %v %v, want refused", stale, ok, err)
				}
			}
			if ok, err := f.store.SwapSignInAttempts(f.ctx, got, later); err != nil || !ok {
				t.Fatalf("swap from the stored count = %v %v", ok, err)
			}
			// Cancel: one off, never below zero, time kept.
			for range 3 {
				noErr(t, f.store.CancelSignInAttempt(f.ctx, "acct:1"))
			}
			got, err = f.store.FindSignInAttempts(f.ctx, "acct:1")
			noErr(t, err)
			if got.Attempts != 0 || !got.Last.Equal(later.Last) {
				t.Fatalf("after three cancels of two: %+v", got)
			}
			noErr(t, f.store.CancelSignInAttempt(f.ctx, "acct:none"))
			noErr(t, f.store.ClearSignInAttempts(f.ctx, "acct:1"))
			if got, _ := f.store.FindSignInAttempts(f.ctx, "acct:1"); !got.Last.IsZero() {
				t.Fatalf("after clear: %+v", got)
			}
		}},
		{"SignIn/ConcurrentReserveStopsAtLimit", func(t *testing.T, f *fixture) {
			// 40 reservations at one instant from as many goroutines:
			// exactly the rule's After get through, the rest must wait 1 s.
			var ok atomic.Int64
			var wg sync.WaitGroup
			errs := make(chan error, 40)
			for range 40 {
				wg.Go(func() {
					d, err := signInRule.Reserve(f.ctx, f.store, "acct:7", startTime)
					if err != nil {
						errs <- err
					} else if d == 0 {
						ok.Add(1)
					} else if d != time.Second {
						errs <- fmt.Errorf("wait %v, want 1s", d)
					}
				})
			}
			wg.Wait()
			close(errs)
			for err := range errs {
				t.Error(err)
			}
			if ok.Load() != int64(signInRule.After) {
				t.Fatalf("%d reserved at one instant, want %d", ok.Load(), signInRule.After)
			}
			if c, _ := f.store.FindSignInAttempts(f.ctx, "acct:7"); c.Attempts != signInRule.After {
				t.Fatalf("stored %d attempts; refusals must not count", c.Attempts)
			}
			// Waits grow 1 s, 2 s, ...; a day later the key is forgotten.
			if d, _ := signInRule.Reserve(f.ctx, f.store, "acct:7", startTime.Add(time.Second)); d != 0 {
				t.Fatalf("after 1 s: wait %v", d)
			}
			if d, _ := signInRule.Reserve(f.ctx, f.store, "acct:7", startTime.Add(2*time.Second)); d != time.Second {
				t.Fatalf("1 s into a 2 s wait: %v", d)
			}
			if d, _ := signInRule.Reserve(f.ctx, f.store, "acct:7", startTime.Add(25*time.Hour)); d != 0 {
				t.Fatalf("a day later: %v", d)
			}
			if c, _ := f.store.FindSignInAttempts(f.ctx, "acct:7"); c.Attempts != 1 {
				t.Fatalf("forgotten count restarted at %d, want 1", c.Attempts)
			}
		}},
		{"SignIn/PurgeBoundsTheTable", func(t *testing.T, f *fixture) {
			for i := range 10 {
				c := wardload.SignInAttempts{Key: fmt.Sprintf("addr:%02d", i)}
				next := wardload.SignInAttempts{Attempts: 1, Last: startTime.Add(time.Duration(i) * time.Hour)}
				if ok, err := f.store.SwapSignInAttempts(f.ctx, c, next); err != nil || !ok {
					t.Fatalf("insert %d: %v %v", i, ok, err)
				}
			}
			// Older than 3 h after start: keys 00-02 go; then keep 4 of 7:
			// the newest, 06-09.
			n, err := f.store.PurgeSignInAttempts(f.ctx, startTime.Add(3*time.Hour), 4)
			noErr(t, err)
			var kept []string
			for i := range 10 {
				key := fmt.Sprintf("addr:%02d", i)
				if c, _ := f.store.FindSignInAttempts(f.ctx, key); !c.Last.IsZero() {
					kept = append(kept, key)
				}
			}
			if n != 6 || !slices.Equal(kept, []string{"addr:06", "addr:07", "addr:08", "addr:09"}) {
				t.Fatalf("purged %d, kept %v", n, kept)
			}
		}},
		{"SignIn/InstallSecretIsSharedAndKept", func(t *testing.T, f *fixture) {
			a, err := f.store.InstallSecret(f.ctx, "device", []byte("first secret"))
			noErr(t, err)
			b, err := f.store.InstallSecret(f.ctx, "device", []byte("second secret"))
			noErr(t, err)
			c, err := f.store.InstallSecret(f.ctx, "names", []byte("other"))
			noErr(t, err)
			if !bytes.Equal(a, []byte("first secret")) || !bytes.Equal(b, a) || !bytes.Equal(c, []byte("other")) {
				t.Fatalf("secrets %q %q %q", a, b, c)
			}
		}},
		{"Audit/PurgeSecurityEventsOnly", func(t *testing.T, f *fixture) {
			// Data changes made long ago, through the store's own methods:
			// a ward, tiers, shifts, a user, a token and its revocation.
			sw := f.seedWard("w-old")
			u := &wardload.User{Name: "p.purge", Role: wardload.RoleManager, PasswordHash: "x", WardIDs: []int64{sw.ward.ID}}
			noErr(t, f.store.CreateUser(f.ctx, u))
			tok := &wardload.APIToken{Name: "feed", Hash: hashOf("p"), WardIDs: []int64{sw.ward.ID}, CreatedBy: u.ID}
			noErr(t, f.store.CreateToken(f.ctx, tok))
			dataBefore := f.totalAudit()
			// Security events, old and new, and a data-change action
			// appended by hand with an old time: only old security
			// events may go.
			old := startTime.Add(-400 * 24 * time.Hour)
			var oldSecurity []int64
			for i, a := range wardload.SecurityActions() {
				e := &wardload.AuditEntry{At: old.Add(time.Duration(i) * time.Minute), Actor: "x", Action: a, Entity: "user"}
				noErr(t, f.store.AppendAudit(f.ctx, e))
				oldSecurity = append(oldSecurity, e.ID)
				noErr(t, f.store.AppendAudit(f.ctx, &wardload.AuditEntry{Actor: "x", Action: a, Entity: "user"}))
			}
			noErr(t, f.store.AppendAudit(f.ctx, &wardload.AuditEntry{At: old, Actor: "x", Action: wardload.ActionSettingsSave, Entity: "settings"}))
			total := f.totalAudit()

			// An export that fails deletes nothing.
			boom := errors.New("disk full")
			if _, err := f.store.PurgeSecurityAudit(f.ctx, startTime.Add(-365*24*time.Hour), func(*wardload.AuditEntry) error { return boom }); !errors.Is(err, boom) {
				t.Fatalf("failed export: err %v", err)
			}
			if f.totalAudit() != total {
				t.Fatal("rows deleted although the export failed")
			}
			f.clock.Advance(time.Minute)
			// So does an export that fails to finish.
			if _, err := f.store.PurgeSecurityAudit(f.ctx, startTime.Add(-365*24*time.Hour), func(e *wardload.AuditEntry) error {
				if e == nil {
					return boom
				}
				return nil
			}); !errors.Is(err, boom) || f.totalAudit() != total {
				t.Fatalf("unfinished export: err %v, %d rows of %d", err, f.totalAudit(), total)
			}
			var exported []int64
			finished := false
			n, err := f.store.PurgeSecurityAudit(f.ctx, startTime.Add(-365*24*time.Hour), func(e *wardload.AuditEntry) error {
				if e == nil {
					finished = true
				} else {
					exported = append(exported, e.ID)
				}
				return nil
			})
			noErr(t, err)
			if !finished {
				t.Fatal("export not told to finish")
			}
			if n != len(oldSecurity) || !slices.Equal(exported, oldSecurity) {
				t.Fatalf("purged %d, exported %v; want %d, %v (oldest first)", n, exported, len(oldSecurity), oldSecurity)
			}
			if got := f.totalAudit(); got != total-n+1 {
				t.Fatalf("%d rows after the purge, want %d (one for the purge)", got, total-n+1)
			}
			if got := f.totalAudit() - f.auditCount(wardload.ActionAuditPurge) - len(wardload.SecurityActions()) - 1; got != dataBefore {
				t.Fatalf("data-change rows %d after the purge, want all %d", got, dataBefore)
			}
			e := f.checkAudit(wardload.ActionAuditPurge, "audit", 0, 0)
			if want := fmt.Sprintf(`"deleted":%d`, n); !bytes.Contains([]byte(e.After), []byte(want)) {
				t.Fatalf("purge row %s lacks %s", e.After, want)
			}
			// Nothing left to purge: a second run deletes none and,
			// having changed nothing, adds no row.
			n, err = f.store.PurgeSecurityAudit(f.ctx, startTime.Add(-365*24*time.Hour), func(*wardload.AuditEntry) error { return nil })
			noErr(t, err)
			if n != 0 || f.auditCount(wardload.ActionAuditPurge) != 1 {
				t.Fatalf("second purge %d, %d purge rows", n, f.auditCount(wardload.ActionAuditPurge))
			}
		}},
	}
}
