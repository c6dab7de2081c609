//go:build unix

package server

import "syscall"

// processCPU returns the user and system CPU time the process has used,
// in nanoseconds, or -1 when it cannot be read.
func processCPU() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return -1
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}
