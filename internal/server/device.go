package server

import (
	"crypto/hmac"
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"net/http"
	"strconv"
	"strings"
	"time"
)

// deviceCookies implements the device cookie of the OWASP Authentication
// Cheat Sheet ("Device cookies", under account lockout): every successful
// sign-in leaves in that browser a cookie that proves "this browser has
// signed in as this account before". While an account is throttled for
// unknown browsers because somebody is guessing its password, a sign-in
// that carries a valid device cookie for the account is counted against
// that device alone, with its own limit, so the attacker cannot lock the
// real user out of the browsers they use.
//
// A cookie holds up to maxEntries entries, newest first, so that a shared
// ward computer remembers each of the staff who sign in on it. An entry is
//
//	nonce "." issued "." mac
//
// with a random 12-byte nonce (the device's identity for throttling), the
// Unix time of issue and HMAC-SHA256(key, nonce, issued, account name)
// truncated to 16 bytes, all base64url. The account name is inside the
// MAC, not the cookie, so an entry names nobody and proves nothing for any
// other account. The key is the installation's (keyed), shared by every
// instance on the database.
type deviceCookies struct {
	key        []byte
	name       string
	secure     bool
	lifetime   time.Duration
	maxEntries int
}

// deviceLifetime is how long a device stays known after a sign-in on it;
// common practice, no source.
const deviceLifetime = 30 * 24 * time.Hour

func newDeviceCookies(secure bool) *deviceCookies {
	d := &deviceCookies{key: make([]byte, 32), name: "wardload_device", secure: secure,
		lifetime: deviceLifetime, maxEntries: 8}
	rand.Read(d.key) // never fails (crypto/rand panics instead)
	if secure {
		d.name = "__Secure-wardload_device"
	}
	return d
}

// keyed returns d with the MAC key key: the installation's key from the
// store (signin.Keys), so that a cookie one instance issued is valid on
// every instance on the database and after a restart.
func (d *deviceCookies) keyed(key []byte) *deviceCookies {
	c := *d
	c.key = key
	return &c
}

func (d *deviceCookies) mac(nonce, issued, account string) string {
	m := hmac.New(sha256.New, d.key)
	m.Write([]byte("wardload device v1\x00" + nonce + "\x00" + issued + "\x00" + account))
	return base64.RawURLEncoding.EncodeToString(m.Sum(nil)[:16])
}

// entries returns the well-formed, unexpired entries of r's device cookie
// at now, at most maxEntries of them.
func (d *deviceCookies) entries(r *http.Request, now time.Time) [][3]string {
	c, err := r.Cookie(d.name)
	if err != nil {
		return nil
	}
	parts := strings.SplitN(c.Value, "~", d.maxEntries+1)
	parts = parts[:min(len(parts), d.maxEntries)] // the rest, if any, is ignored
	var out [][3]string
	for _, e := range parts {
		p := strings.Split(e, ".")
		if len(p) != 3 {
			continue
		}
		issued, err := strconv.ParseInt(p[1], 10, 64)
		if err != nil {
			continue
		}
		at := time.Unix(issued, 0)
		if now.Sub(at) > d.lifetime || at.Sub(now) > time.Minute {
			continue
		}
		out = append(out, [3]string{p[0], p[1], p[2]})
	}
	return out
}

// find returns the device ID of the entry in r's device cookie that is
// valid for account at now, and whether there is one.
func (d *deviceCookies) find(r *http.Request, account string, now time.Time) (string, bool) {
	for _, e := range d.entries(r, now) {
		if hmac.Equal([]byte(e[2]), []byte(d.mac(e[0], e[1], account))) {
			return e[0], true
		}
	}
	return "", false
}

// issue sets a cookie with a fresh entry for account first, followed by
// the other unexpired entries of r's cookie (any earlier entry for account
// is dropped, so its device ID and count are gone).
func (d *deviceCookies) issue(w http.ResponseWriter, r *http.Request, account string, now time.Time) {
	b := make([]byte, 12)
	rand.Read(b)
	nonce, issued := base64.RawURLEncoding.EncodeToString(b), strconv.FormatInt(now.Unix(), 10)
	vals := []string{nonce + "." + issued + "." + d.mac(nonce, issued, account)}
	for _, e := range d.entries(r, now) {
		if len(vals) < d.maxEntries && !hmac.Equal([]byte(e[2]), []byte(d.mac(e[0], e[1], account))) {
			vals = append(vals, strings.Join(e[:], "."))
		}
	}
	http.SetCookie(w, &http.Cookie{Name: d.name, Value: strings.Join(vals, "~"), Path: "/signin",
		MaxAge: int(d.lifetime / time.Second), HttpOnly: true, Secure: d.secure, SameSite: http.SameSiteStrictMode})
}
