package wardload

import (
	"context"
	"time"
)

// Store is everything wardload keeps. internal/sqlite and internal/postgres
// implement it and pass the same contract suite (internal/storetest).
//
// Every method that changes data writes an AuditEntry in the same
// transaction, naming ActorFrom(ctx), the action, the entity and its JSON
// before/after; if either fails, neither is stored.
type Store interface {
	WardService
	TierService
	ShiftService
	ObservationService
	CensusService
	ProjectionService
	SettingsService
	UserService
	TokenService
	AuditService
	SignInService
	ShiftRecordService
	WardVersionService
	PlannedStaffService

	// Ping returns an error if the database cannot be reached.
	Ping(ctx context.Context) error
	// Close releases the database.
	Close() error
}

// Clock returns the current time. Stores and the server take one so tests
// can fix time; production passes time.Now.
type Clock func() time.Time
