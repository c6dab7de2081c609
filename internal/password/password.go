// Package password hashes and verifies staff sign-in passwords with
// argon2id (RFC 9106) and stores them as PHC-style strings:
//
//	$argon2id$v=19$m=65536,t=1,p=2$<salt>$<hash>
//
// where salt and hash are unpadded standard base64. The parameters travel
// inside the string, so raising them later does not break existing hashes.
package password

import (
	"crypto/rand"
	"crypto/subtle"
	"encoding/base64"
	"fmt"
	"strings"

	"golang.org/x/crypto/argon2"
)

// Params are argon2id cost parameters. The zero Params stands for
// DefaultParams, so a configuration that leaves them unset gets production
// strength; tests pass cheap ones of their own.
type Params struct {
	MemoryKiB uint32 // m
	Time      uint32 // t, passes over memory
	Threads   uint8  // p
	SaltLen   uint32 // bytes
	KeyLen    uint32 // bytes
}

// DefaultParams returns the production parameters: 64 MiB, one pass, two
// lanes. RFC 9106 section 4 recommends t=1 with 2 GiB, or t=3 with 64 MiB
// when memory is constrained; we take 64 MiB with t=1 to keep a sign-in
// well under a second on a small server (a trade-off, not the RFC's second
// option).
func DefaultParams() Params {
	return Params{MemoryKiB: 64 * 1024, Time: 1, Threads: 2, SaltLen: 16, KeyLen: 32}
}

// Hash returns the encoded argon2id hash of pw, NFKC-normalised (see
// Normalize), with a fresh random salt and the parameters p (DefaultParams
// when p is zero). It does not check pw against the policy; HashNew does.
func (p Params) Hash(pw string) (string, error) {
	pw = Normalize(pw)
	if p == (Params{}) {
		p = DefaultParams()
	}
	salt := make([]byte, p.SaltLen)
	if _, err := rand.Read(salt); err != nil {
		return "", fmt.Errorf("password salt: %w", err)
	}
	key := argon2.IDKey([]byte(pw), salt, p.Time, p.MemoryKiB, p.Threads, p.KeyLen)
	b64 := base64.RawStdEncoding
	return fmt.Sprintf("$argon2id$v=%d$m=%d,t=%d,p=%d$%s$%s",
		argon2.Version, p.MemoryKiB, p.Time, p.Threads, b64.EncodeToString(salt), b64.EncodeToString(key)), nil
}

// Verify reports whether pw matches encoded, comparing in constant time.
// pw is NFKC-normalised first, as Hash does, so that a password typed
// with composed, decomposed or full-width characters matches however it
// was typed when it was set. Hashes made before passwords were normalised
// hold the password as typed: when the normalised form does not match and
// differs from pw, pw itself is tried too (a second hash, only for input
// that normalisation changes), so those accounts keep signing in. A wrong
// password is (false, nil); an encoded string that is not an argon2id hash
// this package can read is an error.
func Verify(pw, encoded string) (bool, error) {
	p, salt, want, err := decode(encoded)
	if err != nil {
		return false, err
	}
	match := func(s string) bool {
		got := argon2.IDKey([]byte(s), salt, p.Time, p.MemoryKiB, p.Threads, p.KeyLen)
		return subtle.ConstantTimeCompare(got, want) == 1
	}
	n := Normalize(pw)
	return match(n) || (n != pw && match(pw)), nil
}

// decode parses a PHC string. Limits on the parameters stop a tampered or
// corrupt row from making Verify allocate gigabytes.
func decode(encoded string) (p Params, salt, key []byte, err error) {
	parts := strings.Split(encoded, "$")
	// "", "argon2id", "v=19", "m=..,t=..,p=..", salt, hash
	if len(parts) != 6 || parts[0] != "" || parts[1] != "argon2id" {
		return p, nil, nil, fmt.Errorf("password: not an argon2id hash")
	}
	var v int
	if _, err := fmt.Sscanf(parts[2], "v=%d", &v); err != nil || v != argon2.Version {
		return p, nil, nil, fmt.Errorf("password: unsupported argon2 version %q", parts[2])
	}
	var threads uint32
	if _, err := fmt.Sscanf(parts[3], "m=%d,t=%d,p=%d", &p.MemoryKiB, &p.Time, &threads); err != nil {
		return p, nil, nil, fmt.Errorf("password: bad argon2 parameters %q", parts[3])
	}
	if p.MemoryKiB < 8 || p.MemoryKiB > 1<<21 || p.Time < 1 || p.Time > 16 || threads < 1 || threads > 64 {
		return p, nil, nil, fmt.Errorf("password: argon2 parameters out of range %q", parts[3])
	}
	p.Threads = uint8(threads)
	b64 := base64.RawStdEncoding
	if salt, err = b64.DecodeString(parts[4]); err != nil || len(salt) < 8 {
		return p, nil, nil, fmt.Errorf("password: bad salt")
	}
	if key, err = b64.DecodeString(parts[5]); err != nil || len(key) < 16 || len(key) > 64 {
		return p, nil, nil, fmt.Errorf("password: bad hash")
	}
	p.SaltLen, p.KeyLen = uint32(len(salt)), uint32(len(key))
	return p, salt, key, nil
}
