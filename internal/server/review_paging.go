package server

import (
	"cmp"
	"fmt"
	"net/url"
	"slices"
	"strconv"
	"strings"

	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// flaggedPageSize is how many flagged observations one review page lists.
// Each row carries an exclude form, so this, not the number of
// observations outside the fences, bounds the page's size.
const flaggedPageSize = 50

// flaggedOrders are the orders the flagged list can be sorted in, the
// first being the default.
var flaggedOrders = []struct{ value, label string }{
	{"severity", "extreme first, then by date"},
	{"newest", "newest first"},
	{"value", "highest minutes per shift first"},
}

// flaggedPaging is the part of the flagged list a request asks for.
type flaggedPaging struct {
	order string // one of flaggedOrders; "" is the default
	page  int    // 1-based; 0 is the first
	show  int64  // when set, the page that holds this observation
}

// parseFlaggedPaging reads the order and page parameters of the review.
func parseFlaggedPaging(order, page string) (flaggedPaging, error) {
	pg := flaggedPaging{order: strings.TrimSpace(order)}
	if pg.order != "" && !slices.ContainsFunc(flaggedOrders, func(o struct{ value, label string }) bool { return o.value == pg.order }) {
		return pg, wardload.FieldErrorf(wardload.EINVALID, "order", "The list can be ordered by severity, newest or value.")
	}
	if p := strings.TrimSpace(page); p != "" {
		n, err := strconv.Atoi(p)
		if err != nil || n < 1 || n > 1_000_000 {
			return pg, wardload.FieldErrorf(wardload.EINVALID, "page", "The page must be a whole number from 1.")
		}
		pg.page = n
	}
	return pg, nil
}

// flaggedObs is one observation outside a fence, before formatting.
type flaggedObs struct {
	o             *wardload.Observation
	tier          *wardload.Tier
	kind, logKind string
	value         float64 // minutes per shift
}

func (f flaggedObs) extreme() bool {
	return f.kind == stats.OutlierExtreme || f.logKind == stats.OutlierExtreme
}

// pageFlagged sorts all flagged observations in the requested order, sets
// the list's paging and order links on vm, and returns the observations of
// the requested page (the last page when it asks for one beyond).
// Only these are formatted and rendered.
func pageFlagged(vm *web.ReviewVM, all []flaggedObs, pg flaggedPaging) []flaggedObs {
	order := cmp.Or(pg.order, flaggedOrders[0].value)
	slices.SortFunc(all, func(a, b flaggedObs) int {
		var c int
		switch order {
		case "newest":
			c = -compareDates(a.o.Date, b.o.Date)
		case "value":
			c = cmp.Compare(b.value, a.value)
		default:
			if a.extreme() != b.extreme() {
				c = map[bool]int{true: -1, false: 1}[a.extreme()]
			} else {
				c = compareDates(a.o.Date, b.o.Date)
			}
		}
		return cmp.Or(c, cmp.Compare(a.o.ID, b.o.ID))
	})
	pages := max(1, (len(all)+flaggedPageSize-1)/flaggedPageSize)
	page := min(max(pg.page, 1), pages)
	if pg.show != 0 {
		if i := slices.IndexFunc(all, func(f flaggedObs) bool { return f.o.ID == pg.show }); i >= 0 {
			page = i/flaggedPageSize + 1
		}
	}
	lo, hi := (page-1)*flaggedPageSize, min(page*flaggedPageSize, len(all))
	link := func(order string, page int) string {
		q := url.Values{}
		if vm.ShiftID != "" {
			q.Set("shift", vm.ShiftID)
		}
		q.Set("weeks", vm.Weeks)
		if order != flaggedOrders[0].value {
			q.Set("order", order)
		}
		if page > 1 {
			q.Set("page", strconv.Itoa(page))
		}
		return vm.URL + "?" + q.Encode() + "#flagged"
	}
	vm.FlaggedRange = fmt.Sprintf("%d–%d of %d", lo+1, hi, len(all))
	vm.FlaggedPageSize = strconv.Itoa(flaggedPageSize)
	for _, o := range flaggedOrders {
		vm.FlaggedOrders = append(vm.FlaggedOrders, web.ReviewOrderVM{Label: o.label, URL: link(o.value, 1), Current: o.value == order})
	}
	if page > 1 {
		vm.FlaggedPrev = link(order, page-1)
	}
	if page < pages {
		vm.FlaggedNext = link(order, page+1)
	}
	return all[lo:hi]
}

func compareDates(a, b wardload.Date) int {
	return cmp.Or(cmp.Compare(a.Year, b.Year), cmp.Compare(a.Month, b.Month), cmp.Compare(a.Day, b.Day))
}
