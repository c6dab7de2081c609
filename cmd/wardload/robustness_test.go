package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// oneLineRefusal checks the CLI contract for bad input: exit 2, nothing on
// stdout, exactly one line on stderr, and no Go panic or stack trace.
func oneLineRefusal(t *testing.T, what string, code int, stdout, stderr string) {
	t.Helper()
	if code != exitUsage || stdout != "" || strings.Count(stderr, "\n") != 1 || !strings.HasSuffix(stderr, "\n") ||
		strings.Contains(stderr, "goroutine") || strings.Contains(stderr, "panic") {
		t.Errorf("%s: exit %d, stdout %q, stderr %q; want exit 2, no output and one line", what, code, stdout, stderr)
	}
}

// An unknown flag printed the flag package's message and then the whole
// usage (10–24 lines) for every command but project, which already said it
// in one line.
func TestEveryCommandRefusesUnknownFlagInOneLine(t *testing.T) {
	for name := range commands {
		args := append(strings.Fields(name), "--no-such-flag")
		code, out, errOut := runCSVCommand(t, "a\n1\n", args...)
		oneLineRefusal(t, name, code, out, errOut)
		if !strings.Contains(errOut, "wardload "+name+": flag provided but not defined: -no-such-flag") {
			t.Errorf("%s: %q does not name the command and the flag", name, errOut)
		}
	}
	// --help still prints the usage, to standard output, exit 0.
	code, out, errOut := runCSVCommand(t, "", "summarize", "--help")
	if code != exitOK || errOut != "" || !strings.Contains(out, "Usage: wardload summarize") || !strings.Contains(out, "-quartiles") {
		t.Errorf("summarize --help: %d stdout %q stderr %q", code, out, errOut)
	}
}

// Finite numbers near the float64 limit overflowed the summaries to Inf
// and NaN; --json then failed with "writing output failed", exit 1.
func TestCLIHugeNumbers(t *testing.T) {
	huge := "tier,care_minutes,window_hours\nt1,1e308,12\nt1,1.7e308,12\nt1,1.6e308,12\n"
	for _, args := range [][]string{
		{"summarize", "FILE", "--json"},
		{"summarize", "FILE"},
		{"correlate", "FILE", "--x", "care_minutes", "--y", "window_hours", "--json"},
		{"project", "FILE", "--census", "t1=2", "--shift-hours", "12", "--direct-care", "0.7", "--json"},
	} {
		code, out, errOut := runCSVCommand(t, huge, args...)
		oneLineRefusal(t, strings.Join(args, " "), code, out, errOut)
		if !strings.Contains(errOut, `line 2, column "care_minutes": "1e308" is too large`) {
			t.Errorf("%v: %q does not name the cell", args, errOut)
		}
	}
}

// A direct-care fraction or ratio of 1e-320 passed "more than 0" and the
// projection printed "recommended 0" nurses for 140 care minutes (+Inf
// converted to int), or failed writing JSON with exit 1.
func TestProjectTinyFractionOrRatio(t *testing.T) {
	csv := "tier,care_minutes,window_hours\nt1,60,12\nt1,70,12\nt1,80,12\n"
	for _, extra := range [][]string{
		{"--direct-care", "1e-320"},
		{"--direct-care", "1e-320", "--json"},
		{"--direct-care", "0.7", "--patients-per-nurse", "1e-320"},
		{"--direct-care", "1e-10"},
	} {
		args := append([]string{"project", "FILE", "--census", "t1=2", "--shift-hours", "12"}, extra...)
		code, out, errOut := runCSVCommand(t, csv, args...)
		oneLineRefusal(t, strings.Join(extra, " "), code, out, errOut)
	}
}

// Hostile files and arguments the CLI already refused cleanly; kept so
// that it stays so.
func TestCLIHostileInputs(t *testing.T) {
	ok := "tier,care_minutes,window_hours\nt1,60,12\nt1,70,12\nt1,80,12\nt2,120,12\nt2,130,12\n"
	project := func(extra ...string) []string {
		return append([]string{"project", "FILE", "--shift-hours", "12", "--direct-care", "0.7"}, extra...)
	}
	for _, tc := range []struct {
		name, csv string
		args      []string
	}{
		{"empty file", "", []string{"summarize", "FILE"}},
		{"binary", "\x00\xff\xfe\x01garbage\x00", []string{"summarize", "FILE"}},
		{"header only", "tier,care_minutes\n", []string{"summarize", "FILE"}},
		{"duplicate header", "tier,care_minutes,care_minutes\nt1,1,2\n", []string{"summarize", "FILE"}},
		{"line over the limit", "tier,care_minutes\nt1," + strings.Repeat("9", 2<<20) + "\n", []string{"summarize", "FILE"}},
		{"ragged", "tier,care_minutes\nt1\n", []string{"correlate", "FILE", "--x", "care_minutes", "--y", "tier"}},
		{"census overflow", ok, project("--census", "t1=99999999999999999999")},
		{"census negative", ok, project("--census", "t1=-1")},
		{"census twice", ok, project("--census", "t1=1,t1=2")},
		{"draws huge", ok, project("--census", "t1=2", "--draws", "99999999999")},
		{"draws not int", ok, project("--census", "t1=2", "--draws", "1e3")},
		{"levels 1,0,NaN", ok, project("--census", "t1=2", "--levels", "1,0,NaN")},
		{"cover NaN", ok, project("--census", "t1=2", "--cover", "NaN")},
		{"shift hours 1e309", ok, project("--census", "t1=2", "--shift-hours", "1e309")},
	} {
		code, out, errOut := runCSVCommand(t, tc.csv, tc.args...)
		oneLineRefusal(t, tc.name, code, out, errOut)
	}
	// CRLF line ends and a byte order mark are ordinary files.
	for name, csv := range map[string]string{
		"CRLF": "tier,care_minutes\r\nt1,60\r\nt1,70\r\n",
		"BOM":  "\ufefftier,care_minutes\nt1,60\nt1,70\n",
	} {
		if code, out, errOut := runCSVCommand(t, csv, "summarize", "FILE", "--json"); code != exitOK || !strings.Contains(out, `"tier": "t1"`) {
			t.Errorf("%s: exit %d %q %q", name, code, out, errOut)
		}
	}
}

// serve --addr with an impossible port opened (and created) the database,
// logged, and then failed with exit 1; it is bad usage, exit 2, refused
// before anything is created.
func TestServeRefusesBadAddrFirst(t *testing.T) {
	for _, addr := range []string{"0.0.0.0:99999", "nonsense", "127.0.0.1:-1", "127.0.0.1:http-alt", ":"} {
		dir := t.TempDir()
		code, out, errOut := runCLI(t, dir, "", "serve", "--addr", addr)
		oneLineRefusal(t, "serve --addr "+addr, code, out, errOut)
		if _, err := os.Stat(filepath.Join(dir, "wardload.db")); err == nil {
			t.Errorf("serve --addr %s created the database before refusing", addr)
		}
	}
	if err := checkAddr("127.0.0.1:0"); err != nil {
		t.Errorf("port 0: %v", err)
	}
	if err := checkAddr("[::1]:8080"); err != nil {
		t.Errorf("IPv6: %v", err)
	}
}

// version ignored extra arguments.
func TestVersionRefusesArguments(t *testing.T) {
	code, out, errOut := runCSVCommand(t, "", "version", "extra")
	oneLineRefusal(t, "version extra", code, out, errOut)
}
