package session

import (
	"crypto/aes"
	"crypto/cipher"
	"crypto/rand"
	"encoding/base64"
	"errors"
)

// A new API token's secret must reach the page after the 303 that ends the
// create form, so it rides in the session for one request. Sessions live
// in the database, which must never hold a token in plain text, so the
// secret is sealed with a key that exists only in this process's memory.
// After a restart (or on another process) it cannot be opened: the page
// then says so, and the manager revokes the token and makes another.

// Sealer seals values with AES-256-GCM under a key of its own.
type Sealer struct {
	key []byte
}

// NewSealer returns a Sealer with a fresh random key, held only in memory.
func NewSealer() *Sealer {
	k := make([]byte, 32)
	rand.Read(k) // never fails (crypto/rand panics instead)
	return &Sealer{key: k}
}

// Seal returns plain sealed under a random nonce, base64url.
func (s *Sealer) Seal(plain string) string {
	gcm := mustGCM(s.key)
	nonce := make([]byte, gcm.NonceSize())
	rand.Read(nonce)
	return base64.RawURLEncoding.EncodeToString(gcm.Seal(nonce, nonce, []byte(plain), nil))
}

// Unseal returns the value Seal sealed with the same key, or an error for
// a value sealed under another key, altered or malformed.
func (s *Sealer) Unseal(sealed string) (string, error) {
	b, err := base64.RawURLEncoding.DecodeString(sealed)
	gcm := mustGCM(s.key)
	if err != nil || len(b) < gcm.NonceSize() {
		return "", errors.New("sealed value malformed")
	}
	plain, err := gcm.Open(nil, b[:gcm.NonceSize()], b[gcm.NonceSize():], nil)
	if err != nil {
		return "", err
	}
	return string(plain), nil
}

func mustGCM(key []byte) cipher.AEAD {
	block, err := aes.NewCipher(key)
	if err != nil {
		panic(err) // the key is always 32 bytes
	}
	gcm, err := cipher.NewGCM(block)
	if err != nil {
		panic(err)
	}
	return gcm
}
