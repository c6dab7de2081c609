package server

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"regexp"
	"strconv"
	"strings"
	"time"

	"wardload/internal/csvfile"
	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// maxImportBytes is the import route's body limit: a ward's weekly sheet
// is a few kilobytes; ten years of one ward fit well under it.
const maxImportBytes = 4 << 20

// importVM describes the upload form for ward.
func (s *Server) importVM(r *http.Request) (web.ImportVM, []*wardload.Tier, []*wardload.ShiftPattern, error) {
	ward := principalFrom(r.Context()).Ward
	vm := web.ImportVM{WardName: ward.Name, URL: importURL(ward), ReviewURL: reviewURL(ward),
		TemplateURL: templateURL(ward),
		Factors:     ward.FactorNames}
	shifts, tiers, err := s.shiftsAndTiers(r.Context(), ward, "import")
	if err != nil {
		return vm, nil, nil, err
	}
	for _, t := range tiers {
		vm.Tiers = append(vm.Tiers, t.Code+" ("+t.Label+")")
	}
	for _, p := range shifts {
		vm.Shifts = append(vm.Shifts, p.Name)
	}
	return vm, tiers, shifts, nil
}

func (s *Server) renderImport(w http.ResponseWriter, r *http.Request, status int, vm web.ImportVM) error {
	return s.render(w, r, status, web.ImportPage(s.layout(r, "Import observations · "+vm.WardName), vm))
}

// handleImportForm shows the upload form.
func (s *Server) handleImportForm(w http.ResponseWriter, r *http.Request) error {
	vm, _, _, err := s.importVM(r)
	if err != nil {
		return err
	}
	return s.renderImport(w, r, http.StatusOK, vm)
}

// handleImport stores an uploaded file as one batch, all or nothing.
func (s *Server) handleImport(w http.ResponseWriter, r *http.Request) error {
	end, err := s.beginImport()
	if err != nil {
		return err
	}
	defer end()
	vm, tiers, shifts, err := s.importVM(r)
	if err != nil {
		return err
	}
	refuse := func(msg string) error {
		vm.Error = msg
		return s.renderImport(w, r, http.StatusBadRequest, vm)
	}
	if err := r.ParseMultipartForm(maxImportBytes); err != nil {
		var mbe *http.MaxBytesError
		var ne net.Error
		if errors.As(err, &mbe) || errors.As(err, &ne) && ne.Timeout() {
			return err // the adapter names the limit
		}
		return refuse("The upload could not be read. Choose a CSV file and try again.")
	}
	defer r.MultipartForm.RemoveAll()
	file, _, err := r.FormFile("file")
	if err != nil {
		return refuse("Choose a CSV file to import.")
	}
	defer file.Close()
	ward, u := principalFrom(r.Context()).Ward, principalFrom(r.Context()).User
	obs, lines, err := ParseObservationImport(file, ward, tiers, shifts, s.now())
	if wardload.ErrorCode(err) == wardload.EINVALID {
		probs := wardload.ErrorFields(err)
		if len(probs) <= 1 {
			return refuse(wardload.ErrorMessage(err))
		}
		// Every problem at once, each leading back to the file input;
		// the message's first line says how many there are.
		for _, e := range probs {
			vm.Problems = append(vm.Problems, web.FormErrorVM{Href: "#import-file", Message: e.Message})
		}
		head, _, _ := strings.Cut(wardload.ErrorMessage(err), "\n")
		return refuse(head)
	} else if err != nil {
		return fmt.Errorf("import: read: %w", err)
	}
	for _, o := range obs {
		o.EnteredBy = u.ID
	}
	batch, err := s.store.CreateObservations(r.Context(), obs)
	if wardload.ErrorCode(err) == wardload.EINVALID {
		return refuse(RowToLine(wardload.ErrorMessage(err), lines))
	} else if err != nil {
		return fmt.Errorf("import: store: %w", err)
	}
	s.sessions.Put(r.Context(), sessFlash, fmt.Sprintf("Imported %d observations (batch %s).", len(obs), batch))
	return seeOther(w, r, reviewURL(ward))
}

// ParseObservationImport reads an observation import file for ward, as
// the web import and the command line's observations import both do: the
// columns of csvfile.ReadObservations, dates checked against now in the ward's
// time zone. Every problem is EINVALID naming the file line; lines[i] is
// the file line of obs[i], for RowToLine.
func ParseObservationImport(r io.Reader, ward *wardload.Ward, tiers []*wardload.Tier, shifts []*wardload.ShiftPattern, now time.Time) (obs []*wardload.Observation, lines []int, err error) {
	check, err := observationDates(ward, now)
	if err != nil {
		return nil, nil, err
	}
	return csvfile.ReadObservationsChecked(r, ward, tiers, shifts, check)
}

// rowPrefix is how CreateObservations names the row it refused.
var rowPrefix = regexp.MustCompile(`^Row ([0-9]+): `)

// RowToLine rewrites the store's "Row N: …" (N 1-based in the batch) as the
// file line the person can find: "line L: …".
func RowToLine(msg string, lines []int) string {
	m := rowPrefix.FindStringSubmatch(msg)
	if m == nil {
		return msg
	}
	n, err := strconv.Atoi(m[1])
	if err != nil || n < 1 || n > len(lines) {
		return msg
	}
	return fmt.Sprintf("line %d: %s", lines[n-1], msg[len(m[0]):])
}

// handleImportTemplate downloads an import file with the header only.
func (s *Server) handleImportTemplate(w http.ResponseWriter, r *http.Request) error {
	ward := principalFrom(r.Context()).Ward
	var buf bytes.Buffer
	cw := csv.NewWriter(&buf)
	if err := cw.Write(csvfile.ObservationHeader(ward)); err != nil {
		return fmt.Errorf("template: %w", err)
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("template: %w", err)
	}
	w.Header().Set("Content-Type", "text/csv; charset=utf-8")
	w.Header().Set("Content-Disposition", `attachment; filename="`+ward.Code+`-observations.csv"`)
	w.Header().Set("Cache-Control", "no-store")
	_, err := w.Write(buf.Bytes())
	return err
}

// earliestObservation is the oldest date an import accepts: older records
// are almost certainly a mistyped year, and the model never looks back
// that far (lookback is at most wardload.MaxLookbackWeeks).
var earliestObservation = wardload.Date{Year: 2000, Month: time.January, Day: 1}

// observationDates returns the check that refuses an observation dated
// after today in the ward's time zone (care not yet given: a mistyped
// year) or before earliestObservation; the reader adds line and column.
func observationDates(ward *wardload.Ward, now time.Time) (func(*wardload.Observation) error, error) {
	loc, err := ward.Location()
	if err != nil {
		return nil, err
	}
	today := projector.Today(now, loc)
	return func(o *wardload.Observation) error {
		if o.Date.After(today) {
			return wardload.FieldErrorf(wardload.EINVALID, "date", "%s is after today (%s); care not yet given cannot be observed.", o.Date, today)
		}
		if o.Date.Before(earliestObservation) {
			return wardload.FieldErrorf(wardload.EINVALID, "date", "%s is before %s; check the year.", o.Date, earliestObservation)
		}
		return nil
	}, nil
}
