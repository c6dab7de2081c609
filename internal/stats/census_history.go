package stats

import (
	"fmt"
	"slices"
	"strings"
	"time"
)

// censusHistory is a validated census history: every recorded dated shift
// with each tier's count, in date order (shifts of one date in order of
// first appearance in the input).
type censusHistory struct {
	tiers  []string // in order of first appearance
	shifts []string // in order of first appearance
	recs   []censusRecord
}

// newCensusHistory checks and gathers the history's rows.
func newCensusHistory(rows []CensusCount, beds int) (*censusHistory, error) {
	h := &censusHistory{}
	tierIdx, shiftIdx := map[string]int{}, map[string]int{}
	type occ struct {
		day   int
		shift string
	}
	recIdx := map[occ]int{}
	seen := map[string]bool{}
	for i, r := range rows {
		d, err := time.Parse(time.DateOnly, r.Date)
		if err != nil || d.Year() < 1900 {
			return nil, errField("history", "Row %d: %q is not a date (YYYY-MM-DD, from 1900 on).", i+1, clipText(r.Date))
		}
		switch {
		case strings.TrimSpace(r.Shift) == "":
			return nil, errField("history", "Row %d: the shift is empty.", i+1)
		case strings.TrimSpace(r.Tier) == "":
			return nil, errField("history", "Row %d: the tier is empty.", i+1)
		case r.Patients < 0 || r.Patients > MaxPatients:
			return nil, errField("history", "Row %d: patients must be a whole number from 0 to %d.", i+1, MaxPatients)
		}
		key := r.Date + "\x00" + r.Shift + "\x00" + r.Tier
		if seen[key] {
			return nil, errField("history", "Row %d: %s, shift %s, tier %s is given twice.", i+1, r.Date, clipText(r.Shift), clipText(r.Tier))
		}
		seen[key] = true
		if _, ok := tierIdx[r.Tier]; !ok {
			tierIdx[r.Tier] = len(h.tiers)
			h.tiers = append(h.tiers, r.Tier)
		}
		if _, ok := shiftIdx[r.Shift]; !ok {
			shiftIdx[r.Shift] = len(h.shifts)
			h.shifts = append(h.shifts, r.Shift)
		}
		o := occ{dayNumber(d), r.Shift}
		j, ok := recIdx[o]
		if !ok {
			j = len(h.recs)
			recIdx[o] = j
			h.recs = append(h.recs, censusRecord{day: o.day, weekday: int(d.Weekday()), shift: r.Shift})
		}
		for len(h.recs[j].counts) <= tierIdx[r.Tier] {
			h.recs[j].counts = append(h.recs[j].counts, 0)
		}
		h.recs[j].counts[tierIdx[r.Tier]] = r.Patients
	}
	for i := range h.recs {
		for len(h.recs[i].counts) < len(h.tiers) {
			h.recs[i].counts = append(h.recs[i].counts, 0)
		}
		total := 0
		for _, c := range h.recs[i].counts {
			total += c
		}
		if beds > 0 && total > beds {
			return nil, errField("beds", "The census of %s, shift %s, totals %d patients, more than the %d beds given.",
				dateOfDay(h.recs[i].day).Format(time.DateOnly), clipText(h.recs[i].shift), total, beds)
		}
	}
	slices.SortStableFunc(h.recs, func(a, b censusRecord) int {
		if a.day != b.day {
			return a.day - b.day
		}
		return shiftIdx[a.shift] - shiftIdx[b.shift]
	})
	return h, nil
}

// distinctDays counts the dates recorded in recs.
func distinctDays(recs []censusRecord) int {
	n, last := 0, -1<<62
	for _, r := range recs {
		if r.day != last {
			n++
			last = r.day
		}
	}
	return n
}

// censusFit is the census model fitted to recs (a date-ordered history).
type censusFit struct {
	tiers       []string
	shifts      []string
	models      []*tierModel
	first, last int // first and newest history day
	days        int // distinct dates
	cells       map[cellKey]bool
	active      map[string]bool // shifts recorded in the last MinCensusHistoryDays days
	notes       []string
}

// fitCensus fits every tier's model to recs, which must hold at least
// MinCensusHistoryDays distinct dates.
func fitCensus(tiers, shifts []string, recs []censusRecord, family CountFamily) (*censusFit, error) {
	f := &censusFit{tiers: tiers, shifts: shifts, first: recs[0].day, last: recs[len(recs)-1].day,
		days: distinctDays(recs), cells: map[cellKey]bool{}, active: map[string]bool{}}
	for _, r := range recs {
		f.cells[cellKey{r.weekday, r.shift}] = true
		if r.day > f.last-MinCensusHistoryDays {
			f.active[r.shift] = true
		}
	}
	for k := range tiers {
		m, err := fitTier(recs, k, family, f.last)
		if err != nil {
			// A singular design: a shift recorded on one weekday only
			// (its effect and the weekday's are one), or too few counts.
			return nil, errField("history", "Tier %s: its census history cannot be modelled: a shift recorded on only one weekday, or too few dated shifts with patients.", clipText(tiers[k]))
		}
		f.models = append(f.models, m)
	}
	for _, s := range shifts {
		if !f.active[s] {
			f.notes = append(f.notes, fmt.Sprintf("Shift %s has no census in the last %d days of history, so it is taken as retired and not forecast.", s, MinCensusHistoryDays))
		}
	}
	if gaps := f.gaps(recs); gaps > 0 {
		f.notes = append(f.notes, fmt.Sprintf("%d dated shifts between a shift's first census and the newest history date have no census; they are left out of the model, not counted as zero patients.", gaps))
	}
	return f, nil
}

// gaps counts the dated shifts of active shifts, from each shift's first
// census to the newest date, on weekdays the shift was ever recorded, that
// have no census.
func (f *censusFit) gaps(recs []censusRecord) int {
	start, have := map[string]int{}, map[string]int{}
	for _, r := range recs {
		if _, ok := start[r.shift]; !ok {
			start[r.shift] = r.day
		}
		have[r.shift]++
	}
	n := 0
	for s, d0 := range start {
		if !f.active[s] {
			continue
		}
		for d := d0; d <= f.last; d++ {
			if f.cells[cellKey{int(dateOfDay(d).Weekday()), s}] {
				n++
			}
		}
		n -= have[s]
	}
	return n
}

// censusTarget is one future dated shift.
type censusTarget struct {
	day, weekday int
	shift        string
}

// targets lists the dated shifts from day `from` to `to` (inclusive) that
// are forecast: active shifts on weekdays the history recorded them.
func (f *censusFit) targets(from, to int) []censusTarget {
	var out []censusTarget
	for d := from; d <= to; d++ {
		wd := int(dateOfDay(d).Weekday())
		for _, s := range f.shifts {
			if f.active[s] && f.cells[cellKey{wd, s}] {
				out = append(out, censusTarget{d, wd, s})
			}
		}
	}
	return out
}
