package server

import (
	"net/url"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// flaggedFixture is n flagged observations over 30 days, every seventh
// extreme, values rising with the ID.
func flaggedFixture(n int) []flaggedObs {
	var out []flaggedObs
	for i := range n {
		f := flaggedObs{o: &wardload.Observation{ID: int64(i + 1), Date: wardload.Date{Year: 2026, Month: 3, Day: 1}.AddDays(i % 30)},
			kind: stats.OutlierMild, value: float64(i)}
		if i%7 == 0 {
			f.kind = stats.OutlierExtreme
		}
		out = append(out, f)
	}
	return out
}

func TestPageFlagged(t *testing.T) {
	const n = 2*flaggedPageSize + 7
	page := func(pg flaggedPaging) (web.ReviewVM, []flaggedObs) {
		vm := web.ReviewVM{URL: "/wards/w/review", Weeks: "8", ShiftID: "3"}
		return vm, pageFlagged(&vm, flaggedFixture(n), pg)
	}

	vm, got := page(flaggedPaging{})
	if len(got) != flaggedPageSize || vm.FlaggedRange != "1–50 of 107" || vm.FlaggedPrev != "" || vm.FlaggedNext == "" {
		t.Fatalf("first page: %d rows, range %q, prev %q, next %q", len(got), vm.FlaggedRange, vm.FlaggedPrev, vm.FlaggedNext)
	}
	// Default order: the 16 extreme ones first, each group by date then ID.
	for i, f := range got {
		if (i < 16) != (f.kind == stats.OutlierExtreme) {
			t.Fatalf("row %d (ID %d) kind %s out of order", i, f.o.ID, f.kind)
		}
		if i > 0 && i != 16 && compareDates(got[i-1].o.Date, f.o.Date) > 0 {
			t.Fatalf("row %d: %s after %s", i, f.o.Date, got[i-1].o.Date)
		}
	}
	next, _ := url.Parse(vm.FlaggedNext)
	if q := next.Query(); q.Get("page") != "2" || q.Get("shift") != "3" || q.Get("weeks") != "8" || q.Has("order") {
		t.Errorf("next link %q", vm.FlaggedNext)
	}

	// The last page holds the rest; a page beyond it is the last page.
	for _, p := range []int{3, 99} {
		vm, got = page(flaggedPaging{page: p})
		if len(got) != 7 || vm.FlaggedRange != "101–107 of 107" || vm.FlaggedNext != "" || !strings.Contains(vm.FlaggedPrev, "page=2") {
			t.Errorf("page %d: %d rows, range %q, prev %q, next %q", p, len(got), vm.FlaggedRange, vm.FlaggedPrev, vm.FlaggedNext)
		}
	}

	// Every observation is on exactly one page.
	seen := map[int64]int{}
	for p := 1; p <= 3; p++ {
		_, got = page(flaggedPaging{order: "value", page: p})
		for _, f := range got {
			seen[f.o.ID]++
		}
	}
	if len(seen) != n {
		t.Errorf("%d distinct observations over the pages, want %d", len(seen), n)
	}

	_, got = page(flaggedPaging{order: "value"})
	if got[0].value != n-1 || got[1].value != n-2 {
		t.Errorf("value order starts %v, %v", got[0].value, got[1].value)
	}
	_, got = page(flaggedPaging{order: "newest"})
	if got[0].o.Date != (wardload.Date{Year: 2026, Month: 3, Day: 30}) {
		t.Errorf("newest first starts on %s", got[0].o.Date)
	}

	// show picks the page that holds the observation, whatever page was asked.
	// ID 107 is mild and late in March, so not on the first page.
	vm, got = page(flaggedPaging{page: 1, show: 107})
	found := false
	for _, f := range got {
		found = found || f.o.ID == 107
	}
	if !found || vm.FlaggedPrev == "" {
		t.Errorf("show 107: not on the page given (%s)", vm.FlaggedRange)
	}
}

func TestParseFlaggedPaging(t *testing.T) {
	for _, tc := range []struct {
		order, page string
		ok          bool
	}{
		{"", "", true}, {"value", "2", true}, {"newest", " 3 ", true},
		{"sideways", "", false}, {"", "0", false}, {"", "-1", false}, {"", "x", false}, {"", "99999999", false},
	} {
		_, err := parseFlaggedPaging(tc.order, tc.page)
		if (err == nil) != tc.ok {
			t.Errorf("order %q page %q: error %v", tc.order, tc.page, err)
		}
		if err != nil && wardload.ErrorCode(err) != wardload.EINVALID {
			t.Errorf("order %q page %q: code %s, want EINVALID", tc.order, tc.page, wardload.ErrorCode(err))
		}
	}
}
