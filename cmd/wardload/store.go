package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"time"

	"github.com/jackc/pgx/v5/pgxpool"

	"wardload/internal/postgres"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// storeOptions choose the database: a postgres:// URL selects PostgreSQL,
// anything empty selects the SQLite file in DataDir.
type storeOptions struct {
	DB      string
	DataDir string
	// Now is the store's clock for the times it records and the rules
	// that read the time (an end-of-shift record waits for the shift's
	// end); nil is time.Now. serve passes its own clock, so a server run
	// with an injected clock has one time throughout.
	Now func() time.Time
}

// clock is Now, or time.Now when unset.
func (o *storeOptions) clock() func() time.Time {
	if o.Now != nil {
		return o.Now
	}
	return time.Now
}

// addStoreFlags registers --db and --data-dir on fs; like every flag they
// fall back to WARDLOAD_DB and WARDLOAD_DATA_DIR (see applyEnv).
func addStoreFlags(fs *flag.FlagSet) *storeOptions {
	o := &storeOptions{}
	fs.StringVar(&o.DB, "db", "",
		"PostgreSQL URL (postgres://…); empty uses the SQLite file in --data-dir (env WARDLOAD_DB)")
	fs.StringVar(&o.DataDir, "data-dir", "./wardload-data",
		"directory for the SQLite database (env WARDLOAD_DATA_DIR)")
	return o
}

// openedStore is an open store plus the handle its kind offers, which the
// session store needs (scs has one backend per database).
type openedStore struct {
	wardload.Store
	SQLite *sqlite.Store // nil for PostgreSQL
	PGPool *pgxpool.Pool // PostgreSQL's pool, nil for SQLite
	Kind   string        // "sqlite" or "postgres"
	Where  string        // the SQLite file, or host/database of PostgreSQL (no password)
}

// kind returns which database o selects, or an error for a URL that is
// neither empty nor postgres.
func (o *storeOptions) kind() (string, error) {
	switch {
	case o.DB == "":
		return "sqlite", nil
	case strings.HasPrefix(o.DB, "postgres://"), strings.HasPrefix(o.DB, "postgresql://"):
		return "postgres", nil
	}
	// Do not echo the value: it may be a URL with a password in it.
	return "", errors.New("--db must be empty (SQLite) or a postgres:// or postgresql:// URL")
}

// sqlitePath is the SQLite file inside the data directory.
func (o *storeOptions) sqlitePath() string { return filepath.Join(o.DataDir, "wardload.db") }

// looseMode is a data directory or database file that users other than
// its owner may read or write.
type looseMode struct {
	Path  string
	Mode  fs.FileMode // permission bits
	IsDir bool
}

// String is one line for the log or stderr, with the fix.
func (m looseMode) String() string {
	want := "600"
	what := "database file"
	if m.IsDir {
		want, what = "700", "data directory"
	}
	return fmt.Sprintf("%s %s is open to other users (mode %#o): it holds password hashes, sessions and the audit log; run: chmod %s %s",
		what, m.Path, m.Mode, want, m.Path)
}

// looseModes returns the SQLite data directory, database file and its
// -wal and -shm files that exist and have any group or other permission
// bit set. wardload creates them 0700 and 0600, but a directory made by
// hand, or files from an earlier version, may be wider; the files hold
// password hashes and live session tokens. It returns nil for
// PostgreSQL, and on Windows, whose permission bits mean nothing here.
func (o *storeOptions) looseModes() []looseMode {
	if kind, err := o.kind(); err != nil || kind != "sqlite" || o.DataDir == "" || runtime.GOOS == "windows" {
		return nil
	}
	var loose []looseMode
	db := o.sqlitePath()
	for _, p := range []string{o.DataDir, db, db + "-wal", db + "-shm"} {
		fi, err := os.Stat(p)
		if err != nil {
			continue // not there yet: created private
		}
		if perm := fi.Mode().Perm(); perm&0o077 != 0 {
			loose = append(loose, looseMode{Path: p, Mode: perm, IsDir: fi.IsDir()})
		}
	}
	return loose
}

