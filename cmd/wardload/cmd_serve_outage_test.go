package main

import (
	"io"
	"net"
	"net/http"
	"net/url"
	"strings"
	"sync"
	"testing"
	"time"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// tcpProxy forwards connections to a target until Cut, which closes its
// listener and every connection, as a network failure between wardload
// and PostgreSQL would; Restore listens again on the same address. The
// shared PostgreSQL server itself is never touched.
type tcpProxy struct {
	target string
	mu     sync.Mutex
	addr   string
	ln     net.Listener
	conns  map[net.Conn]bool
}

func mustProxy(tb testing.TB, target string) *tcpProxy {
	tb.Helper()
	p := &tcpProxy{target: target, addr: "127.0.0.1:0", conns: map[net.Conn]bool{}}
	p.Restore(tb)
	tb.Cleanup(p.Cut)
	return p
}

// Restore listens (again) and forwards.
func (p *tcpProxy) Restore(tb testing.TB) {
	tb.Helper()
	ln, err := net.Listen("tcp", p.addr)
	if err != nil {
		tb.Fatal(err)
	}
	p.mu.Lock()
	p.ln, p.addr = ln, ln.Addr().String()
	p.mu.Unlock()
	go func() {
		for {
			c, err := ln.Accept()
			if err != nil {
				return
			}
			u, err := net.Dial("tcp", p.target)
			if err != nil {
				c.Close()
				continue
			}
			p.mu.Lock()
			p.conns[c], p.conns[u] = true, true
			p.mu.Unlock()
			go func() { io.Copy(u, c); u.Close(); c.Close() }()
			go func() { io.Copy(c, u); u.Close(); c.Close() }()
		}
	}()
}

// Cut closes the listener and every forwarded connection.
func (p *tcpProxy) Cut() {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.ln.Close()
	for c := range p.conns {
		c.Close()
	}
	clear(p.conns)
}

// TestServePostgresOutage cuts the connection to PostgreSQL under a
// running wardload: pages answer 503 with Retry-After, say that nothing
// was saved and that the person is still signed in; /readyz is not ready;
// the log gains a bounded number of ERROR lines however many requests
// fail (before: one ERROR line per request). When the connection is back,
// pages and readiness recover by themselves and the session still holds.
func TestServePostgresOutage(t *testing.T) {
	t.Parallel()
	dbURL, accounts := mustDemoDatabase(t)
	u, err := url.Parse(dbURL)
	if err != nil {
		t.Fatal(err)
	}
	p := mustProxy(t, u.Host)
	u.Host = p.addr
	s := MustServe(t, "--addr", "127.0.0.1:0", "--db", u.String(), "--data-dir", t.TempDir(), "--log-format", "json")
	c := signIn(t, s.URL, "demo.charge1", accounts["demo.charge1"])
	census := s.URL + "/wards/" + demo.WardCode + "/census"
	if code, _ := getWith(t, c, census); code != http.StatusOK {
		t.Fatalf("census page before the outage: %d", code)
	}

	p.Cut()
	logBefore := len(s.stderr.String())
	const requests = 300
	for i := range requests {
		res, err := c.Get(census)
		if err != nil {
			t.Fatal(err)
		}
		body, _ := io.ReadAll(res.Body)
		res.Body.Close()
		if res.StatusCode != http.StatusServiceUnavailable || res.Header.Get("Retry-After") == "" {
			t.Fatalf("request %d in the outage: status %d, Retry-After %q", i, res.StatusCode, res.Header.Get("Retry-After"))
		}
		if i == 0 {
			page := string(body)
			if !strings.Contains(page, wardload.MessageUnavailable) || !strings.Contains(page, `data-testid="still-signed-in"`) ||
				strings.Contains(page, `href="/signin"`) || res.Request.URL.Path != "/wards/"+demo.WardCode+"/census" {
				t.Errorf("outage page at %s does not say what happened or offers to sign in:\n%s", res.Request.URL.Path, page)
			}
		}
	}
	if code, body := get(t, s.URL+"/readyz"); code != http.StatusServiceUnavailable {
		t.Errorf("/readyz in the outage: %d %q", code, body)
	}
	outageLog := s.stderr.String()[logBefore:]
	if n := strings.Count(outageLog, `"level":"ERROR"`); n < 1 || n > 2 {
		t.Errorf("%d ERROR lines for %d failed requests, want 1 or 2:\n%s", n, requests, outageLog)
	}
	if n := strings.Count(outageLog, `"msg":"request"`); n < requests {
		t.Errorf("%d request lines for %d requests", n, requests)
	}

	p.Restore(t)
	deadline := time.Now().Add(20 * time.Second)
	for {
		res, err := c.Get(census)
		if err != nil {
			t.Fatal(err)
		}
		io.Copy(io.Discard, res.Body)
		res.Body.Close()
		if res.StatusCode == http.StatusOK && res.Request.URL.Path == "/wards/"+demo.WardCode+"/census" {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("census page 20 s after the outage: %d at %s", res.StatusCode, res.Request.URL)
		}
		time.Sleep(200 * time.Millisecond)
	}
	if code, body := get(t, s.URL+"/readyz"); code != http.StatusOK {
		t.Errorf("/readyz after the outage: %d %q", code, body)
	}
	if code := s.Stop(t); code != 0 {
		t.Errorf("exit code %d", code)
	}
}
