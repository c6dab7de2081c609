package storetest

import (
	"reflect"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// hashOf returns a 64-character stand-in for a hex SHA-256.
func hashOf(c string) string { return strings.Repeat(c, 64) }

func tokenCases() []testCase {
	return []testCase{
		{"Token/CreateFindRevokeTouch", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			tok := &wardload.APIToken{Name: "roster-planner", Hash: hashOf("a"), WardIDs: []int64{w2.ward.ID, w1.ward.ID}, CreatedBy: 3}
			noErr(t, f.store.CreateToken(f.ctx, tok))
			if tok.ID == 0 {
				t.Fatal("ID not set")
			}
			sameTime(t, "CreatedAt", tok.CreatedAt, f.clock.Now())
			// One audit row per ward of the token, so each ward's managers see it.
			creates := f.auditFor("token.create")
			if len(creates) != 2 || !reflect.DeepEqual([]int64{creates[0].WardID, creates[1].WardID}, []int64{w1.ward.ID, w2.ward.ID}) {
				t.Fatalf("token.create audit rows %+v, want one for each of wards %d and %d", creates, w1.ward.ID, w2.ward.ID)
			}
			for _, e := range creates {
				if e.Entity != "token" || e.EntityID != tok.ID || e.UserID != testActor.UserID {
					t.Fatalf("token.create audit %+v", e)
				}
				if strings.Contains(e.After, hashOf("a")) || !strings.Contains(e.After, "roster-planner") {
					t.Fatalf("token.create audit %q: must name the token and never hold its hash", e.After)
				}
			}
			for _, get := range []func() (*wardload.APIToken, error){
				func() (*wardload.APIToken, error) { return f.store.FindTokenByHash(f.ctx, hashOf("a")) },
				func() (*wardload.APIToken, error) { return f.store.FindTokenByName(f.ctx, "roster-planner") },
			} {
				got, err := get()
				noErr(t, err)
				if got.ID != tok.ID || got.Name != tok.Name || got.Hash != tok.Hash || got.CreatedBy != 3 ||
					!reflect.DeepEqual(got.WardIDs, []int64{w1.ward.ID, w2.ward.ID}) || !got.LastUsedAt.IsZero() || !got.Active() {
					t.Fatalf("got %+v", got)
				}
				sameTime(t, "CreatedAt reread", got.CreatedAt, startTime)
			}

			used := startTime.Add(90 * time.Minute)
			before := f.totalAudit()
			noErr(t, f.store.TouchToken(f.ctx, tok.ID, used))
			if n := f.totalAudit(); n != before {
				t.Fatal("TouchToken wrote an audit row; it must not")
			}
			got, _ := f.store.FindTokenByName(f.ctx, "roster-planner")
			sameTime(t, "LastUsedAt", got.LastUsedAt, used)
			wantErr(t, f.store.TouchToken(f.ctx, 9999, used), wardload.ENOTFOUND, "")

			f.clock.Advance(3 * time.Hour)
			noErr(t, f.store.RevokeToken(f.ctx, tok.ID))
			got, err := f.store.FindTokenByHash(f.ctx, hashOf("a"))
			noErr(t, err)
			if got.Active() {
				t.Fatal("revoked token still active")
			}
			sameTime(t, "RevokedAt", got.RevokedAt, f.clock.Now())
			wantErr(t, f.store.RevokeToken(f.ctx, tok.ID), wardload.ECONFLICT, "")
			wantErr(t, f.store.RevokeToken(f.ctx, 9999), wardload.ENOTFOUND, "")
			if revokes := f.auditFor("token.revoke"); len(revokes) != 2 || revokes[0].EntityID != tok.ID || revokes[0].WardID == revokes[1].WardID {
				t.Fatalf("token.revoke rows = %+v, want one per ward", revokes)
			}
		}},
		{"Token/Errors", func(t *testing.T, f *fixture) {
			w := f.seedWard("w1")
			noErr(t, f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "one", Hash: hashOf("a"), WardIDs: []int64{w.ward.ID}}))
			before := f.totalAudit()
			wantErr(t, f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "Bad Name", Hash: hashOf("b"), WardIDs: []int64{w.ward.ID}}), wardload.EINVALID, "name")
			wantErr(t, f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "two", Hash: "short", WardIDs: []int64{w.ward.ID}}), wardload.EINVALID, "hash")
			wantErr(t, f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "two", Hash: hashOf("b")}), wardload.EINVALID, "wards")
			wantErr(t, f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "two", Hash: hashOf("b"), WardIDs: []int64{9999}}), wardload.ENOTFOUND, "wards")
			wantErr(t, f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "one", Hash: hashOf("b"), WardIDs: []int64{w.ward.ID}}), wardload.ECONFLICT, "name")
			err := f.store.CreateToken(f.ctx, &wardload.APIToken{Name: "two", Hash: hashOf("a"), WardIDs: []int64{w.ward.ID}})
			wantErr(t, err, wardload.ECONFLICT, "")
			if strings.Contains(wardload.ErrorMessage(err), hashOf("a")) {
				t.Fatal("conflict message echoes the token hash")
			}
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after failures", before, n)
			}
			_, err = f.store.FindTokenByHash(f.ctx, hashOf("z"))
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.FindTokenByName(f.ctx, "two")
			wantErr(t, err, wardload.ENOTFOUND, "")
		}},
		{"Token/FindTokens", func(t *testing.T, f *fixture) {
			w1, w2 := f.seedWard("w1"), f.seedWard("w2")
			for i, tk := range []*wardload.APIToken{
				{Name: "zeta", WardIDs: []int64{w1.ward.ID}},
				{Name: "alpha", WardIDs: []int64{w1.ward.ID, w2.ward.ID}},
				{Name: "mid", WardIDs: []int64{w2.ward.ID}},
			} {
				tk.Hash = hashOf(string(rune('a' + i)))
				noErr(t, f.store.CreateToken(f.ctx, tk))
			}
			names := func(wardID int64) string {
				t.Helper()
				ts, err := f.store.FindTokens(f.ctx, wardID)
				noErr(t, err)
				var s []string
				for _, tk := range ts {
					s = append(s, tk.Name)
				}
				return strings.Join(s, ",")
			}
			if got := names(0); got != "alpha,mid,zeta" {
				t.Fatalf("all = %s", got)
			}
			if got := names(w1.ward.ID); got != "alpha,zeta" {
				t.Fatalf("ward 1 = %s", got)
			}
			ts, _ := f.store.FindTokens(f.ctx, w2.ward.ID)
			if len(ts) != 2 || !reflect.DeepEqual(ts[0].WardIDs, []int64{w1.ward.ID, w2.ward.ID}) {
				t.Fatalf("FindTokens must load all wards of each token: %+v", ts)
			}
		}},
		{"Token/CreateIgnoresCallerTimes", func(t *testing.T, f *fixture) {
			w := f.seedWard("w1")
			past := startTime.Add(-time.Hour)
			tok := &wardload.APIToken{Name: "planner", Hash: hashOf("a"), WardIDs: []int64{w.ward.ID}, LastUsedAt: past, RevokedAt: past}
			noErr(t, f.store.CreateToken(f.ctx, tok))
			if !tok.Active() || !tok.LastUsedAt.IsZero() {
				t.Fatalf("new token returned revoked %v, last used %v; want active and unused, as stored", tok.RevokedAt, tok.LastUsedAt)
			}
			if e := f.lastAudit("token.create"); !strings.Contains(e.After, `"RevokedAt":"0001-01-01T00:00:00Z"`) {
				t.Fatalf("token.create audit %q: want the token as stored, not revoked", e.After)
			}
		}},
	}
}
