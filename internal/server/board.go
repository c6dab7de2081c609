package server

import (
	"bytes"
	"fmt"
	"net/http"
	"slices"
	"strconv"
	"time"

	"wardload/internal/export"
	"wardload/internal/wardload"
	"wardload/web"
)

// The hospital board (issue 10): every ward × dated shift the viewer may
// see over the next 24 hours or 7 days, with its census state, the
// recommendation, the ratio floor, the planned staff and the chance of a
// shortfall with them, most at risk first. The page, its downloads and
// GET /api/v1/board all come from export.BuildBoard, so they agree.

// boardWindow reads ?view= (day, the default, or week) and returns the
// window from the injected clock's now.
func (s *Server) boardWindow(r *http.Request) (view string, from, to time.Time, err error) {
	view = "day"
	if vs, ok := r.URL.Query()["view"]; ok {
		if view, err = oneParam(vs, "view", "View must be day or week."); err != nil {
			return "", time.Time{}, time.Time{}, err
		}
	}
	from = s.now()
	switch view {
	case "day":
		return view, from, from.Add(export.BoardDay), nil
	case "week":
		return view, from, from.Add(export.BoardWeek), nil
	}
	return "", time.Time{}, time.Time{}, wardload.FieldErrorf(wardload.EINVALID, "view", "View must be day or week.")
}

// boardWards returns the wards the request's principal may see: every
// ward for an admin, else the user's or the token's wards, by code.
func (s *Server) boardWards(r *http.Request) ([]*wardload.Ward, error) {
	// Retired wards have no shifts to staff: they are left off the board.
	all, _, err := s.store.FindWards(r.Context(), wardload.WardFilter{ActiveOnly: true})
	if err != nil {
		return nil, fmt.Errorf("board wards: %w", err)
	}
	p := principalFrom(r.Context())
	out := all[:0:0]
	for _, w := range all {
		switch {
		case p.User != nil && p.User.MemberOf(w.ID):
			out = append(out, w)
		case p.Token != nil && slices.Contains(p.Token.WardIDs, w.ID):
			out = append(out, w)
		}
	}
	return out, nil
}

// board builds the board of the request.
func (s *Server) board(r *http.Request) (string, *export.Board, error) {
	view, from, to, err := s.boardWindow(r)
	if err != nil {
		return "", nil, err
	}
	wards, err := s.boardWards(r)
	if err != nil {
		return "", nil, err
	}
	d, err := export.LoadBoard(r.Context(), s.store, wards, from, to)
	if err != nil {
		return "", nil, err
	}
	b, err := export.BuildBoard(d, from, to, s.now())
	return view, b, err
}

// handleBoard shows the board page.
func (s *Server) handleBoard(w http.ResponseWriter, r *http.Request) error {
	view, b, err := s.board(r)
	if err != nil {
		return err
	}
	u := principalFrom(r.Context()).User
	vm := web.BoardVM{Week: view == "week", Caution: b.Caution,
		From: b.From.Format("2006-01-02 15:04 UTC"), To: b.To.Format("2006-01-02 15:04 UTC"),
		CSVURL: "/board.csv?view=" + view, JSONURL: "/board.json?view=" + view,
		Downloads: slices.Contains(readers, u.Role)}
	staff := slices.Contains(wardStaff, u.Role)
	for i := range b.Rows {
		vm.Rows = append(vm.Rows, boardRowVM(&b.Rows[i], staff))
	}
	return s.render(w, r, http.StatusOK, web.BoardPage(s.layout(r, "Hospital board"), vm))
}

// boardRowVM is the page's row: figures as text, "–" where there is none.
func boardRowVM(br *export.BoardRow, canPlan bool) web.BoardRowVM {
	num := func(p *int) string {
		if p == nil {
			return "–"
		}
		return strconv.Itoa(*p)
	}
	v := web.BoardRowVM{Ward: br.Ward, WardName: br.WardName, Shift: br.Shift, Date: br.Date.String(),
		Window:   br.Start.Format("Mon 2 Jan 15:04") + "–" + br.End.Format("15:04 MST"),
		Status:   boardStatusText(br.Status),
		Patients: num(br.TotalPatients), Recommended: num(br.Recommended), Floor: num(br.Floor),
		FloorRule: br.FloorRule, Planned: num(br.Planned), Difference: "–", Chance: "–", BelowFloor: br.BelowFloor}
	if br.Floor == nil && br.Status != export.StatusNoCensus {
		v.Floor = "none set"
	}
	if br.Difference != nil {
		v.Difference = strconv.Itoa(*br.Difference)
		if *br.Difference > 0 {
			v.Difference = "+" + v.Difference
		}
		v.Short = *br.Difference < 0
	}
	if br.Chance != nil {
		v.Chance = br.Chance.ChanceText()
	} else if br.Planned == nil && br.Status != export.StatusNoCensus {
		v.Chance = "no staff planned"
	}
	if br.ProjectionID != 0 {
		v.ProjectionURL = projectionURL(&wardload.Ward{Code: br.Ward}, br.ProjectionID)
	}
	if canPlan {
		v.PlanURL = staffingURL(&wardload.Ward{Code: br.Ward}, br.Date.String())
	}
	return v
}

// boardStatusText says a row's census state in words.
func boardStatusText(status string) string {
	switch status {
	case export.StatusProjected:
		return "census in, estimated"
	case export.StatusFloorOnly:
		return "census in, ratio floor only (too few observations)"
	}
	return "no census yet"
}

// handleBoardCSV downloads the board as CSV.
func (s *Server) handleBoardCSV(w http.ResponseWriter, r *http.Request) error {
	return s.boardDownload(w, r, export.CSV, true)
}

// handleBoardJSON downloads the board as JSON.
func (s *Server) handleBoardJSON(w http.ResponseWriter, r *http.Request) error {
	return s.boardDownload(w, r, export.JSON, true)
}

// handleAPIBoard answers GET /api/v1/board[?view=day|week&format=json|csv]
// with the board of the token's wards.
func (s *Server) handleAPIBoard(w http.ResponseWriter, r *http.Request) error {
	format := export.JSON
	if vs, ok := r.URL.Query()["format"]; ok {
		v, err := oneParam(vs, "format", "Format must be json or csv.")
		if err != nil {
			return err
		}
		if format, ok = export.ParseFormat(v); !ok {
			return wardload.FieldErrorf(wardload.EINVALID, "format", "Format must be json or csv.")
		}
	}
	return s.boardDownload(w, r, format, false)
}

// boardDownload writes the board whole into a buffer, so a failure is an
// error and not half a file; as an attachment for the browser downloads.
func (s *Server) boardDownload(w http.ResponseWriter, r *http.Request, format export.Format, attachment bool) error {
	view, b, err := s.board(r)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if format == export.CSV {
		err = export.WriteBoardCSV(&buf, b)
	} else {
		err = export.WriteBoardJSON(&buf, b)
	}
	if err != nil {
		return fmt.Errorf("board %s: %w", format, err)
	}
	h := w.Header()
	h.Set("Content-Type", format.ContentType())
	if attachment {
		h.Set("Content-Disposition", fmt.Sprintf(`attachment; filename="wardload-board-%s-%s.%s"`, view, b.From.Format("20060102T1504Z"), format))
	}
	h.Set("Cache-Control", "no-store")
	w.WriteHeader(http.StatusOK)
	_, err = w.Write(buf.Bytes())
	return err
}
