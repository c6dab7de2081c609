package main

import (
	"context"
	"fmt"

	"wardload/internal/server"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "ward add", summary: "create a ward (code, name, time zone, beds)", run: runWardAdd})
}

// wardAddFlags maps the fields the domain's Validate names to the flags of
// ward add, so that a refusal names the flag the operator typed.
var wardAddFlags = map[string]string{
	"code":      "--code",
	"name":      "--name",
	"time_zone": "--time-zone",
	"beds":      "--beds",
}

// runWardAdd creates a ward and, when --beds is given, saves its bed count
// in the ward's settings. Shift patterns, tiers and ratio floors are set up
// on the ward's settings page, whose path it prints.
func runWardAdd(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "ward add", "",
		"Create a ward. Then add its shift patterns, acuity tiers and ratio floors on the ward's\n"+
			"settings page (printed on success), as an admin or a manager of the ward.")
	code := fs.String("code", "", "ward code: 1–32 lowercase letters, digits, '-' or '_', e.g. w4-north (required)")
	name := fs.String("name", "", "display name, e.g. \"Ward 4 North (Medicine)\" (required)")
	zone := fs.String("time-zone", "", "IANA time zone of the ward, e.g. Europe/Dublin (required)")
	beds := fs.Int("beds", 0, "number of beds, 1 to 1000; leave it out to set it later (a census above it is refused)")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() != 0 {
		fmt.Fprintln(e.stderr, "wardload ward add: takes no arguments, only flags (see --help)")
		return exitUsage
	}

	// Check everything before touching the database, so that bad input
	// neither creates a database file nor half a ward.
	w := &wardload.Ward{Code: *code, Name: *name, TimeZone: *zone}
	if err := w.Validate(); err != nil {
		return reportError(e, "ward add", flagError(err))
	}
	if flagsSet(fs)["beds"] {
		if err := wardload.CheckWardBeds(*beds); err != nil {
			return reportError(e, "ward add", flagError(err))
		}
	}

	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload ward add: %v\n", err)
		return exitFailure
	}
	defer st.Close()

	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	if err := st.CreateWard(ctx, w); err != nil {
		return reportError(e, "ward add", flagError(err))
	}
	if *beds > 0 {
		settings := wardload.DefaultSettings(w.ID)
		settings.Beds = *beds
		if err := st.SaveSettings(ctx, settings); err != nil {
			fmt.Fprintf(e.stderr, "wardload ward add: ward %s was created, but its beds were not saved; set them on %s\n",
				w.Code, server.WardSettingsPath(w.Code))
			return reportError(e, "ward add", err)
		}
	}
	fmt.Fprintf(e.stdout, "created ward %s: %s (%s", w.Code, w.Name, w.TimeZone)
	if *beds > 0 {
		fmt.Fprintf(e.stdout, ", %d beds", *beds)
	}
	fmt.Fprintf(e.stdout, ")\nsettings page: %s (add shift patterns, acuity tiers and ratio floors there)\n", server.WardSettingsPath(w.Code))
	fmt.Fprintf(e.stdout, "set-up checklist: %s\n", server.WardSetupPath(w.Code))
	return exitOK
}

// flagError puts the flag that the field of err belongs to in front of
// its message ("--time-zone: Unknown time zone …"); other errors pass.
func flagError(err error) error {
	flag, ok := wardAddFlags[wardload.ErrorField(err)]
	if !ok {
		return err
	}
	return wardload.FieldErrorf(wardload.ErrorCode(err), wardload.ErrorField(err), "%s: %s", flag, wardload.ErrorMessage(err))
}
