package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
	"wardload/web"
)

// auditEntries returns the audit rows NewAudit makes of one change, as the
// stores write them.
func auditEntries(t *testing.T, at time.Time, action string, before, after wardload.Audited) *wardload.AuditEntry {
	t.Helper()
	ctx := wardload.WithActor(context.Background(), wardload.Actor{UserID: 2, Name: "m.manager"})
	es, err := wardload.NewAudit(ctx, at, action, before, after)
	if err != nil {
		t.Fatal(err)
	}
	return es[0]
}

// changeText is a row's changes as "Field: before → after" lines.
func changeText(row web.AuditRowVM) string {
	var b strings.Builder
	for _, c := range row.Changes {
		fmt.Fprintf(&b, "%s: %s → %s\n", c.Field, c.Before, c.After)
	}
	return b.String()
}

// TestAuditRowInWords renders an entry of every kind the stores and the
// server write and checks the words, the zone, the link and that no JSON
// is left. The ward is in Auckland (UTC+13 in March, NZDT) so that a time
// left in UTC would show.
func TestAuditRowInWords(t *testing.T) {
	ward := &wardload.Ward{ID: 3, Code: "w-nz", Name: "NZ", TimeZone: "Pacific/Auckland"}
	names := auditNames{wards: map[int64]*wardload.Ward{3: ward}, shifts: map[int64]string{5: "Night"},
		tiers: map[int64]string{7: "t1", 8: "t2"}}
	at := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	date := wardload.Date{Year: 2026, Month: time.March, Day: 1}

	st0 := wardload.DefaultSettings(3)
	st0.UpdatedAt = at.Add(-time.Hour)
	st1 := *st0
	st1.Beds, st1.CoverLevel, st1.Quartiles, st1.SupportStaff = 28, 0.95, wardload.QuartilesHF7, true
	st1.Floors = []wardload.RatioFloor{{ShiftID: 5, TierID: 8, PatientsPerNurse: 2}}
	tier := &wardload.Tier{ID: 8, WardID: 3, Code: "t2", Label: "Moderate care", DisplayOrder: 2}
	tier2 := *tier
	tier2.Label = "Heavy care"
	shift := &wardload.ShiftPattern{ID: 5, WardID: 3, Name: "Night", StartMinute: 19*60 + 30, NominalHours: 12.5}
	nurses := 4
	census := &wardload.Census{ID: 11, WardID: 3, Date: date, ShiftID: 5, Revision: 2,
		Counts: []wardload.TierCount{{TierID: 7, Patients: 3}, {TierID: 8, Patients: 5}}, Staff: wardload.StaffOnDuty{Nurses: &nurses}}
	floor := 3
	proj := &wardload.Projection{ID: 12, WardID: 3, Date: date, ShiftID: 5, ShiftName: "Night", Recommended: 4, Floor: &floor,
		ExpectedNurseHours: 38.123456789, DecidedBy: "cover", Input: `{"secret":"input"}`, Result: `{"r":1}`}
	obs := &wardload.Observation{ID: 40, WardID: 3, TierID: 8, Date: date, ShiftID: 5, WindowHours: 12, CareMinutes: 500}
	excl := *obs
	excl.Excluded, excl.ExcludedReason, excl.ExcludedBy, excl.ExcludedAt = true, "Entry error", 2, at
	rec := &wardload.ShiftRecord{ID: 20, WardID: 3, Date: date, ShiftID: 5, Revision: 1, Worked: wardload.StaffOnDuty{Nurses: &nurses}, Admissions: 2}
	user := &wardload.User{ID: 9, Name: "c.charge", Role: "charge_nurse", WardIDs: []int64{3}, PasswordHash: "$argon2id$v=19$secret-hash"}
	user2 := *user
	user2.Disabled, user2.PasswordChanges = true, 1
	tok := &wardload.APIToken{ID: 4, Name: "planner", Hash: "deadbeefcafe", WardIDs: []int64{3}, CreatedAt: at}
	revoked := *tok
	revoked.RevokedAt = at

	for _, tc := range []struct {
		name string
		e    *wardload.AuditEntry
		what string
		want []string // lines of the change, each "Field: before → after"
		link string
		zone string
	}{
		{"settings", auditEntries(t, at, wardload.ActionSettingsSave, st0, &st1), "Changed ward settings",
			[]string{"Beds: 0 → 28", "Cover level: 0.9 → 0.95", "Quartile convention: Tukey's hinges → Hyndman & Fan type 7",
				"Ratio floors: none → Night: at most 2 t2 patients per nurse", "Ward has support staff: no → yes"},
			"/wards/w-nz/settings#staffing", "Pacific/Auckland"},
		{"tier update", auditEntries(t, at, wardload.ActionTierUpdate, tier, &tier2), "Changed an acuity tier",
			[]string{"Label: Moderate care → Heavy care"}, "/wards/w-nz/settings#tier-8", "Pacific/Auckland"},
		{"shift create", auditEntries(t, at, wardload.ActionShiftCreate, nil, shift), "Added a shift pattern",
			[]string{"Name:  → Night", "Start:  → 19:30", "Length (hours):  → 12.5"}, "/wards/w-nz/settings#shift-5", "Pacific/Auckland"},
		{"census", auditEntries(t, at, wardload.ActionCensusCreate, nil, census), "Entered a census",
			[]string{"Date:  → 2026-03-01", "Shift:  → Night", "Patients by tier:  → t1 3, t2 5", "Revision:  → 2", "Staff on duty:  → nurses 4, support staff none"},
			"/wards/w-nz/projections", "Pacific/Auckland"},
		{"projection", auditEntries(t, at, wardload.ActionProjectionCreate, nil, proj), "Made a staffing estimate",
			[]string{"Recommended nurses:  → 4", "Nurses the ratio floor asks for:  → 3", "Expected nurse-hours:  → 38.123", "Shift:  → Night"},
			"/wards/w-nz/projections/12", "Pacific/Auckland"},
		{"exclusion", auditEntries(t, at, wardload.ActionObservationExclude, obs, &excl), "Excluded an observation",
			[]string{"Excluded from the model: no → yes", "Reason for exclusion: (empty) → Entry error"}, "/wards/w-nz/review", "Pacific/Auckland"},
		{"import", &wardload.AuditEntry{At: at, Actor: "m.manager", Action: wardload.ActionObservationImport, Entity: "observation_batch", WardID: 3,
			After: `{"BatchID":"a1b2c3d4e5f60718","Rows":3,"WardIDs":[3]}`}, "Imported observations",
			[]string{"Import batch:  → a1b2c3d4e5f60718", "Rows:  → 3", "Wards:  → w-nz"}, "/wards/w-nz/review", "Pacific/Auckland"},
		{"shift record", auditEntries(t, at, wardload.ActionShiftRecordCreate, nil, rec), "Entered an end-of-shift record",
			[]string{"Admissions:  → 2", "Staff who worked:  → nurses 4, support staff none"}, "/wards/w-nz/shift-record?date=2026-03-01&shift=5", "Pacific/Auckland"},
		{"token revoke", auditEntries(t, at, wardload.ActionTokenRevoke, tok, &revoked), "Revoked an API token",
			[]string{"Revoked: never → 2026-03-02 22:00"}, "/wards/w-nz/tokens", "Pacific/Auckland"},
		{"user update", auditEntries(t, at, wardload.ActionUserUpdate, user, &user2), "Changed a user",
			[]string{"Disabled: no → yes", "Password changes: 0 → 1"}, "/admin/users", "UTC"},
		{"sign-in failures", &wardload.AuditEntry{At: at, Actor: "(unknown)", Action: wardload.ActionSignInFail, Entity: "user",
			After: `{"address":"192.0.2.7","count":5,"first":"2026-03-02T08:55:00Z","last":"2026-03-02T08:59:00Z","reasons":{"password":5},"window":"5m0s"}`},
			"Failed sign-ins", []string{"Attempts:  → 5", "First attempt:  → 2026-03-02 08:55", "Reasons:  → password 5"}, "/admin/users", "UTC"},
		{"purge", &wardload.AuditEntry{At: at, Actor: "system", Action: wardload.ActionAuditPurge, Entity: "audit",
			After: `{"before":"2025-03-02T00:00:00Z","deleted":120,"actions":["signin.ok","signin.fail"]}`},
			"Purged old sign-in records", []string{"Records deleted:  → 120", "Older than:  → 2025-03-02 00:00"}, "", "UTC"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			row := auditRow(tc.e, names.wards[tc.e.WardID], names, true)
			if row.What != tc.what {
				t.Errorf("what = %q, want %q", row.What, tc.what)
			}
			if row.Zone != tc.zone {
				t.Errorf("zone = %q, want %q", row.Zone, tc.zone)
			}
			wantAt := "2026-03-02 09:00:00"
			if tc.zone == "Pacific/Auckland" {
				wantAt = "2026-03-02 22:00:00" // NZDT, UTC+13
			}
			if row.At != wantAt {
				t.Errorf("at = %q, want %q", row.At, wantAt)
			}
			if row.LinkURL != tc.link {
				t.Errorf("link = %q, want %q", row.LinkURL, tc.link)
			}
			got := changeText(row)
			for _, w := range tc.want {
				if !strings.Contains(got, w+"\n") {
					t.Errorf("change %q missing from\n%s", w, got)
				}
			}
			for _, bad := range []string{"{", "}", "\"", "secret", "deadbeef", "argon2", "ID:"} {
				if strings.Contains(got, bad) || strings.Contains(row.Subject, bad) {
					t.Errorf("change shows %q:\n%s", bad, got)
				}
			}
		})
	}
	// A manager has no user administration page to be sent to.
	if row := auditRow(auditEntries(t, at, wardload.ActionUserUpdate, user, &user2), nil, names, false); row.LinkURL != "" {
		t.Errorf("manager's link for a user change = %q", row.LinkURL)
	}
}

