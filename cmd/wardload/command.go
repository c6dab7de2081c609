package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"sort"
	"strings"
	"time"

	"wardload/internal/password"
)

// Exit statuses shared by every command.
const (
	exitOK      = 0
	exitFailure = 1 // the command could not do its work (database, I/O)
	exitUsage   = 2 // bad flags, arguments or input data
)

// env is what a command may touch of the outside world, so tests can run
// commands in-process with their own streams and environment.
type env struct {
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	getenv func(string) string
	now    func() time.Time // the clock; nil: time.Now
	// password are the argon2id parameters of the password hashes
	// commands make (zero: password.DefaultParams); tests pass cheap ones.
	password password.Params
}

// clock returns the current time from e.now, or time.Now when unset.
func (e *env) clock() time.Time {
	if e.now == nil {
		return time.Now()
	}
	return e.now()
}

// command is one subcommand. Name may be two words ("user add").
type command struct {
	name    string
	summary string
	run     func(ctx context.Context, e *env, args []string) int
}

// commands is filled by register calls in each cmd_*.go file's init, so that
// adding a command touches only its own file.
var commands = map[string]command{}

func register(c command) {
	if _, dup := commands[c.name]; dup {
		panic("duplicate command " + c.name)
	}
	commands[c.name] = c
}

// isHelp reports whether arg asks for help.
func isHelp(arg string) bool { return arg == "-h" || arg == "--help" || arg == "help" }

// run runs the command args name. Help that was asked for goes to standard
// output with exit 0; usage shown because the command line was incomplete
// goes to standard error with exit 2.
func run(ctx context.Context, args []string, e *env) int {
	if len(args) == 0 {
		usage(e.stderr)
		return exitUsage
	}
	if isHelp(args[0]) {
		usage(e.stdout)
		return exitOK
	}
	if args[0] == "--version" || args[0] == "-version" {
		return runVersion(ctx, e, args[1:])
	}
	if len(args) >= 2 {
		if c, ok := commands[args[0]+" "+args[1]]; ok {
			return c.run(ctx, e, args[2:])
		}
	}
	if c, ok := commands[args[0]]; ok {
		return c.run(ctx, e, args[1:])
	}
	if sub := groupCommands(args[0]); len(sub) > 0 {
		// "wardload user --help" (or a bare "wardload user") lists the
		// group's sub-commands.
		w, code := e.stderr, exitUsage
		if len(args) >= 2 && isHelp(args[1]) {
			w, code = e.stdout, exitOK
		}
		fmt.Fprintf(w, "Usage: wardload %s COMMAND [flags]   (each has --help)\n\nCommands:\n", args[0])
		for _, n := range sub {
			fmt.Fprintf(w, "  %-20s %s\n", n, commands[n].summary)
		}
		return code
	}
	fmt.Fprintf(e.stderr, "wardload: unknown command %q (try wardload --help)\n", strings.Join(args[:min(2, len(args))], " "))
	return exitUsage
}

// groupCommands returns the two-word commands whose first word is group,
// sorted.
func groupCommands(group string) []string {
	var names []string
	for n := range commands {
		if strings.HasPrefix(n, group+" ") {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return names
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "wardload estimates nurse staffing workload from census and timed care observations.")
	fmt.Fprintln(w, "Its figures are estimates; they defer to local staffing law, agreements and clinical judgement.")
	fmt.Fprintln(w, "\nUsage: wardload COMMAND [flags]   (every command has --help)\n       wardload --version\n\nCommands:")
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-20s %s\n", n, commands[n].summary)
	}
}

// newFlagSet returns a flag set that reports errors instead of exiting and
// prints a usage line for the command: on --help to standard output
// (parseFlags), after a usage error to standard error.
func newFlagSet(e *env, name, argsUsage, summary string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(e.stderr)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: wardload %s [flags] %s\n\n%s\n\n", name, argsUsage, summary)
		fmt.Fprintf(fs.Output(), "Every flag may also be set in the environment as WARDLOAD_<FLAG> (--data-dir: WARDLOAD_DATA_DIR);\na flag on the command line wins.\n\nFlags:\n")
		fs.PrintDefaults()
	}
	return fs
}

// parseFlags parses args; it returns (code, false) when the command should
// stop: 0 after --help (which prints the usage), 2 after a flag error,
// reported in one line (the flag package would print its message and then
// the whole usage), so that a script sees one clear line.
func parseFlags(e *env, fs *flag.FlagSet, args []string) (int, bool) {
	if !fs.Parsed() { // callers that loop over positional arguments parse again
		if code, ok := applyEnv(e, fs); !ok {
			return code, false
		}
	}
	out, help := fs.Output(), fs.Usage
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	err := fs.Parse(args)
	fs.SetOutput(out)
	fs.Usage = help
	if err == flag.ErrHelp {
		fs.SetOutput(e.stdout)
		help()
		fs.SetOutput(out)
		return exitOK, false
	}
	if err != nil {
		fmt.Fprintf(out, "wardload %s: %v (see wardload %s --help)\n", fs.Name(), err, fs.Name())
		return exitUsage, false
	}
	return 0, true
}

// envName is the environment variable a flag falls back to:
// --data-dir → WARDLOAD_DATA_DIR.
func envName(flagName string) string {
	return "WARDLOAD_" + strings.ToUpper(strings.ReplaceAll(flagName, "-", "_"))
}

// applyEnv sets every flag of fs whose WARDLOAD_* variable is set, before
// the command line is parsed, so the command line wins. A value the flag
// refuses is a usage error naming the variable.
func applyEnv(e *env, fs *flag.FlagSet) (int, bool) {
	if e.getenv == nil {
		return 0, true
	}
	var bad error
	fs.VisitAll(func(f *flag.Flag) {
		if bad != nil {
			return
		}
		if v := e.getenv(envName(f.Name)); v != "" {
			if err := fs.Set(f.Name, v); err != nil {
				bad = fmt.Errorf("%s=%q: %v", envName(f.Name), v, err)
			}
		}
	})
	if bad != nil {
		fmt.Fprintf(fs.Output(), "wardload %s: %v\n", fs.Name(), bad)
		return exitUsage, false
	}
	return 0, true
}

// parseInterleaved parses flags that may come before and after positional
// arguments ("project FILE --census …"): Go's flag package stops at the
// first positional argument, so parsing resumes after each one. It stops
// as parseFlags does; the environment is applied once, on the first pass.
func parseInterleaved(e *env, fs *flag.FlagSet, args []string) (positional []string, code int, ok bool) {
	for {
		if code, ok := parseFlags(e, fs, args); !ok {
			return nil, code, false
		}
		if fs.NArg() == 0 {
			return positional, 0, true
		}
		positional = append(positional, fs.Arg(0))
		args = fs.Args()[1:]
	}
}

// usageError prints a usage error of command name and returns exitUsage.
func usageError(e *env, name, format string, a ...any) int {
	fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, fmt.Sprintf(format, a...))
	return exitUsage
}
