package signin

import (
	"encoding/json"
	"fmt"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func decodeRows(tb testing.TB, es []*wardload.AuditEntry) []FailRow {
	tb.Helper()
	rows := make([]FailRow, len(es))
	for i, e := range es {
		if e.Action != "signin.fail" {
			tb.Errorf("action %q", e.Action)
		}
		if err := json.Unmarshal([]byte(e.After), &rows[i]); err != nil {
			tb.Fatal(err)
		}
	}
	return rows
}

func TestFailTallyWindows(t *testing.T) {
	ft := NewFailTally()
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	pw := func(src string) Attempt {
		return Attempt{Source: src, Account: "n.nurse", AccountID: 7, Reason: "password"}
	}
	// The first failure is written at once.
	es := ft.Record(pw("a"), t0)
	if rows := decodeRows(t, es); len(es) != 1 || rows[0].Count != 1 || es[0].Actor != "n.nurse" || es[0].EntityID != 7 {
		t.Fatalf("first failure: %+v", es)
	}
	// The rest of the window is counted, not written.
	for i := 1; i < 600; i++ {
		a := pw("a")
		a.Reason = "throttled"
		if es := ft.Record(a, t0.Add(time.Duration(i)*time.Second)); len(es) != 0 {
			t.Fatalf("row within the window at %d s", i)
		}
	}
	// The first attempt after the window writes them, itself included.
	es = ft.Record(pw("a"), t0.Add(FailWindow))
	rows := decodeRows(t, es)
	if len(es) != 1 || rows[0].Count != 600 || rows[0].Reasons["throttled"] != 599 || rows[0].Reasons["password"] != 1 ||
		!rows[0].First.Equal(t0.Add(time.Second)) || !rows[0].Last.Equal(t0.Add(FailWindow)) {
		t.Errorf("second window's row: %+v", rows)
	}
	// A source that goes quiet is written by a sweep, run by anybody's
	// attempt once its window is over.
	ft.Record(pw("a"), t0.Add(FailWindow+time.Second))
	es = ft.Record(pw("b"), t0.Add(2*FailWindow+time.Minute))
	rows = decodeRows(t, es)
	// b's own row comes first, then what the sweep found.
	if len(es) != 2 || rows[0].Address != "b" || rows[1].Address != "a" || rows[1].Count != 1 {
		t.Errorf("sweep: %+v", rows)
	}
	// Nothing pending: flush writes nothing and forgets everyone.
	if es := ft.Flush(t0.Add(3 * FailWindow)); len(es) != 0 || len(ft.sources) != 0 {
		t.Errorf("flush with nothing pending: %d rows, %d sources", len(es), len(ft.sources))
	}
}

// TestFailTallyBound: 10,000 attempts over 100 minutes from one source add
// at most one row per window, and every attempt is counted once.
func TestFailTallyBound(t *testing.T) {
	ft := NewFailTally()
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	var es []*wardload.AuditEntry
	for i := range 10_000 {
		es = append(es, ft.Record(Attempt{Source: "a", Reason: "throttled", NameFP: "0badf00d"},
			t0.Add(time.Duration(i)*600*time.Millisecond))...)
	}
	during := len(es)
	es = append(es, ft.Flush(t0.Add(101*time.Minute))...)
	total := 0
	for _, r := range decodeRows(t, es) {
		total += r.Count
	}
	// 10,000 × 0.6 s = 100 minutes: windows opened at 0, 10, ..., 90
	// minutes, and the flush.
	if during != 10 || len(es) != 11 || total != 10_000 {
		t.Errorf("%d rows during, %d in all, counting %d; want 10, 11 and 10000", during, len(es), total)
	}
}

func TestFailTallyNamesAndSources(t *testing.T) {
	ft := NewFailTally()
	ft.maxSources = 2
	t0 := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	for i, a := range []Attempt{
		{Source: "s1", NameFP: "11111111", Reason: "unknown_name"},
		{Source: "s2", Account: "n.nurse", AccountID: 1, Reason: "password"},
		{Source: "s3", Account: "m.manager", AccountID: 2, Reason: "password"}, // table full
		{Source: "s4", NameFP: "22222222", Reason: "unknown_name"},
		{Source: "s1", NameFP: "11111111", Reason: "unknown_name"},
		{Source: "s2", Account: "a.admin", AccountID: 3, Reason: "password", KnownDevice: true},
	} {
		ft.Record(a, t0.Add(time.Duration(i)*time.Second))
	}
	es := ft.Flush(t0.Add(time.Minute))
	rows := decodeRows(t, es)
	got := map[string]string{}
	for i, r := range rows {
		got[r.Address] = fmt.Sprintf("%s %d %v fp=%s unknown=%d known=%d", es[i].Actor, r.Count, r.Accounts, r.NameFP, r.UnknownNames, r.KnownDevice)
	}
	// The first attempts of s1, s2 and the shared entry were written at
	// once; the flush has what came after.
	want := map[string]string{
		"s1":        UnknownName + " 1 [] fp=11111111 unknown=1 known=0",
		"s2":        "a.admin 1 [a.admin] fp= unknown=0 known=1",
		manySources: UnknownName + " 1 [] fp=22222222 unknown=1 known=0",
	}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("rows\n got %v\nwant %v", got, want)
	}
	// Several names in one row: no single actor, accounts listed (at most
	// maxAccountsListed), unknown fingerprints only while there is one.
	ft = NewFailTally()
	ft.Record(Attempt{Source: "x", Reason: "password", Account: "n.nurse"}, t0)
	for i := range 12 {
		ft.Record(Attempt{Source: "x", Reason: "password", Account: fmt.Sprintf("u%02d", i)}, t0)
	}
	ft.Record(Attempt{Source: "x", Reason: "unknown_name", NameFP: "1"}, t0)
	ft.Record(Attempt{Source: "x", Reason: "unknown_name", NameFP: "2"}, t0)
	es = ft.Flush(t0)
	rows = decodeRows(t, es)
	if len(es) != 1 || es[0].Actor != SeveralNames || es[0].EntityID != 0 || len(rows[0].Accounts) != maxAccountsListed ||
		!rows[0].MoreAccounts || rows[0].NameFP != "" || rows[0].UnknownNames != 2 || rows[0].Count != 14 {
		t.Errorf("mixed row %q %+v", es[0].Actor, rows[0])
	}
}
