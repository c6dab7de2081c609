package main

import (
	"context"
	"fmt"

	"wardload/internal/wardload"
)

func init() {
	register(command{name: "ward list", summary: "list ward codes and names", run: runWardList})
}

// runWardList prints "CODE<TAB>NAME<TAB>STATE" per ward, ordered by code,
// so that it can be piped into cut or awk; STATE is "active" or "retired"
// with the UTC date it was retired.
func runWardList(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "ward list", "", "List the wards: code, name and state (active, or retired YYYY-MM-DD), tab-separated,\none per line.")
	active := fs.Bool("active", false, "list only the wards in use (not retired)")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() != 0 {
		fmt.Fprintln(e.stderr, "wardload ward list: takes no arguments (see --help)")
		return exitUsage
	}
	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload ward list: %v\n", err)
		return exitFailure
	}
	defer st.Close()

	const page = 500
	for offset := 0; ; offset += page {
		wards, total, err := st.FindWards(ctx, wardload.WardFilter{ActiveOnly: *active, Offset: offset, Limit: page})
		if err != nil {
			return reportError(e, "ward list", err)
		}
		for _, w := range wards {
			state := "active"
			if w.Retired() {
				state = "retired " + w.RetiredAt.UTC().Format("2006-01-02")
			}
			fmt.Fprintf(e.stdout, "%s\t%s\t%s\n", w.Code, w.Name, state)
		}
		if len(wards) == 0 || offset+len(wards) >= total {
			return exitOK
		}
	}
}
