package signin

import (
	"encoding/json"
	"maps"
	"slices"
	"sync"
	"time"

	"wardload/internal/wardload"
)

// FailTally summarises failed and refused sign-ins for the audit log, so
// that anonymous clients cannot flood it: each source (client address)
// gets at most one "signin.fail" row per window, carrying how many
// attempts it covers and why they failed.
//
// The first failure from a quiet source is written at once (count 1), so
// a single mistyped password shows in the log straight away, and opens the
// source's window. Further attempts in the window are only counted in
// memory; the first attempt after the window writes them all, itself
// included, as the next row and opens the next window. A periodic sweep,
// run from Record at most once a minute, writes the count of a source that
// has gone quiet once its window is over, and drop finished sources; Flush
// writes every pending count, at shutdown.
//
// At most maxSources sources are tracked apart; attempts from further
// sources while the table is full share one entry (address "(many
// sources)"), so a flood from many addresses also adds a bounded number of
// rows per window. Counts not yet written are lost if the process dies.
type FailTally struct {
	window     time.Duration
	maxSources int

	mu        sync.Mutex
	sources   map[string]*failSource
	lastSweep time.Time
}

// FailWindow is the audit window per source; failSources the number of
// sources summarised apart. Both common practice, no source.
const (
	FailWindow  = 10 * time.Minute
	failSources = 1000
	// manySources stands for the sources beyond failSources.
	manySources = "(many sources)"
	// UnknownName is the actor of a row whose attempts all named no
	// account: what was typed may be a password, so it is never stored.
	UnknownName = "(unknown name)"
	// SeveralNames is the actor of a row covering several names.
	SeveralNames = "(several names)"
	// maxAccountsListed bounds the account names one row lists.
	maxAccountsListed = 8
)

// Attempt is one failed or refused sign-in.
type Attempt struct {
	Source      string // the client address it is counted against
	Account     string // the account's name; "" when the name is unknown
	AccountID   int64
	NameFP      string // fingerprint of an unknown name
	Reason      string // password, unknown_name, disabled, bad_hash, throttled, busy
	KnownDevice bool   // it carried a valid device cookie for the account
}

// failSource is what one source has done since its last row.
type failSource struct {
	opened      time.Time // when its last row was written; zero: none yet
	n           int
	first, last time.Time
	reasons     map[string]int
	knownDevice int
	accounts    []string // known accounts named, at most maxAccountsListed
	accountID   int64    // of accounts[0]
	moreAccts   bool
	unknown     int    // attempts with a name that matches no account
	nameFP      string // of the unknown names, while they are all one
	manyFPs     bool
}

// FailRow is the JSON of a summary row (the entry's After).
type FailRow struct {
	Address      string         `json:"address"`
	Count        int            `json:"count"`
	First        time.Time      `json:"first"`
	Last         time.Time      `json:"last"`
	Reasons      map[string]int `json:"reasons"`
	Accounts     []string       `json:"accounts,omitempty"`
	MoreAccounts bool           `json:"more_accounts,omitempty"`
	UnknownNames int            `json:"unknown_names,omitempty"`
	NameFP       string         `json:"unknown_name_fingerprint,omitempty"`
	KnownDevice  int            `json:"known_device,omitempty"`
	Window       string         `json:"window"`
}

// NewFailTally returns a tally with the windows and bounds above.
func NewFailTally() *FailTally {
	return &FailTally{window: FailWindow, maxSources: failSources, sources: map[string]*failSource{}}
}

// Record counts a at now. It returns the rows now due: a's source's when
// its window is over (or it had none), and any a sweep finds.
func (t *FailTally) Record(a Attempt, now time.Time) []*wardload.AuditEntry {
	t.mu.Lock()
	defer t.mu.Unlock()
	key := a.Source
	s := t.sources[key]
	if s == nil && len(t.sources) >= t.maxSources {
		key = manySources
		s = t.sources[key]
	}
	if s == nil {
		s = &failSource{}
		t.sources[key] = s
	}
	s.add(a, now)
	var rows []*wardload.AuditEntry
	if s.opened.IsZero() || !now.Before(s.opened.Add(t.window)) {
		rows = append(rows, t.take(key, s, now))
	}
	if now.Sub(t.lastSweep) >= time.Minute {
		t.lastSweep = now
		rows = append(rows, t.sweepLocked(now, false)...)
	}
	return rows
}

// Flush returns a row for every source with attempts not yet written,
// windows or not, and forgets every source.
func (t *FailTally) Flush(now time.Time) []*wardload.AuditEntry {
	t.mu.Lock()
	defer t.mu.Unlock()
	rows := t.sweepLocked(now, true)
	clear(t.sources)
	return rows
}

// sweepLocked writes the rows of sources whose window is over (all: every
// source) and drops finished sources with nothing pending. mu is held.
func (t *FailTally) sweepLocked(now time.Time, all bool) []*wardload.AuditEntry {
	var rows []*wardload.AuditEntry
	for _, key := range slices.Sorted(maps.Keys(t.sources)) {
		s := t.sources[key]
		over := !now.Before(s.opened.Add(t.window))
		switch {
		case s.n > 0 && (all || over):
			rows = append(rows, t.take(key, s, now))
		case s.n == 0 && over:
			delete(t.sources, key)
		}
	}
	return rows
}

func (s *failSource) add(a Attempt, now time.Time) {
	if s.n == 0 {
		s.first = now
		s.reasons = map[string]int{}
	}
	s.n++
	s.last = now
	s.reasons[a.Reason]++
	if a.KnownDevice {
		s.knownDevice++
	}
	if a.Account == "" {
		if s.unknown == 0 {
			s.nameFP = a.NameFP
		} else if s.nameFP != a.NameFP {
			s.manyFPs = true
		}
		s.unknown++
		return
	}
	if slices.Contains(s.accounts, a.Account) {
		return
	}
	if len(s.accounts) == maxAccountsListed {
		s.moreAccts = true
		return
	}
	if len(s.accounts) == 0 {
		s.accountID = a.AccountID
	}
	s.accounts = append(s.accounts, a.Account)
}

// take builds key's row from s, empties s and opens its next window.
func (t *FailTally) take(key string, s *failSource, now time.Time) *wardload.AuditEntry {
	row := FailRow{Address: key, Count: s.n, First: s.first.UTC(), Last: s.last.UTC(), Reasons: s.reasons,
		Accounts: s.accounts, MoreAccounts: s.moreAccts, UnknownNames: s.unknown,
		KnownDevice: s.knownDevice, Window: t.window.String()}
	if s.unknown > 0 && !s.manyFPs {
		row.NameFP = s.nameFP
	}
	e := &wardload.AuditEntry{At: now, Action: wardload.ActionSignInFail, Entity: "user"}
	switch {
	case len(s.accounts) == 1 && s.unknown == 0 && !s.moreAccts:
		e.Actor, e.EntityID = s.accounts[0], s.accountID
	case len(s.accounts) == 0:
		e.Actor = UnknownName
	default:
		e.Actor = SeveralNames
	}
	b, err := json.Marshal(row)
	if err != nil { // a struct of strings, ints and times: cannot happen
		b = []byte(`{}`)
	}
	e.After = string(b)
	*s = failSource{opened: now}
	return e
}
