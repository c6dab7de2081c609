package main

import (
	"context"
	"flag"
	"fmt"

	"wardload/internal/wardload"
)

func init() {
	register(command{name: "ward edit", summary: "change a ward's name, time zone or beds", run: runWardEdit})
	register(command{name: "ward retire", summary: "retire a ward: no new census, history kept", run: runWardRetire})
	register(command{name: "ward reinstate", summary: "put a retired ward back in use", run: runWardReinstate})
}

// runWardEdit changes what --name, --time-zone and --beds give; the code
// never changes. Everything is checked before the database is touched,
// and the store audits each change (by "cli").
func runWardEdit(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "ward edit", "CODE",
		"Change a ward's name, time zone or beds. The code cannot change: it is in addresses,\n"+
			"API tokens and exported files.")
	name := fs.String("name", "", "new display name")
	zone := fs.String("time-zone", "", "new IANA time zone, e.g. Europe/Dublin")
	beds := fs.Int("beds", 0, "new number of beds, 1 to 1000")
	so := addStoreFlags(fs)
	codes, code, ok := parseInterleaved(e, fs, args) // flags may follow CODE
	if !ok {
		return code
	}
	if len(codes) != 1 {
		fmt.Fprintln(e.stderr, "wardload ward edit: give exactly one ward CODE (see --help)")
		return exitUsage
	}
	set := flagsSet(fs)
	if !set["name"] && !set["time-zone"] && !set["beds"] {
		fmt.Fprintln(e.stderr, "wardload ward edit: nothing to change: give --name, --time-zone or --beds")
		return exitUsage
	}
	var upd wardload.WardUpdate
	probe := wardload.Ward{Code: "x", Name: "x", TimeZone: "UTC"}
	if set["name"] {
		upd.Name, probe.Name = name, *name
	}
	if set["time-zone"] {
		upd.TimeZone, probe.TimeZone = zone, *zone
	}
	if err := probe.Validate(); err != nil {
		return reportError(e, "ward edit", flagError(err))
	}
	if set["beds"] {
		if err := wardload.CheckWardBeds(*beds); err != nil {
			return reportError(e, "ward edit", flagError(err))
		}
	}

	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload ward edit: %v\n", err)
		return exitFailure
	}
	defer st.Close()
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	w, err := findWard(ctx, st, codes[0])
	if err != nil {
		return reportError(e, "ward edit", err)
	}
	if upd.Name != nil || upd.TimeZone != nil {
		if w, err = st.UpdateWard(ctx, w.ID, upd); err != nil {
			return reportError(e, "ward edit", flagError(err))
		}
	}
	settings, err := st.FindSettings(ctx, w.ID)
	if err != nil {
		return reportError(e, "ward edit", err)
	}
	if set["beds"] && settings.Beds != *beds {
		settings.Beds, settings.UpdatedBy = *beds, 0
		if err := st.SaveSettings(ctx, settings); err != nil {
			return reportError(e, "ward edit", flagError(err))
		}
	}
	fmt.Fprintf(e.stdout, "ward %s: %s (%s", w.Code, w.Name, w.TimeZone)
	if settings.Beds > 0 {
		fmt.Fprintf(e.stdout, ", %d beds", settings.Beds)
	}
	fmt.Fprintln(e.stdout, ")")
	return exitOK
}

// runWardRetire retires a ward: it takes no new census and is listed only
// to admins; its observations, censuses and projections stay.
func runWardRetire(ctx context.Context, e *env, args []string) int {
	return setRetired(ctx, e, args, "ward retire", true,
		"Retire a ward: it takes no new census and is hidden from everyone's ward list but the\n"+
			"admins'. Nothing is deleted; `wardload ward reinstate CODE` undoes it.")
}

// runWardReinstate puts a retired ward back in use.
func runWardReinstate(ctx context.Context, e *env, args []string) int {
	return setRetired(ctx, e, args, "ward reinstate", false, "Put a retired ward back in use.")
}

func setRetired(ctx context.Context, e *env, args []string, cmd string, retired bool, help string) int {
	fs := newFlagSet(e, cmd, "CODE", help)
	so := addStoreFlags(fs)
	codes, code, ok := parseInterleaved(e, fs, args)
	if !ok {
		return code
	}
	if len(codes) != 1 {
		fmt.Fprintf(e.stderr, "wardload %s: give exactly one ward CODE (see --help)\n", cmd)
		return exitUsage
	}
	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", cmd, err)
		return exitFailure
	}
	defer st.Close()
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	w, err := findWard(ctx, st, codes[0])
	if err != nil {
		return reportError(e, cmd, err)
	}
	if w, err = st.UpdateWard(ctx, w.ID, wardload.WardUpdate{Retired: &retired}); err != nil {
		return reportError(e, cmd, err)
	}
	if retired {
		fmt.Fprintf(e.stdout, "ward %s retired %s; its history is kept\n", w.Code, w.RetiredAt.UTC().Format("2006-01-02 15:04 UTC"))
	} else {
		fmt.Fprintf(e.stdout, "ward %s is in use again\n", w.Code)
	}
	return exitOK
}

// flagsSet returns the names of the flags given, on the command line or
// from the environment.
func flagsSet(fs *flag.FlagSet) map[string]bool {
	set := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { set[f.Name] = true })
	return set
}

// findWard looks a ward up by the code typed, naming it when unknown.
func findWard(ctx context.Context, st wardload.WardService, code string) (*wardload.Ward, error) {
	w, err := st.FindWardByCode(ctx, code)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		return nil, wardload.Errorf(wardload.ENOTFOUND, "There is no ward with code %q (see wardload ward list).", code)
	}
	return w, err
}
