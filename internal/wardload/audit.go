package wardload

import (
	"context"
	"time"
)

// AuditEntry records one change: who, when, what, and the entity before and
// after as JSON. Audit rows are only ever appended.
type AuditEntry struct {
	ID       int64
	At       time.Time
	UserID   int64  // 0 for the system or the command line
	Actor    string // user name, "system" or "cli"
	Action   string // e.g. "census.create", "observation.exclude", "signin.fail"
	Entity   string // e.g. "census", "observation", "user"
	EntityID int64
	WardID   int64  // 0 when not ward-specific
	Before   string // JSON, "" when created
	After    string // JSON, "" when nothing remains
}

// Audit actions of the changes stores make; the server adds its own for
// events such as sign-ins (AppendAudit).
const (
	ActionWardCreate         = "ward.create"
	ActionWardUpdate         = "ward.update"
	ActionTierCreate         = "tier.create"
	ActionTierUpdate         = "tier.update"
	ActionShiftCreate        = "shift.create"
	ActionShiftUpdate        = "shift.update"
	ActionUserCreate         = "user.create"
	ActionUserUpdate         = "user.update"
	ActionTokenCreate        = "token.create"
	ActionTokenRevoke        = "token.revoke"
	ActionObservationImport  = "observation.import"
	ActionObservationExclude = "observation.exclude"
	ActionObservationRestore = "observation.restore"
	ActionCensusCreate       = "census.create"
	ActionProjectionCreate   = "projection.create"
	ActionSettingsSave       = "settings.save"
	ActionShiftRecordCreate  = "shift_record.create"
)

// AuditFilter selects audit entries. Zero fields do not filter.
type AuditFilter struct {
	WardIDs  []int64 // any of these wards
	UserID   *int64
	Action   *string
	Entity   *string
	From, To *time.Time // At in [From, To)
	Offset   int
	Limit    int
}

// AuditService reads and appends the audit log. There is deliberately no
// way to change or delete an entry.
type AuditService interface {
	// AppendAudit stores e and sets ID and, if zero, At.
	AppendAudit(ctx context.Context, e *AuditEntry) error
	// FindAudit returns matches newest first and the total count.
	FindAudit(ctx context.Context, f AuditFilter) ([]*AuditEntry, int, error)
}

// Actor is who is making a change, carried in the context so that every
// store method can write its audit row in the same transaction.
type Actor struct {
	UserID int64
	Name   string
}

type actorKey struct{}

// WithActor returns a context that carries a.
func WithActor(ctx context.Context, a Actor) context.Context {
	return context.WithValue(ctx, actorKey{}, a)
}

// ActorFrom returns the actor in ctx, or {0, "system"}.
func ActorFrom(ctx context.Context) Actor {
	if a, ok := ctx.Value(actorKey{}).(Actor); ok {
		return a
	}
	return Actor{Name: "system"}
}
