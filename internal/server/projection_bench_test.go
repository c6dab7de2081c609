package server

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"testing"
	"time"

	"wardload/internal/demo"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// benchPage is a server on a SQLite file holding the demo data, wired as
// cmd/wardload serve wires it (the SQLite session store, text request log),
// with a signed-in demo charge nurse and the newest projection's page.
type benchPage struct {
	s      *Server
	h      http.Handler
	cookie *http.Cookie
	path   string
}

func newBenchPage(b *testing.B) *benchPage {
	b.Helper()
	ctx := context.Background()
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	st := MustOpenSQLite(b)
	if _, err := demo.Seed(ctx, st, now, testPassword); err != nil {
		b.Fatal(err)
	}
	cfg := DefaultConfig()
	cfg.Password = testPassword
	cfg.Store = st
	cfg.Logger = slog.New(slog.NewTextHandler(io.Discard, nil))
	cfg.Now = func() time.Time { return now }
	cfg.SessionStore = sqlite.NewSessionStore(st, 0)
	s, err := New(cfg)
	if err != nil {
		b.Fatal(err)
	}
	u, err := st.FindUserByName(ctx, "demo.charge1")
	if err != nil {
		b.Fatal(err)
	}
	ward, err := st.FindWardByCode(ctx, demo.WardCode)
	if err != nil {
		b.Fatal(err)
	}
	ps, _, err := st.FindProjections(ctx, wardload.ProjectionFilter{WardID: &ward.ID, LatestOnly: true, Limit: 1})
	if err != nil || len(ps) == 0 {
		b.Fatalf("no demo projection: %v", err)
	}
	return &benchPage{s: s, h: s.Handler(), cookie: MustSession(b, s, u.ID),
		path: fmt.Sprintf("/wards/%s/projections/%d", ward.Code, ps[0].ID)}
}

func (p *benchPage) get(b *testing.B, path string, cookie *http.Cookie) {
	req := httptest.NewRequest("GET", path, nil)
	if cookie != nil {
		req.AddCookie(cookie)
	}
	w := httptest.NewRecorder()
	p.h.ServeHTTP(w, req)
	if w.Code != http.StatusOK {
		b.Fatalf("GET %s: %d", path, w.Code)
	}
}

// BenchmarkProjectionPage serves the projection page of the demo data
// in-process (no network), session check and user lookup included.
func BenchmarkProjectionPage(b *testing.B) {
	p := newBenchPage(b)
	p.get(b, p.path, p.cookie)
	b.Run("serial", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			p.get(b, p.path, p.cookie)
		}
	})
	// A projection's first view builds its page from the stored Input and
	// Result; every later view takes it from the cache.
	b.Run("uncached", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			p.s.projections = newProjectionCache(projectionCacheSize)
			p.get(b, p.path, p.cookie)
		}
	})
	b.Run("parallel", func(b *testing.B) {
		b.ReportAllocs()
		b.RunParallel(func(pb *testing.PB) {
			for pb.Next() {
				p.get(b, p.path, p.cookie)
			}
		})
	})
}

// BenchmarkStaticAsset is the bare static page of the same handler, the
// yardstick of bench/serve.sh, which requests it without a cookie.
func BenchmarkStaticAsset(b *testing.B) {
	p := newBenchPage(b)
	b.ReportAllocs()
	for b.Loop() {
		p.get(b, "/static/wardload.css", nil)
	}
}
