// Command importdata prepares the observation import benchmark
// (bench/import.sh): it creates the ward bench-import (four tiers, two
// shift patterns, one factor) in a migrated wardload database if it is
// not there yet, and writes a CSV file of n invented observations for it
// in the import's layout, a year of dates, drawn from a seeded generator
// so that every run writes the same file.
//
//	go run ./bench/importdata -db postgres://… -rows 1000000 -out obs.csv
//	go run ./bench/importdata -sqlite /tmp/x/wardload.db -rows 1000000 -out obs.csv
package main

import (
	"bufio"
	"context"
	"errors"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"time"

	"wardload/internal/postgres"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// wardCode is the ward the benchmark imports into.
const wardCode = "bench-import"

func main() {
	db := flag.String("db", "", "PostgreSQL URL (empty: -sqlite)")
	path := flag.String("sqlite", "", "SQLite database file")
	rows := flag.Int("rows", 1_000_000, "observations to write")
	out := flag.String("out", "", "CSV file to write (empty: none)")
	flag.Parse()
	if err := run(*db, *path, *rows, *out); err != nil {
		fmt.Fprintln(os.Stderr, "importdata:", err)
		os.Exit(1)
	}
}

func run(db, path string, rows int, out string) error {
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "cli"})
	var st wardload.Store
	switch {
	case db != "":
		s, err := postgres.Open(ctx, postgres.Config{URL: db})
		if err != nil {
			return err
		}
		defer s.Close()
		if err := s.Migrate(ctx); err != nil {
			return err
		}
		st = s
	case path != "":
		s, err := sqlite.Open(ctx, sqlite.Config{Path: path})
		if err != nil {
			return err
		}
		defer s.Close()
		if err := s.Migrate(ctx); err != nil {
			return err
		}
		st = s
	default:
		return errors.New("give -db or -sqlite")
	}
	if err := seedWard(ctx, st); err != nil {
		return err
	}
	if out == "" {
		return nil
	}
	return writeCSV(out, rows)
}

// seedWard creates the benchmark ward unless it exists.
func seedWard(ctx context.Context, st wardload.Store) error {
	if _, err := st.FindWardByCode(ctx, wardCode); err == nil {
		return nil
	} else if wardload.ErrorCode(err) != wardload.ENOTFOUND {
		return err
	}
	w := &wardload.Ward{Code: wardCode, Name: "Import benchmark", TimeZone: "UTC", FactorNames: []string{"dependency"}}
	if err := st.CreateWard(ctx, w); err != nil {
		return err
	}
	for i := 1; i <= 4; i++ {
		t := &wardload.Tier{WardID: w.ID, Code: "t" + strconv.Itoa(i), Label: "Tier " + strconv.Itoa(i), DisplayOrder: i}
		if err := st.CreateTier(ctx, t); err != nil {
			return err
		}
	}
	for _, p := range []*wardload.ShiftPattern{
		{WardID: w.ID, Name: "Day", StartMinute: 7 * 60, NominalHours: 12},
		{WardID: w.ID, Name: "Night", StartMinute: 19 * 60, NominalHours: 12},
	} {
		if err := st.CreateShiftPattern(ctx, p); err != nil {
			return err
		}
	}
	return nil
}

// writeCSV writes rows observations over the 365 days from 2025-01-01:
// care minutes lognormal per tier, a dependency score 1–5.
func writeCSV(out string, rows int) error {
	f, err := os.Create(out)
	if err != nil {
		return err
	}
	defer f.Close()
	w := bufio.NewWriterSize(f, 1<<16)
	rng := rand.New(rand.NewPCG(20261205, 12))
	w.WriteString("date,shift,tier,window_hours,care_minutes,dependency\n")
	start := time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC)
	shifts := []string{"Day", "Night"}
	var buf []byte
	for i := range rows {
		d := start.AddDate(0, 0, i*365/rows)
		tier := 1 + rng.IntN(4)
		care := math.Round(math.Exp(2.5+0.5*float64(tier)+0.6*rng.NormFloat64())*10) / 10
		buf = d.AppendFormat(buf[:0], "2006-01-02")
		buf = append(buf, ',')
		buf = append(buf, shifts[rng.IntN(2)]...)
		buf = append(buf, ",t"...)
		buf = strconv.AppendInt(buf, int64(tier), 10)
		buf = append(buf, ",4,"...)
		buf = strconv.AppendFloat(buf, care, 'f', -1, 64)
		buf = append(buf, ',')
		buf = strconv.AppendInt(buf, int64(1+rng.IntN(5)), 10)
		buf = append(buf, '\n')
		w.Write(buf)
	}
	return w.Flush()
}
