package main

import (
	"context"
	"fmt"
	"net/http"
	"time"
)

func init() {
	register(command{name: "probe", summary: "check that a running wardload is ready (for container health checks)", run: runProbe})
}

// runProbe lets a container health check ask the server whether it is ready
// without a shell or curl in the image: exit 0 when the URL answers 200.
func runProbe(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "probe", "", "GET a wardload health URL; exit 0 when it answers 200 OK, 1 otherwise.")
	url := fs.String("url", "http://127.0.0.1:8080/readyz", "URL to check (env WARDLOAD_URL)")
	timeout := fs.Duration("timeout", 3*time.Second, "give up after this long")
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintln(e.stderr, "wardload probe: takes no arguments (see --help)")
		return exitUsage
	}
	ctx, cancel := context.WithTimeout(ctx, *timeout)
	defer cancel()
	req, err := http.NewRequestWithContext(ctx, http.MethodGet, *url, nil)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload probe: --url is not a valid URL\n")
		return exitUsage
	}
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload probe: %s is not answering\n", *url)
		return exitFailure
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		fmt.Fprintf(e.stderr, "wardload probe: %s answered %s\n", *url, resp.Status)
		return exitFailure
	}
	fmt.Fprintln(e.stdout, "ready")
	return exitOK
}
