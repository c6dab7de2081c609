package wardload

import (
	"context"
	"encoding/json"
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
	ActionWardRetire         = "ward.retire"
	ActionWardReinstate      = "ward.reinstate"
	ActionTierRetire         = "tier.retire"
	ActionTierReinstate      = "tier.reinstate"
	ActionShiftRetire        = "shift.retire"
	ActionShiftReinstate     = "shift.reinstate"
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
	ActionStaffingPlan       = "staffing.plan"
)

// Audit actions of security events, which the server writes itself.
const (
	ActionSignInOK   = "signin.ok"   // a sign-in that succeeded
	ActionSignInFail = "signin.fail" // a summary of failed or refused sign-ins
	ActionSignOut    = "signout"
	ActionAPIRefused = "api.refused" // a revoked API token was used
	// ActionAuditPurge records a purge of security events; it is not one
	// itself, so the record of a purge is never purged.
	ActionAuditPurge = "audit.purge"
)

// SecurityActions are the actions a retention rule may purge
// (PurgeSecurityAudit): who signed in and out and what was refused. Every
// other action records a change of data and is kept for good.
func SecurityActions() []string {
	return []string{ActionSignInOK, ActionSignInFail, ActionSignOut, ActionAPIRefused}
}

// AuditPurge is the After of an ActionAuditPurge entry.
type AuditPurge struct {
	Before  time.Time `json:"before"`
	Deleted int       `json:"deleted"`
	Actions []string  `json:"actions"`
}

// NewAuditPurge returns the entry that records a purge of deleted security
// events older than before, made at at by the actor in ctx.
func NewAuditPurge(ctx context.Context, at, before time.Time, deleted int) (*AuditEntry, error) {
	b, err := json.Marshal(AuditPurge{Before: before.UTC(), Deleted: deleted, Actions: SecurityActions()})
	if err != nil {
		return nil, err
	}
	a := ActorFrom(ctx)
	return &AuditEntry{At: at, UserID: a.UserID, Actor: a.Name, Action: ActionAuditPurge, Entity: "audit", After: string(b)}, nil
}

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
	// PurgeSecurityAudit deletes the entries older than before whose action
	// is one of SecurityActions, and only those: the audit of data changes
	// stays complete. Each entry is passed to export, oldest first, and
	// then nil, for export to finish (flush, sync) before anything is
	// deleted; if any call fails, nothing is. A purge that deletes
	// anything is audited (ActionAuditPurge, by the actor in ctx, with the
	// count and the cut-off); one that finds nothing changes nothing, so
	// hourly runs do not grow the log. It returns how many it deleted.
	PurgeSecurityAudit(ctx context.Context, before time.Time, export func(*AuditEntry) error) (int, error)
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
