package csvfile

import (
	"fmt"
	"io"
	"slices"
	"strings"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// The columns of an observation import. A ward's factor names may follow
// as further numeric columns; nothing else is accepted.
var observationColumns = []string{"date", "shift", "tier", "window_hours", "care_minutes"}

// maxRealShiftHours is the longest real shift the model takes (a 24-hour
// pattern over the autumn clock change).
const maxRealShiftHours = 25

// ObservationHeader is the header row of an observation import file for
// ward: the fixed columns, then the ward's factors.
func ObservationHeader(ward *wardload.Ward) []string {
	return append(slices.Clone(observationColumns), ward.FactorNames...)
}

// MaxProblems is how many problems an import lists: enough to fix a
// file in one pass, few enough to read.
const MaxProblems = 100

// ReadObservations reads an observation import file for ward. Shifts
// are named by pattern name, tiers by code. A factor cell may be blank
// (not recorded). Every problem is EINVALID with a message naming the file
// line and column. lines[i] is the file line of obs[i], so that a store
// error about "Row N" can be shown as a line of the file.
//
// Any column that is not a known column is refused: a file exported from
// another system may carry a name, record number or birth date, and
// wardload keeps no patient identifiers, so such a file must be cut down
// before import rather than silently trimmed.
//
// The file is read one row at a time and only the observations are kept,
// not the cells (issue 12: keeping every cell took about 30 times the
// file's size). A row that cannot be read as CSV stops the reading, then
// a bad header; otherwise every problem is reported at once, as
// ReadObservationsChecked says.
func ReadObservations(r io.Reader, ward *wardload.Ward, tiers []*wardload.Tier, shifts []*wardload.ShiftPattern) (obs []*wardload.Observation, lines []int, err error) {
	return ReadObservationsChecked(r, ward, tiers, shifts, nil)
}

// ReadObservationsChecked is ReadObservations with a further check of
// each observation that reads well (check may be nil); its EINVALID error
// is reported with the observation's line and the column of its Field.
//
// A problem in the header stops the reading. Problems in data rows do
// not: every bad cell of every row is reported at once, up to the first
// MaxProblems, as one EINVALID error whose wardload.ErrorFields are the
// problems in file order (each naming line and column) and whose message
// lists them, for the command line.
func ReadObservationsChecked(r io.Reader, ward *wardload.Ward, tiers []*wardload.Tier, shifts []*wardload.ShiftPattern,
	check func(*wardload.Observation) error) (obs []*wardload.Observation, lines []int, err error) {
	s, err := NewStream(r)
	if err != nil {
		return nil, nil, err
	}
	rd := newObservationReader(s.Header, ward, tiers, shifts)
	var problems problemList
	for {
		rec, line, err := s.Next()
		if err == io.EOF {
			break
		} else if err != nil {
			return nil, nil, err // a row that cannot be read as CSV
		}
		if rd.headerErr != nil {
			continue // read on only for CSV errors, which come first
		}
		if err := rd.add(rec, line, &problems, check); err != nil {
			return nil, nil, err
		}
	}
	if rd.headerErr != nil {
		return nil, nil, rd.headerErr
	}
	if err := problems.err(); err != nil {
		return nil, nil, err
	}
	return rd.obs, rd.lines, nil
}

// observationReader turns rows into observations; the problems go to the
// caller's problemList.
type observationReader struct {
	ward              *wardload.Ward
	tiers             []*wardload.Tier
	shifts            []*wardload.ShiftPattern
	tierByCode        map[string]*wardload.Tier
	shiftByName       map[string]*wardload.ShiftPattern
	date, shift, tier int
	window, care      int
	factors           []int // column of each of ward.FactorNames, or -1
	headerErr         error
	obs               []*wardload.Observation
	lines             []int
	slab              []wardload.Observation // observations are cut from here, a block at a time
}

func newObservationReader(header []string, ward *wardload.Ward, tiers []*wardload.Tier, shifts []*wardload.ShiftPattern) *observationReader {
	rd := &observationReader{ward: ward, tiers: tiers, shifts: shifts,
		tierByCode: map[string]*wardload.Tier{}, shiftByName: map[string]*wardload.ShiftPattern{}}
	allowed := ObservationHeader(ward)
	for i, h := range header {
		if !slices.Contains(allowed, h) {
			rd.headerErr = wardload.FieldErrorf(wardload.EINVALID, "file",
				"line 1, column %d: column %q is not accepted. wardload stores no patient identifiers or free text, so a file may only have the columns %s. Remove the other columns and import again.",
				i+1, clip(h, 40), strings.Join(allowed, ", "))
			return rd
		}
	}
	for _, c := range observationColumns {
		if !slices.Contains(header, c) {
			rd.headerErr = wardload.FieldErrorf(wardload.EINVALID, "file",
				"line 1: the column %q is missing. The header must have %s.", c, strings.Join(allowed, ", "))
			return rd
		}
	}
	for _, tr := range tiers {
		rd.tierByCode[tr.Code] = tr
	}
	for _, sp := range shifts {
		rd.shiftByName[strings.ToLower(sp.Name)] = sp
	}
	rd.date, rd.shift, rd.tier = slices.Index(header, "date"), slices.Index(header, "shift"), slices.Index(header, "tier")
	rd.window, rd.care = slices.Index(header, "window_hours"), slices.Index(header, "care_minutes")
	for _, f := range ward.FactorNames {
		rd.factors = append(rd.factors, slices.Index(header, f))
	}
	return rd
}

// add reads one data row starting on file line line. Every cell is
// read, so that one pass over the messages fixes the file; a row with a
// problem adds it to problems and no observation. Only a non-EINVALID
// error of check is returned.
func (rd *observationReader) add(rec []string, line int, problems *problemList, check func(*wardload.Observation) error) error {
	before := problems.n
	cellErr := func(col, format string, args ...any) {
		problems.add(wardload.FieldErrorf(wardload.EINVALID, col, "line %d, column %q: %s", line, col, fmt.Sprintf(format, args...)))
	}
	date, shift, tier := strings.TrimSpace(rec[rd.date]), strings.TrimSpace(rec[rd.shift]), strings.TrimSpace(rec[rd.tier])
	d, derr := wardload.ParseDate(date)
	if derr != nil {
		cellErr("date", "%q is not a date; use YYYY-MM-DD, e.g. 2026-03-02.", clip(date, 40))
	}
	sp, ok := rd.shiftByName[strings.ToLower(shift)]
	if !ok {
		cellErr("shift", "%q is not a shift pattern of this ward (%s).", clip(shift, 40), shiftList(rd.shifts))
	}
	tr, ok := rd.tierByCode[tier]
	if !ok {
		cellErr("tier", "%q is not a tier code of this ward (%s).", clip(tier, 40), tierList(rd.tiers))
	}
	window, werr := parseCell(line, "window_hours", rec[rd.window])
	problems.add(werr)
	care, cerr := parseCell(line, "care_minutes", rec[rd.care])
	problems.add(cerr)
	var factors map[string]float64
	for k, f := range rd.ward.FactorNames {
		c := rd.factors[k]
		if c < 0 || strings.TrimSpace(rec[c]) == "" {
			continue
		}
		// The package's number rules, so a factor reads exactly as
		// the other numeric columns do.
		v, err := parseCell(line, f, rec[c])
		if err != nil {
			problems.add(err)
			continue
		}
		if factors == nil {
			factors = map[string]float64{}
		}
		factors[f] = v
	}
	if problems.n > before {
		return nil // the row's values are not all known
	}
	if len(rd.slab) == cap(rd.slab) {
		rd.slab = make([]wardload.Observation, 0, 4096)
	}
	rd.slab = append(rd.slab, wardload.Observation{WardID: rd.ward.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d,
		WindowHours: window, CareMinutes: care, Factors: factors})
	o := &rd.slab[len(rd.slab)-1]
	if err := o.Validate(); err != nil {
		for _, e := range wardload.ErrorFields(err) {
			cellErr(fieldOr(e, "file"), "%s", wardload.ErrorMessage(e))
		}
		return nil
	}
	// The model refuses an observation that scales past
	// stats.MaxShiftMinutes for its shift (at most 25 real hours), and
	// values near the float64 limit overflow the review's sums; such a
	// cell is an entry error, refused here rather than stored.
	if !(o.CareMinutes/o.WindowHours*maxRealShiftHours <= stats.MaxShiftMinutes) {
		cellErr("care_minutes", "%g minutes in %g hours is more than wardload can use (at most %g minutes per hour of the window); check the minutes and the window.",
			o.CareMinutes, o.WindowHours, stats.MaxShiftMinutes/maxRealShiftHours)
		return nil
	}
	if check != nil {
		if err := check(o); err != nil {
			if wardload.ErrorCode(err) != wardload.EINVALID {
				return err
			}
			for _, e := range wardload.ErrorFields(err) {
				cellErr(fieldOr(e, "file"), "%s", wardload.ErrorMessage(e))
			}
			return nil
		}
	}
	if problems.n == 0 {
		rd.obs = append(rd.obs, o)
		rd.lines = append(rd.lines, line)
	}
	return nil
}

// problemList gathers the problems of an import: the first MaxProblems
// and how many there were.
type problemList struct {
	kept []error
	n    int
}

func (p *problemList) add(err error) {
	if err == nil {
		return
	}
	p.n++
	if len(p.kept) < MaxProblems {
		p.kept = append(p.kept, err)
	}
}

// err is nil without problems, the one problem's error, or one EINVALID
// error listing them all (wardload.Invalid) whose message says how many
// there were and gives each on its own line.
func (p *problemList) err() error {
	err := wardload.Invalid(p.kept...)
	if p.n <= 1 {
		return err
	}
	e, ok := err.(*wardload.Error)
	if !ok {
		return err
	}
	var b strings.Builder
	if p.n > len(p.kept) {
		fmt.Fprintf(&b, "The file has %d problems, so nothing was imported. The first %d are:", p.n, len(p.kept))
	} else {
		fmt.Fprintf(&b, "The file has %d problems, so nothing was imported:", p.n)
	}
	for _, f := range e.Fields {
		b.WriteString("\n")
		b.WriteString(f.Message)
	}
	e.Message = b.String()
	return e
}

// fieldOr returns the field e names, or def.
func fieldOr(e *wardload.Error, def string) string {
	if e.Field != "" {
		return e.Field
	}
	return def
}

func shiftList(shifts []*wardload.ShiftPattern) string {
	names := make([]string, len(shifts))
	for i, s := range shifts {
		names[i] = s.Name
	}
	return listOrNone(names)
}

func tierList(tiers []*wardload.Tier) string {
	codes := make([]string, len(tiers))
	for i, t := range tiers {
		codes[i] = t.Code
	}
	return listOrNone(codes)
}

func listOrNone(s []string) string {
	if len(s) == 0 {
		return "it has none yet"
	}
	return "it has " + strings.Join(s, ", ")
}

// clip shortens s, quoted in a message, to at most n bytes of valid UTF-8
// (as the server clips what it echoes).
func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return strings.ToValidUTF8(s[:n], "")
}
