package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"path/filepath"
	"strconv"
	"text/tabwriter"
	"time"

	"github.com/alexedwards/scs/v2"

	"wardload/internal/demo"
	"wardload/internal/postgres"
	"wardload/internal/retention"
	"wardload/internal/server"
	"wardload/internal/sqlite"
)

func init() {
	register(command{name: "serve", summary: "run the web interface and API", run: runServe})
}

// checkAddr checks that addr is HOST:PORT with a port number from 0 to
// 65535 (0: any free port).
func checkAddr(addr string) error {
	_, port, err := net.SplitHostPort(addr)
	if err != nil {
		return errors.New("must be HOST:PORT, e.g. 127.0.0.1:8080")
	}
	if _, err := strconv.ParseUint(port, 10, 16); err != nil {
		return errors.New("needs a port number from 0 to 65535")
	}
	return nil
}

func runServe(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "serve", "", "Migrate the database, then serve the web interface and API until interrupted.")
	addr := fs.String("addr", "127.0.0.1:8080", "address to listen on; port 0 picks a free port (env WARDLOAD_ADDR)")
	so := addStoreFlags(fs)
	seed := fs.Bool("demo", false, "on first start, add a fictional demo ward with accounts and print their passwords once (env WARDLOAD_DEMO)")
	secure := fs.Bool("secure-cookies", false, "mark cookies Secure; use when served over HTTPS (env WARDLOAD_SECURE_COOKIES)")
	trustXFF := fs.Bool("trust-proxy", false, "count failed sign-ins by the X-Forwarded-For address; only behind a proxy that sets it (env WARDLOAD_TRUST_PROXY)")
	logFormat := fs.String("log-format", "text", "log format: text or json, one line per request (env WARDLOAD_LOG_FORMAT)")
	logLevel := fs.String("log-level", "info", "lowest level logged: debug, info, warn or error (env WARDLOAD_LOG_LEVEL)")
	drain := fs.Duration("drain-timeout", server.DefaultConfig().DrainTimeout,
		"on shutdown, how long imports in flight may finish while new ones are refused (env WARDLOAD_DRAIN_TIMEOUT)")
	keep := periodFlag(retention.DefaultPeriod)
	fs.Var(&keep, "security-retention",
		"how long security events (sign-ins, failures, sign-outs) stay in the audit log: days (365d), a duration, or 0 for ever (env WARDLOAD_SECURITY_RETENTION)")
	exportDir := fs.String("audit-export-dir", "",
		"directory for the exports of purged security events; empty: audit-exports in --data-dir (env WARDLOAD_AUDIT_EXPORT_DIR)")
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "wardload: serve takes no arguments\n")
		return exitUsage
	}
	log, err := newLogger(e.stderr, *logFormat, *logLevel)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitUsage
	}
	if _, err := so.kind(); err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitUsage
	}
	// A mistyped address is bad usage, found before the database is
	// opened (and created); a port that is taken is still a failure.
	if err := checkAddr(*addr); err != nil {
		fmt.Fprintf(e.stderr, "wardload: --addr %q %v\n", *addr, err)
		return exitUsage
	}
	for _, m := range so.looseModes() {
		log.Warn(m.String())
	}
	so.Now = e.clock
	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitFailure
	}
	defer st.Close()
	log.Info("database ready", "kind", st.Kind, "where", st.Where)

	if *seed {
		res, err := demo.Seed(ctx, st.Store, e.clock(), e.password)
		if err != nil {
			fmt.Fprintf(e.stderr, "wardload: cannot add demo data: %s\n", oneLine(err))
			return exitFailure
		}
		printDemo(e, res)
	}

	cfg := server.DefaultConfig()
	cfg.Addr = *addr
	cfg.SecureCookies = *secure
	cfg.Store = st.Store
	cfg.Logger = log
	cfg.Now = e.clock
	cfg.TrustForwardedFor = *trustXFF
	cfg.DrainTimeout = *drain
	cfg.SecurityRetention = time.Duration(keep)
	cfg.AuditExportDir = *exportDir
	if cfg.AuditExportDir == "" {
		cfg.AuditExportDir = filepath.Join(so.DataDir, "audit-exports")
	}
	cfg.Password = e.password
	sessions := sessionStore(st)
	defer sessions.StopCleanup()
	cfg.SessionStore = sessions
	srv, err := server.New(cfg)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitFailure
	}
	if err := srv.Listen(); err != nil {
		fmt.Fprintf(e.stderr, "wardload: %s\n", oneLine(err))
		return exitFailure
	}
	// Plain line on stdout for people and for the end-to-end tests, which
	// parse the real port from it.
	fmt.Fprintf(e.stdout, "listening on %s\n", srv.URL())
	log.Info("listening", "url", srv.URL())
	if err := srv.Serve(ctx); err != nil {
		fmt.Fprintf(e.stderr, "wardload: %s\n", oneLine(err))
		return exitFailure
	}
	log.Info("stopped")
	return exitOK
}

// periodFlag is a retention period flag: days ("365d"), a Go duration or
// "0" (retention.ParsePeriod).
type periodFlag time.Duration

func (p *periodFlag) String() string { return retention.FormatPeriod(time.Duration(*p)) }

func (p *periodFlag) Set(s string) error {
	d, err := retention.ParsePeriod(s)
	*p = periodFlag(d)
	return err
}

// newLogger returns the server's logger: text (logfmt) or JSON lines, from
// level up.
func newLogger(w io.Writer, format, level string) (*slog.Logger, error) {
	var lv slog.Level
	if err := lv.UnmarshalText([]byte(level)); err != nil {
		return nil, fmt.Errorf("--log-level %q must be debug, info, warn or error", level)
	}
	opts := &slog.HandlerOptions{Level: lv}
	switch format {
	case "text":
		return slog.New(slog.NewTextHandler(w, opts)), nil
	case "json":
		return slog.New(slog.NewJSONHandler(w, opts)), nil
	}
	return nil, fmt.Errorf("--log-format %q must be text or json", format)
}

// printDemo shows the demo accounts' passwords, which exist only now: the
// store keeps hashes. A second start with --demo finds the ward and prints
// nothing.
func printDemo(e *env, res *demo.Result) {
	if !res.Created {
		fmt.Fprintln(e.stdout, "demo data already present; passwords were shown when it was created")
		return
	}
	fmt.Fprintln(e.stdout, "Demo data created (a fictional ward). Accounts; passwords are shown only this once:")
	tw := tabwriter.NewWriter(e.stdout, 2, 8, 2, ' ', 0)
	fmt.Fprintln(tw, "  NAME\tROLE\tPASSWORD")
	for _, a := range res.Accounts {
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", a.Name, a.Role, a.Password)
	}
	tw.Flush()
}

// sessionStore keeps sign-in sessions in the same database as everything
// else, in the sessions table both migrations create; expired rows are
// removed every five minutes. On SQLite it is the store's own session
// store, which reads on the read pool rather than queueing every page's
// session lookup behind the single writer.
func sessionStore(st *openedStore) interface {
	scs.Store
	StopCleanup()
} {
	if pg, ok := st.Store.(*postgres.Store); ok {
		return postgres.NewSessionStore(pg, 5*time.Minute)
	}
	return sqlite.NewSessionStore(st.SQLite, 5*time.Minute)
}
