// Package signin holds what protects sign-in and does not depend on HTTP:
// the throttle (its counts kept in the database, shared by every instance),
// the bound on concurrent password hashes, the keyed digests that stand
// in for typed names, and the summarised audit of failed sign-ins. The
// HTTP glue (forms, cookies, status codes) is internal/server's.
package signin

import (
	"context"
	"time"

	"wardload/internal/wardload"
)

// The limits of each kind of key. An account waits from its third failure
// (NIST SP 800-63B, section 5.2.2, allows at most 100 consecutive failures
// before a lockout; a doubling wait from the third keeps online guessing
// to about a hundred a day per account and never locks anyone out for
// more than 15 minutes). An address waits only from its twentieth,
// because a whole hospital may reach wardload through one address; a
// known device from its fifth, as a person typing, not a script. The
// numbers are common practice, no source.
var (
	AccountRule = wardload.ThrottleRule{After: 3, MaxWait: 15 * time.Minute, Forget: 24 * time.Hour}
	AddressRule = wardload.ThrottleRule{After: 20, MaxWait: 15 * time.Minute, Forget: 24 * time.Hour}
	DeviceRule  = wardload.ThrottleRule{After: 5, MaxWait: 15 * time.Minute, Forget: 24 * time.Hour}
)

// MaxKeys bounds the rows of the throttle table that Purge keeps.
const MaxKeys = 100_000

// Throttle is one kind of throttle key with its rule, counted in the
// database so that all instances on it count together.
type Throttle struct {
	Rule  wardload.ThrottleRule
	Store wardload.SignInService
}

// Reserve checks key at now and, if it may try, counts the attempt, in
// one atomic step of the store (wardload.ThrottleRule.Reserve). It returns
// 0 when the attempt is reserved, otherwise how long key must still wait.
func (t Throttle) Reserve(ctx context.Context, key string, now time.Time) (time.Duration, error) {
	return t.Rule.Reserve(ctx, t.Store, key, now)
}

// Wait returns how long key must still wait at now, counting nothing.
func (t Throttle) Wait(ctx context.Context, key string, now time.Time) (time.Duration, error) {
	c, err := t.Store.FindSignInAttempts(ctx, key)
	return t.Rule.Wait(c, now), err
}

// Cancel gives back one reserved attempt that was not a failure.
func (t Throttle) Cancel(ctx context.Context, key string) error {
	return t.Store.CancelSignInAttempt(ctx, key)
}

// Clear forgets key, after a success.
func (t Throttle) Clear(ctx context.Context, key string) error {
	return t.Store.ClearSignInAttempts(ctx, key)
}

// Purge forgets the counts no rule remembers any more and keeps at most
// MaxKeys, so the table stays bounded whatever an attack invents.
func Purge(ctx context.Context, st wardload.SignInService, now time.Time) (int, error) {
	forget := max(AccountRule.Forget, AddressRule.Forget, DeviceRule.Forget)
	return st.PurgeSignInAttempts(ctx, now.Add(-forget), MaxKeys)
}
