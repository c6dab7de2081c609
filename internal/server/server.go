// Package server is wardload's HTTP layer: the chi router, its middleware,
// the one adapter that turns handler errors into responses, and the
// handlers. It depends on the domain interfaces only; cmd/wardload hands it
// a store, a logger and a clock in a Config.
package server

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"sync"
	"sync/atomic"
	"time"

	"github.com/alexedwards/scs/v2"

	"wardload/internal/password"
	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// Config is everything the server needs. cmd/wardload fills it from flags
// and the environment; nothing in this package reads either.
type Config struct {
	// Addr is the TCP address to listen on, e.g. "127.0.0.1:8080". Port 0
	// picks a free port; Server.URL reports the real one after Listen.
	Addr string
	// SecureCookies marks cookies Secure; set it when wardload is served
	// over HTTPS (directly or behind a proxy).
	SecureCookies bool
	// SessionStore keeps sign-in sessions: cmd/wardload passes scs's
	// sqlite3store or pgxstore on the same database. Nil keeps sessions in
	// memory, which only tests should do.
	SessionStore scs.Store
	// SessionIdle signs a user out after this long without a request;
	// SessionLifetime after this long in any case. The defaults, 8 and 12
	// hours, let a session last one long shift but not into the next.
	SessionIdle     time.Duration
	SessionLifetime time.Duration
	// TrustForwardedFor counts failed sign-ins against the address in
	// X-Forwarded-For instead of the TCP peer. Set it only behind a proxy
	// that sets that header; otherwise any client could choose its address.
	TrustForwardedFor bool
	// Store is the database. Required.
	Store wardload.Store
	// Logger receives request logs and internal errors. Required.
	Logger *slog.Logger
	// Now is the clock. Handlers that need "now" read it here, never
	// time.Now, so tests can fix time. Defaults to time.Now.
	Now wardload.Clock

	// TrustedOrigins are origins (e.g. "https://wardload.example.org")
	// allowed to send cross-origin POSTs despite the cross-origin check;
	// normally none.
	TrustedOrigins []string

	// Draws is the number of bootstrap draws of each projection a census
	// makes; 0 means projector.DefaultDraws. Tests lower it for speed.
	Draws int

	// HashConcurrency bounds the password checks of sign-ins from unknown
	// devices that run at once (each takes the hash's memory, 64 MiB by
	// default); HashQueue more may wait up to HashWait for a slot, and
	// further sign-ins get 503 with Retry-After without hashing (HashQueue
	// 0: no waiting). Sign-ins from known devices have one slot of their
	// own, so at most HashConcurrency+1 checks run at once.
	HashConcurrency int
	HashQueue       int
	HashWait        time.Duration
	// Password are the argon2id parameters of the hashes the server makes
	// (new and reset passwords); zero means password.DefaultParams. Tests
	// pass cheap ones. Existing hashes carry their own parameters.
	Password password.Params

	// MaxBodyBytes caps every request body; larger bodies fail with 413.
	MaxBodyBytes int64
	// ReadyTimeout bounds the database ping of /readyz.
	ReadyTimeout time.Duration

	ReadHeaderTimeout time.Duration
	ReadTimeout       time.Duration
	WriteTimeout      time.Duration
	IdleTimeout       time.Duration
	// ShutdownTimeout bounds how long Serve waits for in-flight requests
	// after its context is cancelled (and after imports have drained).
	ShutdownTimeout time.Duration
	// DrainTimeout bounds how long Serve lets observation imports in
	// flight finish after its context is cancelled; meanwhile it serves
	// as usual but refuses new imports with 503 and /readyz says not
	// ready.
	DrainTimeout time.Duration
	// FaultLogInterval is how often a failure that repeats (the database
	// away or full) is logged, with the number of requests it failed.
	FaultLogInterval time.Duration
	// ReadyHold is how long /readyz stays not ready after a write failed
	// for lack of space, for a store that cannot check writes itself.
	ReadyHold time.Duration
}