// TestAuditUnknownInWords: an action or field this code does not know
// (a later change's) still reads as words, and a record that is not JSON
// is never echoed.
func TestAuditUnknownInWords(t *testing.T) {
	w := auditWords{names: auditNames{}, loc: time.UTC}
	if got := actionName("ward.merge"); got != "Ward merge" {
		t.Errorf("actionName = %q", got)
	}
	got := w.changes(`{"RetiredAt":"0001-01-01T00:00:00Z"}`, `{"RetiredAt":"2026-03-02T09:00:00Z"}`)
	if len(got) != 1 || got[0] != (web.AuditChangeVM{Field: "Retired at", Before: "never", After: "2026-03-02 09:00"}) {
		t.Errorf("changes = %+v", got)
	}
	if got := w.changes(`{"a":1}`, `not json {`); len(got) != 1 || strings.Contains(got[0].After, "{") {
		t.Errorf("unreadable record = %+v", got)
	}
}

// TestAuditPageInWords stores real changes through the store and the
// server (settings, a tier, a token, a failed sign-in) and reads /audit as
// an admin: plain words, the ward's zone named, links, the action filter
// as plain names, and no JSON or hash anywhere in the entries.
func TestAuditPageInWords(t *testing.T) {
	f := newFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{UserID: f.users[pAdmin].ID, Name: "a.admin"})
	nz := &wardload.Ward{Code: "w-nz", Name: "Ward NZ", TimeZone: "Pacific/Auckland"}
	if err := f.st.CreateWard(ctx, nz); err != nil {
		t.Fatal(err)
	}
	tier := &wardload.Tier{WardID: nz.ID, Code: "t1", Label: "Light care", DisplayOrder: 1}
	if err := f.st.CreateTier(ctx, tier); err != nil {
		t.Fatal(err)
	}
	label := "Lighter care"
	if _, err := f.st.UpdateTier(ctx, tier.ID, wardload.TierUpdate{Label: &label}); err != nil {
		t.Fatal(err)
	}
	st := wardload.DefaultSettings(nz.ID)
	st.Beds = 24
	if err := f.st.SaveSettings(ctx, st); err != nil {
		t.Fatal(err)
	}
	st.Beds = 26
	if err := f.st.SaveSettings(ctx, st); err != nil {
		t.Fatal(err)
	}
	_, tok := f.MustToken(t, "planner-nz", nz.ID)
	f.do(t, signInForm("n.nurse", "wrong guess 1234", "/"))

	_, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/audit", nil)))
	start, end := strings.Index(body, `<ol class="audit-list"`), strings.Index(body, "</ol>")
	if start < 0 || end < start {
		t.Fatalf("no entry list on the page:\n%s", body)
	}
	list := body[start:end]
	for _, bad := range []string{"{", "}", "&#34;", tok.Hash, "argon2", `"Beds"`} {
		if strings.Contains(list, bad) {
			t.Errorf("entries show %q", bad)
		}
	}
	whats := byTestID(t, body, "audit-what")
	for _, w := range []string{"Failed sign-ins", "Created an API token", "Changed ward settings", "Changed an acuity tier", "Added an acuity tier", "Created a ward"} {
		if !strings.Contains(strings.Join(whats, "|"), w) {
			t.Errorf("no %q among %q", w, whats)
		}
	}
	zones := byTestID(t, body, "audit-zone")
	if len(zones) == 0 || zones[0] != "(UTC)" || !strings.Contains(strings.Join(zones, " "), "(Pacific/Auckland)") {
		t.Errorf("zones = %q, want the sign-in in UTC first and the ward's entries in Pacific/Auckland", zones)
	}
	// The fixture's clock is 09:00 UTC on 2 March: 22:00 in Auckland.
	if !strings.Contains(list, "2026-03-02 22:00:00") {
		t.Error("no entry shown at 22:00 Auckland time")
	}
	for _, href := range []string{"/wards/w-nz/settings#staffing", "/wards/w-nz/settings#tier-" + strconv.FormatInt(tier.ID, 10), "/wards/w-nz/tokens", "/admin/users"} {
		if !strings.Contains(list, `href="`+href+`"`) {
			t.Errorf("no link to %s", href)
		}
	}
	if !strings.Contains(list, "Lighter care") || !strings.Contains(list, ">24<") || !strings.Contains(list, ">26<") {
		t.Error("the tier's and the settings' before and after are not shown")
	}
	if !strings.Contains(body, `<option value="settings.save">Changed ward settings</option>`) {
		t.Error("the action filter does not list plain names")
	}
	_, body = f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/audit?action=settings.save", nil)))
	if whats := byTestID(t, body, "audit-what"); len(whats) != 2 || whats[0] != "Changed ward settings" ||
		!strings.Contains(body, `<option value="settings.save" selected>`) {
		t.Errorf("filtered by a plain name: %q", whats)
	}
}
