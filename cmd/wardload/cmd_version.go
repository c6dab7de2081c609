package main

import (
	"context"
	"fmt"
)

// version is set at build time with -ldflags "-X main.version=…".
var version = "dev"

func init() {
	register(command{name: "version", summary: "print the version", run: runVersion})
}

func runVersion(_ context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "version", "", "Print the wardload version.")
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintln(e.stderr, "wardload version: takes no arguments (see --help)")
		return exitUsage
	}
	fmt.Fprintln(e.stdout, "wardload", version)
	return exitOK
}