// DefaultConfig returns a Config with the limits and timeouts filled in.
// The caller still sets Store and Logger.
func DefaultConfig() Config {
	return Config{
		Addr:              "127.0.0.1:8080",
		Now:               time.Now,
		MaxBodyBytes:      1 << 20,
		Draws:             projector.DefaultDraws,
		ReadyTimeout:      2 * time.Second,
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       15 * time.Second,
		WriteTimeout:      30 * time.Second,
		IdleTimeout:       120 * time.Second,
		ShutdownTimeout:   10 * time.Second,
		DrainTimeout:      90 * time.Second,
		FaultLogInterval:  10 * time.Second,
		ReadyHold:         30 * time.Second,
		SessionIdle:       8 * time.Hour,
		SessionLifetime:   12 * time.Hour,
		HashConcurrency:   2,
		HashQueue:         8,
		HashWait:          2 * time.Second,
		Password:          password.DefaultParams(),
	}
}

// Server serves wardload over HTTP.
type Server struct {
	cfg     Config
	log     *slog.Logger
	store   wardload.Store
	now     wardload.Clock
	assets  *assets
	cop     *http.CrossOriginProtection
	handler http.Handler
	ln      net.Listener
	http    *http.Server

	sessions *scs.SessionManager
	// Failed sign-ins are throttled per account from the third failure
	// and per address only from the twentieth, because a whole hospital
	// may reach wardload through one address.
	acctThrottle *throttle
	addrThrottle *throttle
	sealKey      []byte // seals one-time token secrets kept in the session
	dummyOnce    sync.Once
	dummy        string
	// signin bounds password hashing and holds device cookies and the
	// summarised audit of failed sign-ins (signin.go).
	signin *signInGuard

	// projector turns a posted census into a stored projection.
	projector *projector.Service
	// projections caches the projection-specific part of projection
	// pages; stored projections never change.
	projections *projectionCache
	// The layout's versioned asset URLs, fixed once the assets are loaded.
	stylesheetURL, iconURL string

	// faults logs the database being away or full once per interval;
	// writes remembers a write that failed for lack of space, for /readyz.
	faults *faultLog
	writes writeHealth
	// draining is set when shutdown begins; imports counts imports in
	// flight, which shutdown waits for (import.go).
	draining atomic.Bool
	imports  atomic.Int64
}

// New checks cfg, fills zero limits from DefaultConfig and builds the
// router from the route table. It does not listen yet.
func New(cfg Config) (*Server, error) {
	if cfg.Store == nil {
		return nil, errors.New("server: Config.Store is required")
	}
	if cfg.Logger == nil {
		return nil, errors.New("server: Config.Logger is required")
	}
	def := DefaultConfig()
	if cfg.Now == nil {
		cfg.Now = def.Now
	}
	for _, f := range []struct{ v, d *time.Duration }{
		{&cfg.ReadyTimeout, &def.ReadyTimeout},
		{&cfg.ReadHeaderTimeout, &def.ReadHeaderTimeout},
		{&cfg.ReadTimeout, &def.ReadTimeout},
		{&cfg.WriteTimeout, &def.WriteTimeout},
		{&cfg.IdleTimeout, &def.IdleTimeout},
		{&cfg.ShutdownTimeout, &def.ShutdownTimeout},
		{&cfg.DrainTimeout, &def.DrainTimeout},
		{&cfg.FaultLogInterval, &def.FaultLogInterval},
		{&cfg.ReadyHold, &def.ReadyHold},
		{&cfg.SessionIdle, &def.SessionIdle},
		{&cfg.SessionLifetime, &def.SessionLifetime},
		{&cfg.HashWait, &def.HashWait},
	} {
		if *f.v <= 0 {
			*f.v = *f.d
		}
	}
	if cfg.MaxBodyBytes <= 0 {
		cfg.MaxBodyBytes = def.MaxBodyBytes
	}
	if cfg.HashConcurrency <= 0 {
		cfg.HashConcurrency = def.HashConcurrency
	}
	a, err := loadAssets(web.Static)
	if err != nil {
		return nil, fmt.Errorf("server: static assets: %w", err)
	}
	s := &Server{cfg: cfg, log: cfg.Logger, store: cfg.Store, now: cfg.Now, assets: a,
		stylesheetURL: a.URL("wardload.css"), iconURL: a.URL("favicon.svg"),
		sessions:     newSessions(cfg),
		acctThrottle: newThrottle(3, 15*time.Minute),
		addrThrottle: newThrottle(20, 15*time.Minute),
		signin:       newSignInGuard(cfg),
		sealKey:      newSealKey(),
		projections:  newProjectionCache(projectionCacheSize),
		faults:       newFaultLog(cfg.Logger, cfg.FaultLogInterval),
	}
	s.projector = &projector.Service{Store: cfg.Store, Now: cfg.Now, Draws: cfg.Draws}
	s.sessions.ErrorFunc = s.sessionError
	if s.cop, err = s.newCrossOriginProtection(); err != nil {
		return nil, fmt.Errorf("server: %w", err)
	}
	routes := s.routeTable()
	for _, rt := range routes {
		if !checkAccess(rt) {
			return nil, fmt.Errorf("server: route %s %s has no valid Access declaration", rt.Method, rt.Pattern)
		}
	}
	s.handler = s.router(routes)
	return s, nil
}

