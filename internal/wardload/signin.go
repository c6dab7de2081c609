package wardload

import (
	"context"
	"time"
)

// SignInAttempts is the throttle count of one key (an account, a client
// address, a device): how many attempts it has made that count, and when
// the latest was. The key never holds what a person typed: a name that
// matches no account is keyed by a keyed digest of it (internal/signin).
type SignInAttempts struct {
	Key      string
	Attempts int
	Last     time.Time // zero: nothing stored for Key
}

// ThrottleRule is the one rule of sign-in throttling; the stores only
// store counts and swap them atomically, the rule decides.
//
// From the After-th counted attempt on, a key must wait
//
//	min(2^(attempts-After) s, MaxWait)
//
// after its latest attempt before the next one (1 s, 2 s, 4 s, ...). A
// key whose latest attempt is older than Forget starts again from zero.
// It is a slowdown, not a lockout: nobody can keep an account shut for
// more than MaxWait at a time by failing on purpose.
type ThrottleRule struct {
	After   int
	MaxWait time.Duration
	Forget  time.Duration
}

// Delay is the wait that n counted attempts impose after the latest one.
func (r ThrottleRule) Delay(n int) time.Duration {
	k := n - r.After
	switch {
	case k < 0:
		return 0
	case k >= 30: // 2^30 s is far past any sensible MaxWait
		return r.MaxWait
	}
	return min(time.Second<<k, r.MaxWait)
}

// live returns c as it stands at now: forgotten counts are zero.
func (r ThrottleRule) live(c SignInAttempts, now time.Time) SignInAttempts {
	if c.Last.IsZero() || now.Sub(c.Last) > r.Forget {
		return SignInAttempts{Key: c.Key}
	}
	return c
}

// Wait returns how long c's key must still wait at now; 0 means it may try.
func (r ThrottleRule) Wait(c SignInAttempts, now time.Time) time.Duration {
	c = r.live(c, now)
	if c.Attempts == 0 {
		return 0
	}
	return max(0, c.Last.Add(r.Delay(c.Attempts)).Sub(now))
}

// Count returns c with one more attempt made at now. The latest time
// never goes back, so that a request that read the clock a little
// earlier cannot shorten another's wait.
func (r ThrottleRule) Count(c SignInAttempts, now time.Time) SignInAttempts {
	c = r.live(c, now)
	c.Attempts++
	if now.After(c.Last) {
		c.Last = now
	}
	return c
}

// SignInService keeps the sign-in throttle's counts where every instance
// of wardload on the same database sees them, so that a burst of guesses
// spread over several instances is cut at the same limit as on one.
type SignInService interface {
	// FindSignInAttempts returns key's stored count, or one with zero
	// Attempts and zero Last when nothing is stored.
	FindSignInAttempts(ctx context.Context, key string) (SignInAttempts, error)
	// SwapSignInAttempts stores next for old.Key in one statement, only if
	// what is stored is still old (old.Last zero: nothing stored), and
	// reports whether it did. Of concurrent swaps from the same old value,
	// at most one succeeds.
	SwapSignInAttempts(ctx context.Context, old, next SignInAttempts) (bool, error)
	// CancelSignInAttempt takes one attempt off key's count (never below
	// zero), for a reserved attempt that turned out not to be a failure.
	// The latest time stays.
	CancelSignInAttempt(ctx context.Context, key string) error
	// ClearSignInAttempts forgets key's count.
	ClearSignInAttempts(ctx context.Context, key string) error
	// PurgeSignInAttempts deletes the counts whose latest attempt is before
	// before and then, if more than keep remain, the oldest of them, so
	// the table stays bounded however many keys an attack invents. It
	// returns how many rows it deleted.
	PurgeSignInAttempts(ctx context.Context, before time.Time, keep int) (int, error)
	// InstallSecret returns the secret called name of this database,
	// storing fresh as that secret first if there is none yet. Every
	// instance on the database gets the same bytes, so keys derived from
	// it (device cookies, digests of typed names) agree between them.
	InstallSecret(ctx context.Context, name string, fresh []byte) ([]byte, error)
}

// ErrThrottleContended is returned by Reserve when the count of a key kept
// changing under it; the caller refuses the attempt as busy.
var ErrThrottleContended = Errorf(EUNAVAILABLE, "Sign-in is busy just now; please try again in a few seconds.")

// reserveTries bounds Reserve's compare-and-swap rounds. Each round that
// fails does so because another attempt on the same key was counted, and
// after After of those the key waits, so a burst settles within a few.
const reserveTries = 100

// Reserve checks key against r at now and, if it may try, counts the
// attempt, atomically in svc: it reads the count, decides with r, and
// swaps in the new count only if nobody changed it meanwhile, trying
// again otherwise. It returns 0 when the attempt is reserved (to be given
// back with CancelSignInAttempt if it turns out not to be a failure), or
// how long key must still wait, having counted nothing.
func (r ThrottleRule) Reserve(ctx context.Context, svc SignInService, key string, now time.Time) (time.Duration, error) {
	for range reserveTries {
		c, err := svc.FindSignInAttempts(ctx, key)
		if err != nil {
			return 0, err
		}
		if d := r.Wait(c, now); d > 0 {
			return d, nil
		}
		ok, err := svc.SwapSignInAttempts(ctx, c, r.Count(c, now))
		if err != nil || ok {
			return 0, err
		}
	}
	return 0, ErrThrottleContended
}
