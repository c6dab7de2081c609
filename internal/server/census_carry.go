package server

import (
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"time"

	"wardload/internal/wardload"
	"wardload/web"
)

// carriedCensus is the newest census of the ward, of any shift, that
// started no later than the chosen dated shift: most patients of the last
// census are still on the ward, so a new shift's counts start from it.
// It returns nil when the ward has none.
//
// FindCensus orders by date descending and then by shift start
// ascending, so the newest dated shift is not simply the first row: the
// rows of the two newest dates (one per shift and date with LatestOnly)
// are read and the latest start at or before the chosen one wins.
func (s *Server) carriedCensus(r *http.Request, d *censusData, day wardload.Date, chosen *wardload.ShiftPattern) (*wardload.Census, error) {
	loc, err := d.ward.Location()
	if err != nil {
		return nil, err
	}
	chosenStart, _, _ := chosen.Window(day, loc)
	cs, _, err := s.store.FindCensus(r.Context(), wardload.CensusFilter{WardID: &d.ward.ID, To: &day, LatestOnly: true, Limit: 2 * len(d.shifts)})
	if err != nil {
		return nil, fmt.Errorf("census: carry forward: %w", err)
	}
	starts := map[int64]*wardload.ShiftPattern{}
	for _, p := range d.shifts {
		starts[p.ID] = p
	}
	var best *wardload.Census
	var bestStart time.Time
	for _, c := range cs {
		p, ok := starts[c.ShiftID]
		if !ok {
			continue // a retired shift: not offered, so not carried either
		}
		start, _, _ := p.Window(c.Date, loc)
		if start.After(chosenStart) || (best != nil && !start.After(bestStart)) {
			continue
		}
		best, bestStart = c, start
	}
	return best, nil
}

// carriedVM says where carried counts came from: "Night shift, Thu 3 Dec
// 2026, revision 2, 11 patients".
func carriedVM(c *wardload.Census, d *censusData) *web.CarriedCensusVM {
	name := "another shift"
	for _, p := range d.shifts {
		if p.ID == c.ShiftID {
			name = shiftName(p)
		}
	}
	return &web.CarriedCensusVM{
		From:      fmt.Sprintf("%s, %s %d", name, formatDay(c.Date), c.Date.Year),
		Revision:  c.Revision,
		EnteredAt: formatLocal(c.EnteredAt, d.ward),
		Total:     c.Total(),
	}
}

// censusTotal is the sentence under the counts: the patients the fields
// hold against the ward's beds. The census script keeps it current while
// typing; without the script the server's sentence is shown on every
// render, after a submit included. Fields that are not whole numbers are
// left out and said so.
func censusTotal(tiers []web.TierFieldVM, beds int) (total int, text string, over bool) {
	unread := 0
	for _, t := range tiers {
		if t.Value == "" {
			continue
		}
		n, err := strconv.Atoi(t.Value)
		if err != nil || strings.Trim(t.Value, "0123456789") != "" {
			unread++
			continue
		}
		total += n
	}
	text = patientsText(total)
	if beds > 0 {
		text += " of " + strconv.Itoa(beds) + " beds"
		over = total > beds
	}
	if over {
		text += ": more patients than beds"
	}
	switch {
	case unread == 1:
		text += " (1 field is not a whole number and is not counted)"
	case unread > 1:
		text += " (" + strconv.Itoa(unread) + " fields are not whole numbers and are not counted)"
	}
	return total, text + ".", over
}

func patientsText(n int) string {
	if n == 1 {
		return "1 patient"
	}
	return strconv.Itoa(n) + " patients"
}
