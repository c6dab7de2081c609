package server

import (
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"
)

func TestDeviceCookies(t *testing.T) {
	d := newDeviceCookies(false)
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	// issue answers with the cookie for a request carrying prev (nil: none).
	issue := func(prev *http.Cookie, account string) *http.Cookie {
		req := httptest.NewRequest("POST", "/signin", nil)
		if prev != nil {
			req.AddCookie(prev)
		}
		rec := httptest.NewRecorder()
		d.issue(rec, req, account, now)
		return rec.Result().Cookies()[0]
	}
	find := func(c *http.Cookie, account string, at time.Time) (string, bool) {
		req := httptest.NewRequest("POST", "/signin", nil)
		req.AddCookie(c)
		return d.find(req, account, at)
	}
	a := issue(nil, "n.nurse")
	if a.Name != "wardload_device" || strings.Contains(a.Value, "nurse") {
		t.Errorf("cookie %s=%s", a.Name, a.Value)
	}
	idA, ok := find(a, "n.nurse", now)
	if !ok || idA == "" {
		t.Fatal("a fresh device cookie is not valid for its account")
	}
	if _, ok := find(a, "m.manager", now); ok {
		t.Error("valid for another account")
	}
	if _, ok := find(a, "n.nurse", now.Add(deviceLifetime+time.Second)); ok {
		t.Error("valid after its lifetime")
	}
	if _, ok := find(a, "n.nurse", now.Add(-2*time.Minute)); ok {
		t.Error("valid before it was issued")
	}
	for _, v := range []string{a.Value[:len(a.Value)-1] + "x", "", "a.b", strings.Repeat("~", 1000), a.Value + "." + a.Value} {
		if _, ok := find(&http.Cookie{Name: a.Name, Value: v}, "n.nurse", now); ok {
			t.Errorf("tampered value %q accepted", v)
		}
	}
	// Another account on the same browser joins the cookie; a new sign-in
	// of n.nurse replaces n.nurse's entry (a new device ID).
	both := issue(a, "m.manager")
	if _, ok := find(both, "m.manager", now); !ok {
		t.Error("m.manager not known after signing in")
	}
	if id, ok := find(both, "n.nurse", now); !ok || id != idA {
		t.Error("n.nurse forgotten when m.manager signed in on the same browser")
	}
	again := issue(both, "n.nurse")
	if id, ok := find(again, "n.nurse", now); !ok || id == idA || strings.Count(again.Value, "~") != 1 {
		t.Errorf("re-issue: id changed %v, entries %d; want a new id and 2 entries", id != idA, strings.Count(again.Value, "~")+1)
	}
	// At most maxEntries accounts are remembered, the newest.
	c := again
	for _, name := range []string{"u1", "u2", "u3", "u4", "u5", "u6", "u7", "u8"} {
		c = issue(c, name)
	}
	if n := strings.Count(c.Value, "~") + 1; n != d.maxEntries {
		t.Errorf("%d entries, want %d", n, d.maxEntries)
	}
	if _, ok := find(c, "u1", now); !ok {
		t.Error("u1 dropped while among the newest")
	}
	if _, ok := find(c, "n.nurse", now); ok {
		t.Error("the oldest account kept past maxEntries")
	}
	if s := newDeviceCookies(true); s.name != "__Secure-wardload_device" || !issueWith(s).Secure {
		t.Error("secure cookies: want the __Secure- name and the Secure flag")
	}
}

func issueWith(d *deviceCookies) *http.Cookie {
	rec := httptest.NewRecorder()
	d.issue(rec, httptest.NewRequest("POST", "/signin", nil), "x", time.Unix(0, 0))
	return rec.Result().Cookies()[0]
}
