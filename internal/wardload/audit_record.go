package wardload

import (
	"context"
	"encoding/json"
	"fmt"
	"time"
)

// Audited is a domain value the audit log records the changes of. Only
// this package's types implement it, so the rules of what an audit row
// names and keeps live here, once, for every store.
type Audited interface {
	auditRecord() auditRecord
}

// auditRecord is what a row says about one value: the entity, its ID,
// the wards whose logs show it (none: one row with ward 0) and the view
// written as JSON (nil: nothing, as before a create).
type auditRecord struct {
	entity string
	id     int64
	wards  []int64
	view   any
}

// NewAudit returns the audit rows of one change made at at by the actor in
// ctx. before and after are the entity's values around the change (nil
// for none: nothing is before a create). The rows name the entity, its ID
// and its ward, and keep of each value only what the log may hold: a user
// without the password hash, a token without its hash, a projection
// without its Input and Result (stored once, in the projection), ward
// settings that were never saved as nothing. A token's change gives one
// row per ward it may read, so that each ward's managers see it.
func NewAudit(ctx context.Context, at time.Time, action string, before, after Audited) ([]*AuditEntry, error) {
	var b, a auditRecord
	if before != nil {
		b = before.auditRecord()
	}
	if after != nil {
		a = after.auditRecord()
	}
	subject := a
	if after == nil {
		subject = b
	}
	bj, err := auditJSON(b.view)
	if err != nil {
		return nil, err
	}
	aj, err := auditJSON(a.view)
	if err != nil {
		return nil, err
	}
	actor := ActorFrom(ctx)
	wards := subject.wards
	if len(wards) == 0 {
		wards = []int64{0}
	}
	es := make([]*AuditEntry, len(wards))
	for i, w := range wards {
		es[i] = &AuditEntry{
			At: at, UserID: actor.UserID, Actor: actor.Name, Action: action,
			Entity: subject.entity, EntityID: subject.id, WardID: w, Before: bj, After: aj,
		}
	}
	return es, nil
}

func auditJSON(v any) (string, error) {
	if v == nil {
		return "", nil
	}
	b, err := json.Marshal(v)
	if err != nil {
		return "", fmt.Errorf("audit json: %w", err)
	}
	return string(b), nil
}

func (w *Ward) auditRecord() auditRecord {
	return auditRecord{"ward", w.ID, []int64{w.ID}, w}
}

func (t *Tier) auditRecord() auditRecord {
	return auditRecord{"tier", t.ID, []int64{t.WardID}, t}
}

func (p *ShiftPattern) auditRecord() auditRecord {
	return auditRecord{"shift", p.ID, []int64{p.WardID}, p}
}

func (o *Observation) auditRecord() auditRecord {
	return auditRecord{"observation", o.ID, []int64{o.WardID}, o}
}

func (c *Census) auditRecord() auditRecord {
	return auditRecord{"census", c.ID, []int64{c.WardID}, c}
}

// auditRecord leaves out Input and Result, which are large and stored
// once, in the projection itself.
func (p *Projection) auditRecord() auditRecord {
	v := *p
	v.Input, v.Result = "", ""
	return auditRecord{"projection", p.ID, []int64{p.WardID}, &v}
}

// auditRecord of settings never saved (the defaults) keeps nothing: a
// first save has nothing before it.
func (s *Settings) auditRecord() auditRecord {
	r := auditRecord{"settings", s.WardID, []int64{s.WardID}, s}
	if s.UpdatedAt.IsZero() {
		r.view = nil
	}
	return r
}

// userAudit is what the audit log keeps of a user: everything but the
// password hash, which must never be copied anywhere else.
type userAudit struct {
	ID        int64
	Name      string
	Role      string
	Disabled  bool
	WardIDs   []int64
	CreatedAt time.Time
	// A password change or reset shows as PasswordChanges going up by one
	// (and, for an admin's reset, MustChangePassword set): that it
	// happened, never what the password or its hash is.
	MustChangePassword bool
	PasswordChanges    int64
}

// auditRecord of a user is not ward-specific: ward 0.
func (u *User) auditRecord() auditRecord {
	return auditRecord{"user", u.ID, nil, userAudit{u.ID, u.Name, u.Role, u.Disabled, wardList(u.WardIDs), u.CreatedAt,
		u.MustChangePassword, u.PasswordChanges}}
}

// wardList is ids for the audit JSON, where no wards is [] whether a
// store read them as nil or as empty.
func wardList(ids []int64) []int64 {
	if ids == nil {
		return []int64{}
	}
	return ids
}

// tokenAudit is what the audit log keeps of a token: never its hash.
type tokenAudit struct {
	ID        int64
	Name      string
	WardIDs   []int64
	CreatedBy int64
	CreatedAt time.Time
	RevokedAt time.Time
	// WriteStaffing is left out for read-only tokens, whose rows read as
	// they did before tokens could write.
	WriteStaffing bool `json:",omitempty"`
}

func (t *APIToken) auditRecord() auditRecord {
	return auditRecord{"token", t.ID, t.WardIDs, tokenAudit{t.ID, t.Name, wardList(t.WardIDs), t.CreatedBy, t.CreatedAt, t.RevokedAt, t.WriteStaffing}}
}
