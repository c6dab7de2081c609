// Package retention applies the retention rule of security events: sign-in
// successes and failure summaries, sign-outs and refused API tokens older
// than the retention period are written to an export (JSON Lines) and then
// deleted from the audit log, in that order. The audit of data changes is
// never touched: the store's PurgeSecurityAudit deletes only the domain's
// wardload.SecurityActions.
package retention

import (
	"bufio"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"wardload/internal/wardload"
)

// DefaultPeriod keeps security events for a year: long enough for an
// annual access review and for looking back at an incident found late,
// short enough that the table of who signed in when does not grow
// forever. Common practice, no source.
const DefaultPeriod = 365 * 24 * time.Hour

// ExportMode is the mode of an export file: it names staff and addresses.
const ExportMode = 0o600

// line is one exported entry, as JSON.
type line struct {
	ID       int64     `json:"id"`
	At       time.Time `json:"at"`
	UserID   int64     `json:"user_id"`
	Actor    string    `json:"actor"`
	Action   string    `json:"action"`
	Entity   string    `json:"entity"`
	EntityID int64     `json:"entity_id"`
	WardID   int64     `json:"ward_id"`
	Before   string    `json:"before,omitempty"`
	After    string    `json:"after,omitempty"`
}

// Purge writes every security event older than before to w, one JSON
// object a line, oldest first, and then deletes them; if writing fails,
// nothing is deleted. The purge is audited by the actor in ctx. It
// returns how many events it deleted.
func Purge(ctx context.Context, st wardload.AuditService, before time.Time, w io.Writer) (int, error) {
	bw := bufio.NewWriter(w)
	enc := json.NewEncoder(bw)
	return st.PurgeSecurityAudit(ctx, before, func(e *wardload.AuditEntry) error {
		if e == nil {
			if err := bw.Flush(); err != nil {
				return fmt.Errorf("export: %w", err)
			}
			// A regular file is on disk before anything is deleted;
			// stdout as a pipe or terminal has nothing to sync.
			if f, ok := w.(*os.File); ok {
				if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() {
					if err := f.Sync(); err != nil {
						return fmt.Errorf("export: %w", err)
					}
				}
			}
			return nil
		}
		if err := enc.Encode(line{e.ID, e.At.UTC(), e.UserID, e.Actor, e.Action, e.Entity, e.EntityID, e.WardID, e.Before, e.After}); err != nil {
			return fmt.Errorf("export: %w", err)
		}
		return nil
	})
}

// CreateExport creates a new export file at path with ExportMode; it
// never overwrites one.
func CreateExport(path string) (*os.File, error) {
	return os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, ExportMode)
}

// PurgeToDir is Purge with the export in a new file in dir (created 0700
// if missing), named after the cut-off and the time of the purge. The
// file is removed again when nothing was purged (or the purge failed, so
// nothing was deleted): an hourly run leaves a file only when it deleted
// something. It returns the file's path ("" when removed) and the number
// deleted.
func PurgeToDir(ctx context.Context, st wardload.AuditService, before, now time.Time, dir string) (string, int, error) {
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return "", 0, err
	}
	path := filepath.Join(dir, fmt.Sprintf("security-events-before-%s-at-%s.jsonl",
		before.UTC().Format("20060102T150405Z"), now.UTC().Format("20060102T150405Z")))
	f, err := CreateExport(path)
	if err != nil {
		return "", 0, err
	}
	n, err := Purge(ctx, st, before, f)
	if cerr := f.Close(); err == nil && cerr != nil {
		// The rows are gone; the export must stay, whatever it holds.
		return path, n, cerr
	}
	if err != nil || n == 0 {
		os.Remove(path)
		return "", n, err
	}
	return path, n, nil
}

// ParsePeriod reads a retention period: a number of days ("365d"), or a
// Go duration ("8760h"); "0" keeps security events forever.
func ParsePeriod(s string) (time.Duration, error) {
	if s == "0" {
		return 0, nil
	}
	if d, ok := strings.CutSuffix(s, "d"); ok {
		n, err := strconv.Atoi(d)
		if err != nil || n < 1 || n > 36500 {
			return 0, fmt.Errorf("%q: want a number of days from 1 to 36500, e.g. 365d", s)
		}
		return time.Duration(n) * 24 * time.Hour, nil
	}
	d, err := time.ParseDuration(s)
	if err != nil || d < time.Hour {
		return 0, fmt.Errorf("%q: want days (365d), a duration of at least 1h, or 0 to keep forever", s)
	}
	return d, nil
}

// FormatPeriod writes d the way ParsePeriod reads it, in days when whole.
func FormatPeriod(d time.Duration) string {
	if d == 0 {
		return "0"
	}
	if d%(24*time.Hour) == 0 {
		return strconv.Itoa(int(d/(24*time.Hour))) + "d"
	}
	return d.String()
}
