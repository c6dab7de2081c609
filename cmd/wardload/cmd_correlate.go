package main

import (
	"context"
	"fmt"
	"io"

	"wardload/internal/csvfile"
	"wardload/internal/stats"
)

func init() {
	register(command{name: "correlate", summary: "relate two numeric CSV columns (Pearson, Spearman, least-squares line)", run: runCorrelate})
}

func runCorrelate(_ context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "correlate", "FILE", "Relate two numeric columns of a CSV file over all rows (FILE - reads stdin):\nPearson r, Spearman ρ, least-squares line, R², residual SD, with plain-language warnings.")
	xName := fs.String("x", "", "`column` for x (required)")
	yName := fs.String("y", "", "`column` for y (required)")
	asJSON := fs.Bool("json", false, "print one JSON object")
	file, code, ok := parseWithFile(e, fs, args)
	if !ok {
		return code
	}
	if *xName == "" || *yName == "" {
		fmt.Fprintln(e.stderr, "wardload correlate: --x and --y are required")
		return exitUsage
	}
	var cols []*csvfile.Column
	code, ok = readCSV(e, "correlate", file, func(r io.Reader) (err error) {
		cols, err = csvfile.ReadColumns(r, *xName, *yName)
		return err
	})
	if !ok {
		return code
	}
	rel, err := stats.Relate(cols[0].Values, cols[1].Values)
	if err != nil {
		return inputError(e, "correlate", err)
	}
	out := relationJSON{
		X: *xName, Y: *yName, N: rel.N, PearsonR: rel.PearsonR, SpearmanRho: rel.SpearmanRho,
		Intercept: rel.Intercept, Slope: rel.Slope, RSquared: rel.RSquared, ResidualSD: rel.ResidualSD,
		Warnings: rel.Warnings,
	}
	if *asJSON {
		return writeJSON(e, out)
	}
	printRelation(e.stdout, out)
	return exitOK
}

type relationJSON struct {
	X           string       `json:"x"`
	Y           string       `json:"y"`
	N           int          `json:"n"`
	PearsonR    stats.Number `json:"pearson_r"`
	SpearmanRho stats.Number `json:"spearman_rho"`
	Intercept   stats.Number `json:"intercept"`
	Slope       stats.Number `json:"slope"`
	RSquared    stats.Number `json:"r_squared"`
	ResidualSD  stats.Number `json:"residual_sd"`
	Warnings    []string     `json:"warnings"`
}

func printRelation(w io.Writer, r relationJSON) {
	fmt.Fprintf(w, "x = %s, y = %s, n = %d pairs\n\n", r.X, r.Y, r.N)
	for _, l := range []struct {
		name string
		v    stats.Number
	}{
		{"Pearson r", r.PearsonR},
		{"Spearman ρ (mid-ranks)", r.SpearmanRho},
		{"intercept", r.Intercept},
		{"slope", r.Slope},
		{"R²", r.RSquared},
		{"residual SD √(SSE/(n−2))", r.ResidualSD},
	} {
		fmt.Fprintf(w, "  %-26s %s\n", l.name, l.v)
	}
	if r.Intercept.Defined {
		fmt.Fprintf(w, "\nLine: %s = %s + %s × %s\n", r.Y, r.Intercept, r.Slope, r.X)
	}
	fmt.Fprintln(w, "\nWarnings:")
	for _, s := range r.Warnings {
		fmt.Fprintf(w, "  - %s\n", s)
	}
}
