package wardload

import (
	"context"
	"strings"
	"testing"
	"time"
)

func TestNewAudit(t *testing.T) {
	at := time.Date(2026, 3, 2, 8, 0, 0, 0, time.UTC)
	ctx := WithActor(context.Background(), Actor{UserID: 7, Name: "a.admin"})
	hash := "$argon2id$v=19$m=64,t=1,p=1$c2FsdHNhbHQ$a2V5a2V5a2V5a2V5"
	tok := &APIToken{ID: 3, Name: "planner", Hash: strings.Repeat("ab", 32), WardIDs: []int64{4, 9}}
	for _, tc := range []struct {
		name          string
		before, after Audited
		entity        string
		id            int64
		wards         []int64
		wantBefore    bool
		never         string // must appear in no row
	}{
		{"user without hash", nil, &User{ID: 5, Name: "b.nurse", PasswordHash: hash, WardIDs: []int64{4}}, "user", 5, []int64{0}, false, hash},
		{"user without wards lists none", &User{ID: 6, Name: "a.admin", WardIDs: []int64{}}, &User{ID: 6, Name: "a.admin"}, "user", 6, []int64{0}, true, "null"},
		{"token row per ward, without hash", tok, tok, "token", 3, []int64{4, 9}, true, tok.Hash},
		{"batch of two wards: a row per ward", nil, &Import{batch: ObservationBatch{BatchID: "b1", Rows: 3, WardIDs: []int64{4, 9}}}, "observation_batch", 0, []int64{4, 9}, false, ""},
		{"batch of one ward names it", nil, &Import{batch: ObservationBatch{BatchID: "b1", Rows: 3, WardIDs: []int64{9}}}, "observation_batch", 0, []int64{9}, false, ""},
		{"unsaved settings are nothing before", &Settings{WardID: 4}, &Settings{WardID: 4, UpdatedAt: at}, "settings", 4, []int64{4}, false, ""},
		{"projection without input", nil, &Projection{ID: 2, WardID: 4, Input: `{"secret-input":1}`, Result: `{"secret-result":1}`}, "projection", 2, []int64{4}, false, "secret-"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			es, err := NewAudit(ctx, at, "x.change", tc.before, tc.after)
			if err != nil {
				t.Fatal(err)
			}
			if len(es) != len(tc.wards) {
				t.Fatalf("%d rows, want %d", len(es), len(tc.wards))
			}
			for i, e := range es {
				if e.Entity != tc.entity || e.EntityID != tc.id || e.WardID != tc.wards[i] || e.Action != "x.change" ||
					e.UserID != 7 || e.Actor != "a.admin" || !e.At.Equal(at) || e.After == "" || (e.Before != "") != tc.wantBefore {
					t.Fatalf("row %d = %+v", i, e)
				}
				if tc.never != "" && strings.Contains(e.Before+e.After, tc.never) {
					t.Fatalf("row %d holds %q: %s / %s", i, tc.never, e.Before, e.After)
				}
			}
		})
	}
}
