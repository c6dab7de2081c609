// Command wardload estimates nurse staffing workload. See README.md.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
	// The ward forms offer every IANA zone; embedding Go's zone database
	// lets each load on a host (or container) without /usr/share/zoneinfo.
	_ "time/tzdata"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], &env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr, getenv: os.Getenv})
	stop()
	os.Exit(code)
}
