package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"text/tabwriter"

	"wardload/internal/csvfile"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "summarize", summary: "summarize a numeric CSV column per tier (quartiles, fences, outliers)", run: runSummarize})
}

// conventionNotes say in words what each quartile convention is, because
// the same data give different quartiles under each.
var conventionNotes = map[string]string{
	wardload.QuartilesHinges: "Tukey's hinges, as R fivenum and boxplot",
	wardload.QuartilesHF6:    "Hyndman & Fan type 6, the p(n+1) rule",
	wardload.QuartilesHF7:    "Hyndman & Fan type 7, R and numpy default",
	wardload.QuartilesHalves: "median of each half, median left out when n is odd",
}

func runSummarize(_ context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "summarize", "FILE", "Summarize a numeric column of a CSV file (header row; a \"tier\" column groups rows; FILE - reads stdin):\nn, min, quartiles, max, IQR, Tukey fences with the rows outside them, mean, SD (n − 1), SE and histogram bins.")
	column := fs.String("column", "care_minutes", "numeric `column` to summarize")
	quartiles := fs.String("quartiles", stats.DefaultQuartiles, "quartile `convention`: hinges, hf6, hf7 or halves")
	asJSON := fs.Bool("json", false, "print one JSON object")
	file, code, ok := parseWithFile(e, fs, args)
	if !ok {
		return code
	}
	if !wardload.ValidQuartiles(*quartiles) {
		fmt.Fprintf(e.stderr, "wardload summarize: --quartiles %q is not a known convention (use hinges, hf6, hf7 or halves)\n", *quartiles)
		return exitUsage
	}
	var groups []csvfile.Group
	var lines *csvfile.Lines
	code, ok = readCSV(e, "summarize", file, func(r io.Reader) (err error) {
		groups, lines, err = csvfile.ReadGroups(r, *column)
		return err
	})
	if !ok {
		return code
	}
	out := summaryJSON{Quartiles: *quartiles, Column: *column}
	for _, g := range groups {
		s, err := stats.Summarize(g.Values, *quartiles)
		if err != nil {
			return inputError(e, "summarize", err)
		}
		out.Tiers = append(out.Tiers, tierJSONOf(g, s, lines))
	}
	if *asJSON {
		return writeJSON(e, out)
	}
	printSummary(e.stdout, out)
	return exitOK
}

// parseWithFile parses flags that may come before or after the one FILE
// argument.
func parseWithFile(e *env, fs *flag.FlagSet, args []string) (string, int, bool) {
	pos, code, ok := parseInterleaved(e, fs, args)
	if !ok {
		return "", code, false
	}
	if len(pos) != 1 {
		fmt.Fprintf(e.stderr, "wardload %s: exactly one FILE is required (got %d)\n", fs.Name(), len(pos))
		fs.Usage()
		return "", exitUsage, false
	}
	return pos[0], 0, true
}

// errCannotOpen is readTable's error for a FILE that cannot be opened.
var errCannotOpen = errors.New("cannot open the file")

// readFile calls read with the file FILE, or standard input for "-".
func readFile(e *env, file string, read func(io.Reader) error) error {
	if file == "-" {
		return read(e.stdin)
	}
	f, err := os.Open(file)
	if err != nil {
		return errCannotOpen
	}
	defer f.Close()
	return read(f)
}

// readTable reads the whole CSV file FILE, or standard input for "-".
// Each command words its own messages.
func readTable(e *env, file string) (tab *csvfile.Table, err error) {
	err = readFile(e, file, func(r io.Reader) error {
		tab, err = csvfile.Read(r)
		return err
	})
	return tab, err
}

// readCSV streams FILE, or stdin for "-", through read for summarize and
// correlate, which keep only the columns they use, and prints a failure.
func readCSV(e *env, name, file string, read func(io.Reader) error) (int, bool) {
	err := readFile(e, file, read)
	if errors.Is(err, errCannotOpen) {
		fmt.Fprintf(e.stderr, "wardload %s: cannot open %s\n", name, file)
		return exitUsage, false
	}
	if err != nil {
		return inputError(e, name, err), false
	}
	return 0, true
}

// inputError prints a bad-input message: EINVALID is the user's data
// (exit 2); anything else is a failure whose text is not shown (exit 1).
func inputError(e *env, name string, err error) int {
	if wardload.ErrorCode(err) == wardload.EINVALID {
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, wardload.ErrorMessage(err))
		return exitUsage
	}
	fmt.Fprintf(e.stderr, "wardload %s: the file could not be read\n", name)
	return exitFailure
}

