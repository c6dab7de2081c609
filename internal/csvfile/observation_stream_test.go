package csvfile

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// FuzzObservationsStreamed checks that ReadObservations, which reads one
// row at a time, answers exactly as the whole-file reader it replaced
// (readObservationsWhole, kept below as the reference): the same
// observations and lines, or a refusal of the same kind, for any input. Seeds: the
// FuzzObservations corpus and files with several problems at once.
func FuzzObservationsStreamed(f *testing.F) {
	ward := &wardload.Ward{ID: 7, Code: "w7", Name: "W7", TimeZone: "Europe/London", FactorNames: []string{"dependency_score"}}
	tiers := []*wardload.Tier{{ID: 11, WardID: 7, Code: "t1", Label: "T1"}, {ID: 12, WardID: 7, Code: "t2", Label: "T2"}}
	shifts := []*wardload.ShiftPattern{{ID: 21, WardID: 7, Name: "Day", StartMinute: 450, NominalHours: 12.5},
		{ID: 22, WardID: 7, Name: "Night", StartMinute: 1170, NominalHours: 12.5}}
	h := "date,shift,tier,window_hours,care_minutes,dependency_score\n"
	for _, s := range []string{
		h + "2026-03-01,Day,t1,4,30,2\n",
		h + "2026-03-01,Day,t1,4,30,\n2026-03-02,night,t2,4,45,3\n",
		h + "bad,Day,t1,4,30,2\n2026-03-01,Day,t1,x,30,2\n",        // date before window: window wins
		h + "2026-03-01,Day,t1,4,y,2\n2026-03-01,Day,t1,x,30,2\n",  // care before window: window wins
		h + "2026-03-01,Dusk,t1,4,30,2\n2026-03-01,Day,t1,4,y,2\n", // shift before care: care wins
		h + "2026-03-01,Day,t9,4,30,2\n2026-03-01,Dusk,t1,4,30,2\n",
		h + "2026-03-01,Day,t1,4,30,z\n2026-03-01,Day,t1,4,3000,2\n",
		h + "2026-03-01,Day,t1,30,30,2\n",
		"date,shift,tier,window_hours,care_minutes,name\n2026-03-01,Day,t1,4,30,2\n2026-03-01,\"Day,t1,4,30,2\n", // CSV error beats header
		"date,shift,tier,window_hours\n2026-03-01,Day,t1,4\n",
		h,
		"",
	} {
		f.Add([]byte(s))
	}
	seeds, _ := filepath.Glob("testdata/fuzz/FuzzObservations/*")
	for _, p := range seeds {
		if b, err := os.ReadFile(p); err == nil {
			if s, ok := corpusBytes(b); ok {
				f.Add(s)
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		obs, lines, err := ReadObservations(bytes.NewReader(data), ward, tiers, shifts)
		wobs, wlines, werr := readObservationsWhole(bytes.NewReader(data), ward, tiers, shifts)
		// The streamed reader lists every problem (issue 9 item 6), the
		// whole-file reader its first: they must agree on whether the
		// file is refused and on the kind of refusal, and a CSV or header
		// error (which stops both) must be the same.
		if (err == nil) != (werr == nil) || wardload.ErrorCode(err) != wardload.ErrorCode(werr) {
			t.Fatalf("error %v, whole-file reader %v", err, werr)
		}
		if werr != nil && len(wardload.ErrorFields(err)) <= 1 && wardload.ErrorField(werr) == "file" && fmt.Sprint(err) != fmt.Sprint(werr) {
			t.Fatalf("error %v, whole-file reader %v", err, werr)
		}
		if !reflect.DeepEqual(lines, wlines) || len(obs) != len(wobs) {
			t.Fatalf("lines %v, whole-file reader %v", lines, wlines)
		}
		for i := range obs {
			if !reflect.DeepEqual(*obs[i], *wobs[i]) {
				t.Fatalf("row %d: %+v, whole-file reader %+v", i+1, *obs[i], *wobs[i])
			}
		}
	})
}

// corpusBytes reads the []byte value of a "go test fuzz v1" corpus file.
func corpusBytes(b []byte) ([]byte, bool) {
	s := strings.TrimSpace(string(b))
	_, v, ok := strings.Cut(s, "\n[]byte(")
	if !ok || !strings.HasSuffix(v, ")") {
		return nil, false
	}
	var out string
	if _, err := fmt.Sscanf(strings.TrimSuffix(v, ")"), "%q", &out); err != nil {
		return nil, false
	}
	return []byte(out), true
}

// readObservationsWhole is ReadObservations as it was before it streamed
// (reading the whole table first), kept as the reference the fuzz target
// compares with.
func readObservationsWhole(r io.Reader, ward *wardload.Ward, tiers []*wardload.Tier, shifts []*wardload.ShiftPattern) (obs []*wardload.Observation, lines []int, err error) {
	t, err := Read(r)
	if err != nil {
		return nil, nil, err
	}
	allowed := ObservationHeader(ward)
	for i, h := range t.Header {
		if !slices.Contains(allowed, h) {
			return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "file",
				"line 1, column %d: column %q is not accepted. wardload stores no patient identifiers or free text, so a file may only have the columns %s. Remove the other columns and import again.",
				i+1, clip(h, 40), strings.Join(allowed, ", "))
		}
	}
	for _, c := range observationColumns {
		if t.Index(c) < 0 {
			return nil, nil, wardload.FieldErrorf(wardload.EINVALID, "file",
				"line 1: the column %q is missing. The header must have %s.", c, strings.Join(allowed, ", "))
		}
	}
	tierByCode := map[string]*wardload.Tier{}
	for _, tr := range tiers {
		tierByCode[tr.Code] = tr
	}
	shiftByName := map[string]*wardload.ShiftPattern{}
	for _, sp := range shifts {
		shiftByName[strings.ToLower(sp.Name)] = sp
	}

	// Numbers first, column by column: Floats names line and column.
	window, err := t.Floats("window_hours")
	if err != nil {
		return nil, nil, err
	}
	care, err := t.Floats("care_minutes")
	if err != nil {
		return nil, nil, err
	}
	dates, _ := t.Strings("date")
	shiftNames, _ := t.Strings("shift")
	tierCodes, _ := t.Strings("tier")

	obs = make([]*wardload.Observation, len(t.Records))
	for i := range t.Records {
		line := t.Lines[i]
		cellErr := func(col, format string, args ...any) error {
			return wardload.FieldErrorf(wardload.EINVALID, col, "line %d, column %q: %s", line, col, fmt.Sprintf(format, args...))
		}
		d, err := wardload.ParseDate(dates[i])
		if err != nil {
			return nil, nil, cellErr("date", "%q is not a date; use YYYY-MM-DD, e.g. 2026-03-02.", clip(dates[i], 40))
		}
		sp, ok := shiftByName[strings.ToLower(shiftNames[i])]
		if !ok {
			return nil, nil, cellErr("shift", "%q is not a shift pattern of this ward (%s).", clip(shiftNames[i], 40), shiftList(shifts))
		}
		tr, ok := tierByCode[tierCodes[i]]
		if !ok {
			return nil, nil, cellErr("tier", "%q is not a tier code of this ward (%s).", clip(tierCodes[i], 40), tierList(tiers))
		}
		o := &wardload.Observation{WardID: ward.ID, TierID: tr.ID, ShiftID: sp.ID, Date: d,
			WindowHours: window.Values[i], CareMinutes: care.Values[i]}
		for _, f := range ward.FactorNames {
			c := t.Index(f)
			if c < 0 || strings.TrimSpace(t.Records[i][c]) == "" {
				continue
			}
			// The package's number rules, so a factor reads exactly as
			// the other numeric columns do.
			v, err := t.Float(i, f)
			if err != nil {
				return nil, nil, err
			}
			if o.Factors == nil {
				o.Factors = map[string]float64{}
			}
			o.Factors[f] = v
		}
		if err := o.Validate(); err != nil {
			field := wardload.ErrorField(err)
			if field == "" {
				field = "file"
			}
			return nil, nil, cellErr(field, "%s", wardload.ErrorMessage(err))
		}
		// The model refuses an observation that scales past
		// stats.MaxShiftMinutes for its shift (at most 25 real hours), and
		// values near the float64 limit overflow the review's sums; such a
		// cell is an entry error, refused here rather than stored.
		if !(o.CareMinutes/o.WindowHours*maxRealShiftHours <= stats.MaxShiftMinutes) {
			return nil, nil, cellErr("care_minutes", "%g minutes in %g hours is more than wardload can use (at most %g minutes per hour of the window); check the minutes and the window.",
				o.CareMinutes, o.WindowHours, stats.MaxShiftMinutes/maxRealShiftHours)
		}
		obs[i] = o
	}
	return obs, t.Lines, nil
}
