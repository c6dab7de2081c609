package wardload

import "context"

// WardVersion names the state of a ward's data (its settings, tiers, shift
// patterns, observations and their review state, censuses and
// projections) by the ward's audit rows: how many there are and the
// newest one's ID. Results computed from that data can be cached under
// it and reused without reading the data again.
//
// Why it is sound: every store method that changes a ward's data writes
// at least one audit row naming the ward in the same transaction (Store;
// an import spanning several wards writes one per ward), and audit rows
// are never changed; the only ones ever deleted are security events
// (SecurityActions, by a retention purge). So Entries grows with every
// committed change, and equal versions mean no change committed in
// between. Entries rather than LastID alone, because on PostgreSQL IDs
// come from a sequence and a transaction holding a lower ID can commit
// after one holding a higher ID. A purge of security events naming the
// ward only lowers Entries at the same LastID: a pair not seen before,
// so the worst it costs is a recomputation. Read the version before the data it
// keys: a change committed in between then gives data newer than the
// key, which only costs a recomputation once the key moves on.
type WardVersion struct {
	Entries int64 // the ward's audit rows
	LastID  int64 // the newest of them; 0 with none
}

// WardVersionService reads a ward's data version.
type WardVersionService interface {
	// WardVersion returns the version of ward id's data. A ward that does
	// not exist has the zero version.
	WardVersion(ctx context.Context, wardID int64) (WardVersion, error)
}