// openStore opens the selected database and, when migrate is set, applies
// pending migrations. Errors are one line, fit to print after "wardload: ".
func openStore(ctx context.Context, o *storeOptions, migrate bool) (*openedStore, error) {
	kind, err := o.kind()
	if err != nil {
		return nil, err
	}
	var st *openedStore
	switch kind {
	case "sqlite":
		if o.DataDir == "" {
			return nil, errors.New("--data-dir must not be empty")
		}
		// 0700: the database holds password hashes and the audit log.
		// A directory created here gets exactly that whatever the umask;
		// an existing one keeps the operator's mode (looseModes warns).
		_, statErr := os.Stat(o.DataDir)
		if err := os.MkdirAll(o.DataDir, 0o700); err != nil {
			return nil, fmt.Errorf("cannot create data directory: %s", oneLine(err))
		}
		if errors.Is(statErr, fs.ErrNotExist) {
			if err := os.Chmod(o.DataDir, 0o700); err != nil {
				return nil, fmt.Errorf("cannot set the data directory's mode: %s", oneLine(err))
			}
		}
		path := o.sqlitePath()
		db, err := sqlite.Open(ctx, sqlite.Config{Path: path, Now: o.clock()})
		if err != nil {
			return nil, fmt.Errorf("cannot open database: %s", oneLine(err))
		}
		st = &openedStore{Store: db, SQLite: db, Kind: kind, Where: path}
	case "postgres":
		db, err := postgres.Open(ctx, postgres.Config{URL: o.DB, Now: o.clock()})
		if err != nil {
			return nil, fmt.Errorf("cannot open database: %s", oneLine(err))
		}
		cc := db.Pool().Config().ConnConfig
		st = &openedStore{Store: db, PGPool: db.Pool(), Kind: kind,
			Where: fmt.Sprintf("%s:%d/%s", cc.Host, cc.Port, cc.Database)}
	}
	if migrate {
		if err := st.migrate(ctx); err != nil {
			st.Close()
			return nil, err
		}
	}
	return st, nil
}

// openExistingStore opens a database that must already hold wardload's
// schema, for commands that only read or add to it (ward list, export). It
// never creates an SQLite file, so a mistyped --data-dir is reported
// instead of leaving an empty database behind.
func openExistingStore(ctx context.Context, o *storeOptions) (*openedStore, error) {
	kind, err := o.kind()
	if err != nil {
		return nil, err
	}
	if kind == "sqlite" {
		if _, err := os.Stat(o.sqlitePath()); err != nil {
			return nil, fmt.Errorf("no wardload database at %s; run 'wardload migrate' (or 'wardload serve') first", o.sqlitePath())
		}
	}
	st, err := openStore(ctx, o, false)
	if err != nil {
		return nil, err
	}
	v, err := st.schemaVersion(ctx)
	if err != nil || v == 0 {
		st.Close()
		return nil, fmt.Errorf("the database at %s has no wardload schema yet; run 'wardload migrate' first", st.Where)
	}
	return st, nil
}

// migrate applies pending migrations of whichever store is open.
func (st *openedStore) migrate(ctx context.Context) error {
	m, ok := st.Store.(interface{ Migrate(context.Context) error })
	if !ok {
		return fmt.Errorf("cannot migrate: the %s store has no migrations", st.Kind)
	}
	if err := m.Migrate(ctx); err != nil {
		return fmt.Errorf("cannot migrate database: %s", oneLine(err))
	}
	return nil
}

// schemaVersion returns the newest applied migration. It reads goose's
// version table, which both stores use; a fresh database has none, which
// is an error, and the version returned with any error is 0.
func (st *openedStore) schemaVersion(ctx context.Context) (int64, error) {
	const q = `SELECT COALESCE(MAX(version_id), 0) FROM goose_db_version`
	var v int64
	var err error
	switch {
	case st.SQLite != nil:
		err = st.SQLite.DB().QueryRowContext(ctx, q).Scan(&v)
	case st.PGPool != nil:
		err = st.PGPool.QueryRow(ctx, q).Scan(&v)
	default:
		err = errors.New("no database handle")
	}
	if err != nil {
		return 0, err
	}
	return v, nil
}

// oneLine flattens multi-line driver errors so the command prints one line.
func oneLine(err error) string {
	return strings.Join(strings.Fields(err.Error()), " ")
}
