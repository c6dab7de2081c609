package demo

import (
	"context"
	"crypto/rand"
	"fmt"

	"wardload/internal/wardload"
)

// Demo account names. They are invented staff sign-in names.
const (
	adminName   = "demo.admin"
	managerName = "demo.manager"
)

var chargeNames = []string{"demo.charge1", "demo.charge2"}

// createUsers creates the demo accounts with fresh random passwords. The
// passwords come from crypto/rand, not from the seeded generator, so they
// are never predictable from the source; Seed returns them once.
func (s *seeder) createUsers(ctx context.Context) error {
	specs := []struct {
		name, role string
		member     bool
	}{
		{adminName, wardload.RoleAdmin, false},
		{managerName, wardload.RoleManager, true},
		{chargeNames[0], wardload.RoleChargeNurse, true},
		{chargeNames[1], wardload.RoleChargeNurse, true},
	}
	s.users = map[string]*wardload.User{}
	for _, spec := range specs {
		// 26 base32 characters, about 130 bits; HashNew applies the rule
		// of every new password to it, as to any other.
		pw := rand.Text()
		hash, err := s.pw.HashNew(pw, spec.name, "")
		if err != nil {
			return fmt.Errorf("hash password of %s: %w", spec.name, err)
		}
		u := &wardload.User{Name: spec.name, Role: spec.role, PasswordHash: hash}
		if spec.member {
			u.WardIDs = []int64{s.ward.ID}
		}
		if err := s.st.CreateUser(ctx, u); err != nil {
			return fmt.Errorf("create user %s: %w", spec.name, err)
		}
		s.users[spec.name] = u
		s.accounts = append(s.accounts, Account{Name: spec.name, Role: spec.role, Password: pw})
	}
	return nil
}