// Handler returns the complete HTTP handler: middleware, cross-origin
// protection and every route of the table.
func (s *Server) Handler() http.Handler { return s.handler }

// Listen binds Config.Addr, so that a port already in use fails here,
// before anything is served.
func (s *Server) Listen() error {
	ln, err := net.Listen("tcp", s.cfg.Addr)
	if err != nil {
		return fmt.Errorf("cannot listen on %s: %w", s.cfg.Addr, err)
	}
	s.ln = ln
	return nil
}

// URL returns the base URL the server listens on, with the real port when
// Addr asked for port 0. It is "" before Listen.
func (s *Server) URL() string {
	if s.ln == nil {
		return ""
	}
	return "http://" + s.ln.Addr().String()
}

// Serve serves on the listener bound by Listen until ctx is cancelled, then
// shuts down gracefully, waiting at most ShutdownTimeout for requests in
// flight. It returns nil after a clean shutdown.
func (s *Server) Serve(ctx context.Context) error {
	if s.ln == nil {
		return errors.New("server: Serve called before Listen")
	}
	s.http = &http.Server{
		Handler:           s.handler,
		ReadHeaderTimeout: s.cfg.ReadHeaderTimeout,
		ReadTimeout:       s.cfg.ReadTimeout,
		WriteTimeout:      s.cfg.WriteTimeout,
		IdleTimeout:       s.cfg.IdleTimeout,
		ErrorLog:          slog.NewLogLogger(s.log.Handler(), slog.LevelWarn),
		// Requests carry the serve context's values but not its
		// cancellation, so a shutdown lets them finish.
		BaseContext: func(net.Listener) context.Context { return context.WithoutCancel(ctx) },
	}
	errc := make(chan error, 1)
	go func() { errc <- s.http.Serve(s.ln) }()
	select {
	case err := <-errc:
		return fmt.Errorf("server stopped: %w", err)
	case <-ctx.Done():
	}
	s.drainImports()
	sctx, cancel := context.WithTimeout(context.WithoutCancel(ctx), s.cfg.ShutdownTimeout)
	defer cancel()
	defer s.faults.flushAll()
	if err := s.http.Shutdown(sctx); err != nil {
		s.http.Close()
		return fmt.Errorf("shutdown: %w", err)
	}
	s.FlushSignInAudit(sctx)
	if err := <-errc; err != nil && !errors.Is(err, http.ErrServerClosed) {
		return fmt.Errorf("server stopped: %w", err)
	}
	return nil
}
