package sqlite_test

import (
	"context"
	"testing"

	"github.com/pressly/goose/v3"

	"wardload/internal/wardload"
	"wardload/migrations"
)

// TestMigration9DownAndUp: migration 00009 rebuilds users for the
// staffing_office role with foreign keys off; going down keeps every
// account (a staffing office becomes a disabled charge nurse without
// wards) and user_wards stays consistent; going up again restores the
// role's use.
func TestMigration9DownAndUp(t *testing.T) {
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	st := MustOpen(t, nil)
	w := &wardload.Ward{Code: "w1", Name: "Ward 1", TimeZone: "Europe/Dublin"}
	if err := st.CreateWard(ctx, w); err != nil {
		t.Fatal(err)
	}
	for _, u := range []*wardload.User{
		{Name: "n.nurse", Role: wardload.RoleChargeNurse, PasswordHash: "x", WardIDs: []int64{w.ID}},
		{Name: "s.office", Role: wardload.RoleStaffingOffice, PasswordHash: "x", WardIDs: []int64{w.ID}},
	} {
		if err := st.CreateUser(ctx, u); err != nil {
			t.Fatal(err)
		}
	}
	p, err := goose.NewProvider(goose.DialectSQLite3, st.DB(), migrations.SQLite)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := p.DownTo(ctx, 7); err != nil {
		t.Fatalf("down to 7: %v", err)
	}
	var violations int
	if err := st.DB().QueryRowContext(ctx, `SELECT COUNT(*) FROM pragma_foreign_key_check`).Scan(&violations); err != nil || violations != 0 {
		t.Fatalf("foreign key check after down: %d, %v", violations, err)
	}
	var fk int
	if err := st.DB().QueryRowContext(ctx, `PRAGMA foreign_keys`).Scan(&fk); err != nil || fk != 1 {
		t.Fatalf("foreign_keys after down = %d, %v; want 1", fk, err)
	}
	var role string
	var disabled bool
	if err := st.DB().QueryRowContext(ctx, `SELECT role, disabled FROM users WHERE name = 's.office'`).Scan(&role, &disabled); err != nil ||
		role != wardload.RoleChargeNurse || !disabled {
		t.Fatalf("staffing office after down: %q disabled %v, %v", role, disabled, err)
	}
	if _, err := p.Up(ctx); err != nil {
		t.Fatalf("up again: %v", err)
	}
	u := &wardload.User{Name: "s.again", Role: wardload.RoleStaffingOffice, PasswordHash: "x", WardIDs: []int64{w.ID}}
	if err := st.CreateUser(ctx, u); err != nil {
		t.Fatalf("staffing office after up again: %v", err)
	}
	n, err := st.FindUserByName(ctx, "n.nurse")
	if err != nil || len(n.WardIDs) != 1 {
		t.Fatalf("nurse kept her ward through down and up: %+v, %v", n, err)
	}
}
