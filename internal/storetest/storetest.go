// Package storetest is the behavioural contract suite every wardload.Store
// implementation must pass. internal/sqlite and internal/postgres call Run
// from their own tests, so both backends are held to the same behaviour
// with their real database and no mocks.
package storetest

import (
	"cmp"
	"context"
	"slices"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// Run runs the contract suite. newStore returns a fresh, empty, migrated
// store per call, using now as its clock; it should register its own
// cleanup (t.Cleanup) to close the store.
func Run(t *testing.T, newStore func(t *testing.T, now wardload.Clock) wardload.Store) {
	groups := [][]testCase{
		wardCases(),
		tierCases(),
		shiftCases(),
		observationCases(),
		leanCases(),
		versionCases(),
		importCases(),
		censusCases(),
		censusPlannedCases(),
		projectionCases(),
		settingsCases(),
		userCases(),
		passwordCases(),
		tokenCases(),
		auditCases(),
		signInCases(),
		shiftRecordCases(),
		staffingCases(),
		retireCases(),
	}
	for _, g := range groups {
		for _, tc := range g {
			t.Run(tc.name, func(t *testing.T) {
				t.Parallel()
				clk := &Clock{now: startTime}
				f := &fixture{t: t, clock: clk, store: newStore(t, clk.Now)}
				f.ctx = wardload.WithActor(context.Background(), testActor)
				tc.run(t, f)
			})
		}
	}
}

// testCase is one named contract check run against a fresh store.
type testCase struct {
	name string
	run  func(t *testing.T, f *fixture)
}

// startTime has microsecond precision on purpose: PostgreSQL timestamptz
// keeps microseconds, and the suite asserts exact equality.
var startTime = time.Date(2026, 3, 2, 8, 15, 30, 123456000, time.UTC)

// testActor is who the suite's changes are made by; audit rows must name it.
var testActor = wardload.Actor{UserID: 42, Name: "c.nurse"}

// Clock is a settable clock for stores under test.
type Clock struct{ now time.Time }

// Now returns the clock's current time.
func (c *Clock) Now() time.Time { return c.now }

// Advance moves the clock forward by d.
func (c *Clock) Advance(d time.Duration) { c.now = c.now.Add(d) }

// fixture is the per-case state: a fresh store, its clock and a context
// carrying testActor.
type fixture struct {
	t     *testing.T
	store wardload.Store
	clock *Clock
	ctx   context.Context
}

// driverWords must never appear in an error message: messages are shown to
// users, and driver text is both unhelpful and a leak of internals.
var driverWords = []string{"constraint", "sqlite", "SQLSTATE", "sql:", "pgx", "pq:", "UNIQUE", "FOREIGN", "syntax", "SQL logic"}

// wantErr fails unless err carries code (and field, when field is not "")
// and a clean user-facing message.
func wantErr(t *testing.T, err error, code, field string) {
	t.Helper()
	if err == nil {
		t.Fatalf("err = nil, want code %s field %q", code, field)
	}
	if got := wardload.ErrorCode(err); got != code {
		t.Fatalf("code = %s, want %s (err: %v)", got, code, err)
	}
	if field != "" {
		if got := wardload.ErrorField(err); got != field {
			t.Fatalf("field = %q, want %q (err: %v)", got, field, err)
		}
	}
	checkClean(t, err)
}

// checkClean fails if the user-facing message of err leaks driver text or is empty.
func checkClean(t *testing.T, err error) {
	t.Helper()
	msg := wardload.ErrorMessage(err)
	if msg == "" {
		t.Fatalf("empty message for %v", err)
	}
	for _, w := range driverWords {
		if strings.Contains(strings.ToLower(msg), strings.ToLower(w)) {
			t.Fatalf("message %q contains driver text %q", msg, w)
		}
	}
}

// noErr fails the test on a non-nil err.
func noErr(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatalf("unexpected error: %v", err)
	}
}

// sameTime fails unless got and want are the same instant.
func sameTime(t *testing.T, what string, got, want time.Time) {
	t.Helper()
	if !got.Equal(want) {
		t.Fatalf("%s = %v, want %v", what, got, want)
	}
}

//go:fix inline
func ptr[T any](v T) *T { return new(v) }

// auditCount returns the number of audit rows with the given action.
func (f *fixture) auditCount(action string) int {
	f.t.Helper()
	_, n, err := f.store.FindAudit(f.ctx, wardload.AuditFilter{Action: &action})
	noErr(f.t, err)
	return n
}

// auditFor returns every audit row with the given action, by ward ID.
func (f *fixture) auditFor(action string) []*wardload.AuditEntry {
	f.t.Helper()
	es, _, err := f.store.FindAudit(f.ctx, wardload.AuditFilter{Action: &action})
	noErr(f.t, err)
	slices.SortFunc(es, func(a, b *wardload.AuditEntry) int { return cmp.Compare(a.WardID, b.WardID) })
	return es
}

// totalAudit returns the number of audit rows of any kind.
func (f *fixture) totalAudit() int {
	f.t.Helper()
	_, n, err := f.store.FindAudit(f.ctx, wardload.AuditFilter{})
	noErr(f.t, err)
	return n
}

// lastAudit returns the newest audit row with the given action.
func (f *fixture) lastAudit(action string) *wardload.AuditEntry {
	f.t.Helper()
	es, n, err := f.store.FindAudit(f.ctx, wardload.AuditFilter{Action: &action, Limit: 1})
	noErr(f.t, err)
	if n == 0 || len(es) == 0 {
		f.t.Fatalf("no audit row with action %q", action)
	}
	return es[0]
}

// checkAudit asserts the newest row of action names the test actor, the
// entity and the clock's time.
func (f *fixture) checkAudit(action, entity string, entityID, wardID int64) *wardload.AuditEntry {
	f.t.Helper()
	e := f.lastAudit(action)
	if e.UserID != testActor.UserID || e.Actor != testActor.Name {
		f.t.Fatalf("audit %s actor = %d/%q, want %d/%q", action, e.UserID, e.Actor, testActor.UserID, testActor.Name)
	}
	if e.Entity != entity || e.EntityID != entityID || e.WardID != wardID {
		f.t.Fatalf("audit %s entity = %s/%d ward %d, want %s/%d ward %d", action, e.Entity, e.EntityID, e.WardID, entity, entityID, wardID)
	}
	sameTime(f.t, "audit At", e.At, f.clock.Now())
	return e
}
