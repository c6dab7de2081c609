package server

import (
	"context"
	"time"

	"wardload/internal/retention"
	"wardload/internal/signin"
	"wardload/internal/wardload"
)

// startMaintain runs maintain now and then every MaintainInterval until
// ctx ends or the returned stop is called (which waits for a run in
// progress to finish).
func (s *Server) startMaintain(ctx context.Context) (stop func()) {
	ctx, cancel := context.WithCancel(ctx)
	done := make(chan struct{})
	go func() {
		defer close(done)
		t := time.NewTicker(s.cfg.MaintainInterval)
		defer t.Stop()
		for {
			s.maintain(ctx)
			select {
			case <-ctx.Done():
				return
			case <-t.C:
			}
		}
	}()
	return func() { cancel(); <-done }
}

// maintain keeps the tables an attacker could grow bounded: it forgets
// old sign-in throttle counts (signin.Purge) and applies the retention
// rule of security events, exporting before purging. Failures are logged
// and tried again next time; several instances may run it at once, as
// each purge is one transaction.
func (s *Server) maintain(ctx context.Context) {
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "system"})
	now := s.now()
	if n, err := signin.Purge(ctx, s.store, now); err != nil {
		s.log.Error("purge sign-in throttle counts", "err", err)
	} else if n > 0 {
		s.log.Info("purged sign-in throttle counts", "rows", n)
	}
	if s.cfg.SecurityRetention <= 0 {
		return
	}
	if s.cfg.AuditExportDir == "" {
		s.maintainWarn.Do(func() {
			s.log.Warn("security events are kept: a retention period is set but no export directory")
		})
		return
	}
	before := now.Add(-s.cfg.SecurityRetention)
	path, n, err := retention.PurgeToDir(ctx, s.store, before, now, s.cfg.AuditExportDir)
	if err != nil {
		s.log.Error("purge security events", "before", before, "err", err)
		return
	}
	if n > 0 {
		s.log.Info("purged security events", "before", before, "rows", n, "export", path)
	}
}
