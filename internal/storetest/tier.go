package storetest

import (
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func tierCases() []testCase {
	return []testCase{
		{"Tier/CreateFindUpdate", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			t1 := sw.tiers[0]
			got, err := f.store.FindTierByID(f.ctx, t1.ID)
			noErr(t, err)
			if *got != *t1 {
				t.Fatalf("got %+v, want %+v", got, t1)
			}
			ts, err := f.store.FindTiers(f.ctx, sw.ward.ID)
			noErr(t, err)
			if tierCodes(ts) != "t2,t1,t3" {
				t.Fatalf("order = %s, want display order t2,t1,t3", tierCodes(ts))
			}
			f.checkAudit("tier.create", "tier", sw.tiers[2].ID, sw.ward.ID)

			up, err := f.store.UpdateTier(f.ctx, t1.ID, wardload.TierUpdate{Label: new("High"), Description: new("Needs two nurses to turn"), DisplayOrder: new(9)})
			noErr(t, err)
			if up.Label != "High" || up.Description != "Needs two nurses to turn" || up.DisplayOrder != 9 || up.Code != "t1" || up.WardID != sw.ward.ID {
				t.Fatalf("updated = %+v", up)
			}
			ts, _ = f.store.FindTiers(f.ctx, sw.ward.ID)
			if tierCodes(ts) != "t2,t3,t1" {
				t.Fatalf("order after update = %s", tierCodes(ts))
			}
			e := f.checkAudit("tier.update", "tier", t1.ID, sw.ward.ID)
			if !strings.Contains(e.Before, "Tier 1") || !strings.Contains(e.After, "High") {
				t.Fatalf("audit = %q / %q", e.Before, e.After)
			}
			_, err = f.store.UpdateTier(f.ctx, t1.ID, wardload.TierUpdate{Label: new("")})
			wantErr(t, err, wardload.EINVALID, "label")
			if n := f.auditCount("tier.update"); n != 1 {
				t.Fatalf("tier.update rows = %d after failed update", n)
			}
		}},
		{"Tier/TiesOrderedByCode", func(t *testing.T, f *fixture) {
			w := &wardload.Ward{Code: "w1", Name: "W", TimeZone: "UTC"}
			noErr(t, f.store.CreateWard(f.ctx, w))
			for _, c := range []string{"zz", "aa", "mm"} {
				noErr(t, f.store.CreateTier(f.ctx, &wardload.Tier{WardID: w.ID, Code: c, Label: c}))
			}
			ts, err := f.store.FindTiers(f.ctx, w.ID)
			noErr(t, err)
			if tierCodes(ts) != "aa,mm,zz" {
				t.Fatalf("order = %s", tierCodes(ts))
			}
			ts, err = f.store.FindTiers(f.ctx, 9999)
			noErr(t, err)
			if len(ts) != 0 {
				t.Fatalf("unknown ward: %d tiers, want empty list", len(ts))
			}
		}},
		{"Tier/Errors", func(t *testing.T, f *fixture) {
			sw := f.seedWard("w1")
			other := f.seedWard("w2")
			before := f.totalAudit()
			wantErr(t, f.store.CreateTier(f.ctx, &wardload.Tier{WardID: sw.ward.ID, Code: "T 1", Label: "x"}), wardload.EINVALID, "code")
			wantErr(t, f.store.CreateTier(f.ctx, &wardload.Tier{WardID: sw.ward.ID, Code: "t9", Label: ""}), wardload.EINVALID, "label")
			wantErr(t, f.store.CreateTier(f.ctx, &wardload.Tier{WardID: 9999, Code: "t9", Label: "x"}), wardload.ENOTFOUND, "")
			wantErr(t, f.store.CreateTier(f.ctx, &wardload.Tier{WardID: sw.ward.ID, Code: "t1", Label: "x"}), wardload.ECONFLICT, "code")
			_, err := f.store.FindTierByID(f.ctx, 9999)
			wantErr(t, err, wardload.ENOTFOUND, "")
			_, err = f.store.UpdateTier(f.ctx, 9999, wardload.TierUpdate{Label: new("x")})
			wantErr(t, err, wardload.ENOTFOUND, "")
			if n := f.totalAudit(); n != before {
				t.Fatalf("audit rows %d -> %d after failures", before, n)
			}
			// The same code in another ward is fine: codes are unique per ward.
			if other.tiers[0].Code != "t1" {
				t.Fatal("seed changed")
			}
		}},
	}
}

func tierCodes(ts []*wardload.Tier) string {
	var s []string
	for _, t := range ts {
		s = append(s, t.Code)
	}
	return strings.Join(s, ",")
}
