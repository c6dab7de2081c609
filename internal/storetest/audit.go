package storetest

import (
	"context"
	"encoding/json"
	"slices"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func auditCases() []testCase {
	return []testCase{
		{"Audit/AppendAndFilter", func(t *testing.T, f *fixture) {
			e1 := &wardload.AuditEntry{UserID: 1, Actor: "x.one", Action: "signin.fail", Entity: "user", EntityID: 1}
			noErr(t, f.store.AppendAudit(f.ctx, e1))
			if e1.ID == 0 {
				t.Fatal("ID not set")
			}
			sameTime(t, "At from clock", e1.At, startTime)
			at := startTime.Add(-48 * time.Hour)
			e2 := &wardload.AuditEntry{At: at, UserID: 2, Actor: "x.two", Action: "census.create", Entity: "census", EntityID: 5, WardID: 7, After: `{"a":1}`}
			noErr(t, f.store.AppendAudit(f.ctx, e2))
			sameTime(t, "explicit At kept", e2.At, at)
			f.clock.Advance(time.Hour)
			e3 := &wardload.AuditEntry{UserID: 2, Actor: "x.two", Action: "census.create", Entity: "census", EntityID: 6, WardID: 8, Before: `{"b":2}`}
			noErr(t, f.store.AppendAudit(f.ctx, e3))

			es, n, err := f.store.FindAudit(f.ctx, wardload.AuditFilter{})
			noErr(t, err)
			if n != 3 || !slices.Equal(auditIDs(es), []int64{e3.ID, e1.ID, e2.ID}) {
				t.Fatalf("newest first = %d %v", n, auditIDs(es))
			}
			got := es[2]
			if got.UserID != 2 || got.Actor != "x.two" || got.Action != "census.create" || got.Entity != "census" || got.EntityID != 5 || got.WardID != 7 || got.Before != "" || got.After != `{"a":1}` {
				t.Fatalf("round trip = %+v", got)
			}
			sameTime(t, "At reread", got.At, at)

			uid := int64(2)
			for _, tc := range []struct {
				name string
				f    wardload.AuditFilter
				want []int64
				tot  int
			}{
				{"wards", wardload.AuditFilter{WardIDs: []int64{7, 8}}, []int64{e3.ID, e2.ID}, 2},
				{"one ward", wardload.AuditFilter{WardIDs: []int64{8}}, []int64{e3.ID}, 1},
				{"user", wardload.AuditFilter{UserID: &uid}, []int64{e3.ID, e2.ID}, 2},
				{"action", wardload.AuditFilter{Action: new("signin.fail")}, []int64{e1.ID}, 1},
				{"entity", wardload.AuditFilter{Entity: new("census")}, []int64{e3.ID, e2.ID}, 2},
				{"from inclusive", wardload.AuditFilter{From: new(startTime)}, []int64{e3.ID, e1.ID}, 2},
				{"to exclusive", wardload.AuditFilter{To: new(startTime)}, []int64{e2.ID}, 1},
				{"page", wardload.AuditFilter{Offset: 1, Limit: 1}, []int64{e1.ID}, 3},
			} {
				es, n, err := f.store.FindAudit(f.ctx, tc.f)
				noErr(t, err)
				if n != tc.tot || !slices.Equal(auditIDs(es), tc.want) {
					t.Errorf("%s: %d %v, want %d %v", tc.name, n, auditIDs(es), tc.tot, tc.want)
				}
			}
		}},
		{"Audit/SystemActorAndJSON", func(t *testing.T, f *fixture) {
			// Without an actor in the context, changes are made by "system".
			w := &wardload.Ward{Code: "w1", Name: "W", TimeZone: "UTC"}
			noErr(t, f.store.CreateWard(context.Background(), w))
			e := f.lastAudit("ward.create")
			if e.UserID != 0 || e.Actor != "system" {
				t.Fatalf("actor = %d %q, want 0 system", e.UserID, e.Actor)
			}
			if !json.Valid([]byte(e.After)) {
				t.Fatalf("After is not JSON: %q", e.After)
			}
			_, err := f.store.UpdateWard(f.ctx, w.ID, wardload.WardUpdate{Name: new("W2")})
			noErr(t, err)
			e = f.lastAudit("ward.update")
			if !json.Valid([]byte(e.Before)) || !json.Valid([]byte(e.After)) {
				t.Fatalf("update audit not JSON: %q / %q", e.Before, e.After)
			}
		}},
	}
}

func auditIDs(es []*wardload.AuditEntry) []int64 {
	var ids []int64
	for _, e := range es {
		ids = append(ids, e.ID)
	}
	return ids
}
