package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// yearAuditRows is a year of audit rows for ten wards: per ward and day
// about six census and estimate rows, two end-of-shift records and a
// few settings, review and sign-in rows (an invented mix).
const yearAuditRows = 365 * 10 * 10

// BenchmarkAuditPage serves /audit over a year of audit rows (SQLite,
// in-process, session check included): the newest page and a page deep
// in the year, for an admin and for the manager of one ward.
func BenchmarkAuditPage(b *testing.B) {
	f := newFixture(b)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "bench"})
	var wardIDs []int64
	for i := range 10 {
		w := &wardload.Ward{Code: fmt.Sprintf("w-%02d", i), Name: "Bench", TimeZone: "Europe/Dublin"}
		if err := f.st.CreateWard(ctx, w); err != nil {
			b.Fatal(err)
		}
		wardIDs = append(wardIDs, w.ID)
	}
	wardIDs[0] = f.wardA.ID // the manager's ward
	start := time.Date(2025, 3, 1, 0, 0, 0, 0, time.UTC)
	kinds := []struct{ action, entity, before, after string }{
		{wardload.ActionCensusCreate, "census", "", `{"ID":1,"WardID":1,"Date":{"Year":2025,"Month":3,"Day":1},"ShiftID":1,"Revision":1,"Counts":[{"TierID":1,"Patients":4}],"Staff":{"Nurses":null,"Support":null}}`},
		{wardload.ActionProjectionCreate, "projection", "", `{"ID":1,"WardID":1,"ShiftName":"Day","Recommended":5,"ExpectedNurseHours":40.5,"DecidedBy":"cover"}`},
		{wardload.ActionSettingsSave, "settings", `{"WardID":1,"Beds":20,"CoverLevel":0.9}`, `{"WardID":1,"Beds":22,"CoverLevel":0.9}`},
		{wardload.ActionSignInOK, "user", "", `{"address":"192.0.2.1"}`},
	}
	for i := range yearAuditRows {
		k := kinds[i%len(kinds)]
		e := &wardload.AuditEntry{At: start.Add(time.Duration(i) * 365 * 24 * time.Hour / yearAuditRows), Actor: "bench",
			Action: k.action, Entity: k.entity, EntityID: int64(i), WardID: wardIDs[i%len(wardIDs)], Before: k.before, After: k.after}
		if k.action == wardload.ActionSignInOK {
			e.WardID = 0
		}
		if err := f.st.AppendAudit(ctx, e); err != nil {
			b.Fatal(err)
		}
	}
	for _, tc := range []struct{ name, who, query string }{
		{"admin/newest", pAdmin, ""},
		{"admin/page-500", pAdmin, "?page=500"},
		{"manager/newest", pManagerA, ""},
		{"manager/page-50", pManagerA, "?page=50"},
	} {
		b.Run(tc.name, func(b *testing.B) {
			for b.Loop() {
				res, body := f.do(b, f.as(b, tc.who, httptest.NewRequest("GET", "/audit"+tc.query, nil)))
				if res.StatusCode != 200 || len(body) < 1000 {
					b.Fatalf("status %d", res.StatusCode)
				}
			}
		})
	}
}
