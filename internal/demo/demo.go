// Package demo seeds a fictional ward so that wardload can be tried without
// real data: an invented hospital, four acuity tiers, two shift patterns,
// ten weeks of care observations with a few planted entry errors, census
// history, settings and four staff accounts.
//
// Every figure is generated from a fixed seed, so the same `now` gives the
// same data. Nothing describes a real hospital, person, law or agreement.
package demo

import (
	"context"
	"fmt"
	"math/rand/v2"
	"time"

	"wardload/internal/password"
	"wardload/internal/wardload"
)

// WardCode is the code of the demo ward; Seed does nothing if it exists.
const WardCode = "w7-east"

// Weeks is how many weeks of observations and census the demo holds.
const Weeks = 10

// The generator's fixed seed. Changing it changes every demo figure.
const seedA, seedB = 0x7761726465, 0x6c6f6164

// Account is a demo staff account and its generated password.
type Account struct{ Name, Role, Password string }

// Result reports what Seed did. Accounts is empty when Created is false:
// passwords are only known at creation and are never stored in clear.
type Result struct {
	Created  bool
	Ward     *wardload.Ward
	Accounts []Account
}

// Atomic is a store that can run several of its methods as one
// transaction: every change fn makes with the context it is given commits
// together, or none is kept if fn returns an error. internal/sqlite's
// Store offers it.
type Atomic interface {
	Atomically(ctx context.Context, fn func(ctx context.Context) error) error
}

// Seed seeds the demo scenario once: if the demo ward already exists it
// returns Created=false and no passwords. Observations and census end on
// the ward's calendar day before now. Writes are audited as actor "demo".
//
// On a store that implements Atomic (SQLite) the whole seed is one
// transaction: if any step fails nothing is kept, not even audit rows,
// so no account exists whose password was never shown and the next start
// seeds again. On other stores (PostgreSQL, whose store offers no
// transaction spanning its methods) a failure half-way leaves what was
// created, and the next start finds the ward and reports it as present;
// drop the demo database and start again.
//
// pw are the argon2id parameters of the accounts' password hashes (zero:
// password.DefaultParams); tests pass cheap ones.
func Seed(ctx context.Context, st wardload.Store, now time.Time, pw password.Params) (*Result, error) {
	existing, err := st.FindWardByCode(ctx, WardCode)
	if err == nil {
		return &Result{Created: false, Ward: existing}, nil
	} else if wardload.ErrorCode(err) != wardload.ENOTFOUND {
		return nil, fmt.Errorf("demo: look up ward: %w", err)
	}

	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "demo"})
	s := &seeder{st: st, rng: rand.New(rand.NewPCG(seedA, seedB)), pw: pw}
	seed := func(ctx context.Context) error { return s.seed(ctx, now) }
	if a, ok := st.(Atomic); ok {
		err = a.Atomically(ctx, seed)
	} else {
		err = seed(ctx)
	}
	if err != nil {
		return nil, fmt.Errorf("demo: %w", err)
	}
	return &Result{Created: true, Ward: s.ward, Accounts: s.accounts}, nil
}

// seed runs every step of Seed in order, stopping at the first error.
func (s *seeder) seed(ctx context.Context, now time.Time) error {
	steps := []func(context.Context) error{
		s.createWard,
		s.createTiers,
		s.createShifts,
		s.createUsers,
		s.saveSettings,
	}
	for _, step := range steps {
		if err := step(ctx); err != nil {
			return err
		}
	}
	loc, err := s.ward.Location()
	if err != nil {
		return err
	}
	first, last := period(now, loc)
	if err := s.createObservations(ctx, first, last, loc); err != nil {
		return err
	}
	return s.createCensus(ctx, first, last)
}

// seeder carries what the steps of Seed create for the steps after them.
type seeder struct {
	st       wardload.Store
	rng      *rand.Rand
	pw       password.Params
	ward     *wardload.Ward
	tiers    []*wardload.Tier         // in tierSpecs order
	shifts   []*wardload.ShiftPattern // in shiftSpecs order
	accounts []Account
	users    map[string]*wardload.User // by account name
}

func (s *seeder) createWard(ctx context.Context) error {
	w := &wardload.Ward{
		Code:        WardCode,
		Name:        "Ward 7 East (Acute Medicine), Fernhollow General — fictional demo",
		TimeZone:    timeZone,
		FactorNames: []string{dependencyFactor},
	}
	if err := s.st.CreateWard(ctx, w); err != nil {
		return fmt.Errorf("create ward: %w", err)
	}
	s.ward = w
	return nil
}

func (s *seeder) createTiers(ctx context.Context) error {
	for i, spec := range tierSpecs {
		t := &wardload.Tier{
			WardID:       s.ward.ID,
			Code:         spec.code,
			Label:        spec.label,
			Description:  spec.description,
			DisplayOrder: i + 1,
		}
		if err := s.st.CreateTier(ctx, t); err != nil {
			return fmt.Errorf("create tier %s: %w", spec.code, err)
		}
		s.tiers = append(s.tiers, t)
	}
	return nil
}

func (s *seeder) createShifts(ctx context.Context) error {
	for _, spec := range shiftSpecs {
		p := &wardload.ShiftPattern{
			WardID:       s.ward.ID,
			Name:         spec.name,
			StartMinute:  spec.startMinute,
			NominalHours: spec.hours,
		}
		if err := s.st.CreateShiftPattern(ctx, p); err != nil {
			return fmt.Errorf("create shift %s: %w", spec.name, err)
		}
		s.shifts = append(s.shifts, p)
	}
	return nil
}

func (s *seeder) saveSettings(ctx context.Context) error {
	set := &wardload.Settings{
		WardID:             s.ward.ID,
		DirectCareFraction: 0.7,
		CoverLevel:         0.9,
		LookbackWeeks:      8,
		Quartiles:          wardload.QuartilesHinges,
		Beds:               beds,
		ChangeoverMinutes:  wardload.DefaultChangeoverMinutes,
		// An invented escalation route, as a manager would write one.
		Escalation: "Call the site nurse manager on extension 4410 and note the call in the shift log.",
		UpdatedBy:  s.users[managerName].ID,
	}
	// Invented demo values, not any jurisdiction's law or agreement: at
	// most 5 patients per nurse by day and 7 by night, the nurse in charge
	// not counted.
	for i, spec := range shiftSpecs {
		set.Floors = append(set.Floors, wardload.RatioFloor{
			ShiftID:          s.shifts[i].ID,
			PatientsPerNurse: spec.patientsPerNurse,
		})
	}
	if err := s.st.SaveSettings(ctx, set); err != nil {
		return fmt.Errorf("save settings: %w", err)
	}
	return nil
}
