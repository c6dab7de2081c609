package signin

import (
	"context"
	"crypto/hmac"
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"sync"

	"wardload/internal/wardload"
)

// Secret names in the store's install_secrets.
const (
	deviceSecret = "device-cookie"
	nameSecret   = "name-digest"
)

// Keys are this installation's sign-in secrets, read from the store on
// first use (every instance on the database gets the same ones) and kept
// in memory afterwards: the key of the device cookies' MACs and the key of
// the digests that stand in for typed names.
type Keys struct {
	Store wardload.SignInService

	mu           sync.Mutex
	device, name []byte
}

// load returns both keys, creating them in the store if this is the
// first instance to need them. A failure is not kept: the next call tries
// again.
func (k *Keys) load(ctx context.Context) ([]byte, []byte, error) {
	k.mu.Lock()
	defer k.mu.Unlock()
	if k.device != nil {
		return k.device, k.name, nil
	}
	dev, err := k.Store.InstallSecret(ctx, deviceSecret, fresh())
	if err != nil {
		return nil, nil, err
	}
	name, err := k.Store.InstallSecret(ctx, nameSecret, fresh())
	if err != nil {
		return nil, nil, err
	}
	k.device, k.name = dev, name
	return dev, name, nil
}

// Device returns the key of the device cookies' MACs.
func (k *Keys) Device(ctx context.Context) ([]byte, error) {
	d, _, err := k.load(ctx)
	return d, err
}

// NameDigest returns a keyed digest of a typed name (HMAC-SHA256, hex). It
// stands in for the name wherever one is kept (throttle keys, the audit's
// fingerprint of unknown names): what was typed may be a password, and
// without the key the digest cannot be checked against guesses.
func (k *Keys) NameDigest(ctx context.Context, name string) (string, error) {
	_, key, err := k.load(ctx)
	if err != nil {
		return "", err
	}
	m := hmac.New(sha256.New, key)
	m.Write([]byte("wardload name v1\x00" + name))
	return hex.EncodeToString(m.Sum(nil)), nil
}

// fresh returns 32 random bytes, a candidate secret.
func fresh() []byte {
	b := make([]byte, 32)
	rand.Read(b) // never fails (crypto/rand panics instead)
	return b
}