func writeJSON(e *env, v any) int {
	enc := json.NewEncoder(e.stdout)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		fmt.Fprintf(e.stderr, "wardload: writing output failed\n")
		return exitFailure
	}
	return exitOK
}

type summaryJSON struct {
	Quartiles string     `json:"quartiles"`
	Column    string     `json:"column"`
	Tiers     []tierJSON `json:"tiers"`
}

type fencesJSON struct {
	Lower float64 `json:"lower"`
	Upper float64 `json:"upper"`
}

type outlierJSON struct {
	Row   int     `json:"row"`  // 1-based data row
	Line  int     `json:"line"` // file line (header = 1)
	Value float64 `json:"value"`
	Kind  string  `json:"kind"`
}

type binsJSON struct {
	Rule  string  `json:"rule"`
	Count int     `json:"count"`
	Width float64 `json:"width"`
	Start float64 `json:"start"`
}

type tierJSON struct {
	Tier        string        `json:"tier"`
	N           int           `json:"n"`
	Min         float64       `json:"min"`
	Q1          float64       `json:"q1"`
	Median      float64       `json:"median"`
	Q3          float64       `json:"q3"`
	Max         float64       `json:"max"`
	IQR         float64       `json:"iqr"`
	InnerFences fencesJSON    `json:"inner_fences"`
	OuterFences fencesJSON    `json:"outer_fences"`
	Outliers    []outlierJSON `json:"outliers"`
	Mean        float64       `json:"mean"`
	SD          stats.Number  `json:"sd"`
	SE          stats.Number  `json:"se"`
	Bins        binsJSON      `json:"bins"`
}

func tierJSONOf(g csvfile.Group, s *stats.Summary, lines *csvfile.Lines) tierJSON {
	name := g.Tier
	if name == "" {
		name = "all" // a file without a tier column is one group, named as in project
	}
	t := tierJSON{
		Tier: name, N: s.N, Min: s.Min, Q1: s.Q1, Median: s.Median, Q3: s.Q3, Max: s.Max, IQR: s.IQR,
		InnerFences: fencesJSON(s.InnerFences), OuterFences: fencesJSON(s.OuterFences),
		Outliers: []outlierJSON{}, Mean: s.Mean, SD: s.SD, SE: s.SE,
		Bins: binsJSON{Rule: s.Bins.Rule, Count: s.Bins.Bins, Width: s.Bins.Width, Start: s.Bins.Start},
	}
	for _, o := range s.Outliers {
		row := g.Rows[o.Index]
		t.Outliers = append(t.Outliers, outlierJSON{Row: row, Line: lines.Line(row), Value: o.Value, Kind: o.Kind})
	}
	return t
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

func printSummary(w io.Writer, s summaryJSON) {
	fmt.Fprintf(w, "Column %s. Quartiles: %s (%s).\n", s.Column, s.Quartiles, conventionNotes[s.Quartiles])
	fmt.Fprintln(w, "Fences: inner Q1 − 1.5·IQR and Q3 + 1.5·IQR, outer 3·IQR; a value on a fence is not outside it.")
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "tier\tn\tmin\tQ1\tmedian\tQ3\tmax\tIQR\tmean\tSD\tSE\t")
	for _, t := range s.Tiers {
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", tierName(t.Tier), t.N, num(t.Min), num(t.Q1), num(t.Median),
			num(t.Q3), num(t.Max), num(t.IQR), num(t.Mean), t.SD, t.SE)
	}
	fmt.Fprintln(tw)
	fmt.Fprintln(tw, "tier\tinner lower\tinner upper\touter lower\touter upper\toutliers\tbins\t")
	for _, t := range s.Tiers {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%d\t%d (%s)\t\n", tierName(t.Tier), num(t.InnerFences.Lower), num(t.InnerFences.Upper),
			num(t.OuterFences.Lower), num(t.OuterFences.Upper), len(t.Outliers), t.Bins.Count, t.Bins.Rule)
	}
	tw.Flush()
	for _, t := range s.Tiers {
		if len(t.Outliers) == 0 {
			continue
		}
		fmt.Fprintf(w, "\nOutside the fences, tier %s:\n", tierName(t.Tier))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "row\tline\tvalue\tkind\t")
		for _, o := range t.Outliers {
			fmt.Fprintf(tw, "%d\t%d\t%s\t%s\t\n", o.Row, o.Line, num(o.Value), o.Kind)
		}
		tw.Flush()
	}
}

func tierName(t string) string {
	if t == "" {
		return "(all)"
	}
	return t
}
