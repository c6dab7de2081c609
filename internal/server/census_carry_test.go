package server

import (
	"net/http/httptest"
	"strings"
	"testing"

	"wardload/web"
)

func TestCensusTotal(t *testing.T) {
	fields := func(vs ...string) []web.TierFieldVM {
		var out []web.TierFieldVM
		for _, v := range vs {
			out = append(out, web.TierFieldVM{Value: v})
		}
		return out
	}
	for _, c := range []struct {
		values []string
		beds   int
		total  int
		text   string
		over   bool
	}{
		{[]string{"3", "5", "", "1"}, 28, 9, "9 patients of 28 beds.", false},
		{[]string{"1"}, 0, 1, "1 patient.", false},
		{[]string{"20", "9"}, 28, 29, "29 patients of 28 beds: more patients than beds.", true},
		{[]string{"4", "x", "+2"}, 10, 4, "4 patients of 10 beds (2 fields are not whole numbers and are not counted).", false},
		{[]string{"-1", "2"}, 10, 2, "2 patients of 10 beds (1 field is not a whole number and is not counted).", false},
	} {
		total, text, over := censusTotal(fields(c.values...), c.beds)
		if total != c.total || text != c.text || over != c.over {
			t.Errorf("censusTotal(%q, %d) = %d, %q, %v; want %d, %q, %v", c.values, c.beds, total, text, over, c.total, c.text, c.over)
		}
	}
}

// TestCensusCarriesTheNewestEarlierCensus: the Day shift of 2 March has
// no census, so its counts come from the ward's newest census of a shift
// that started before it (the Night of 28 February, not the older Day of
// 27 February nor the later Night of 2 March), each marked as carried.
func TestCensusCarriesTheNewestEarlierCensus(t *testing.T) {
	f := newCensusFixture(t)
	f.mustProject(t, pNurseA, f.a, "2026-02-27", f.a.day, 1, 1, 1, 0)
	f.mustProject(t, pNurseA, f.a, "2026-02-28", f.a.night, 4, 6, 3, 0)
	f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.night, 9, 9, 9, 0)
	res, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	for i, want := range []string{"4", "6", "3", "0"} {
		if v, _ := attrByID(t, body, "tier-"+f.a.tiers[i].Code, "value"); v != want {
			t.Errorf("tier %s = %q, want %s carried from the Night of 28 February", f.a.tiers[i].Code, v, want)
		}
	}
	if got := byTestID(t, body, "tier-carried"); len(got) != len(f.a.tiers) {
		t.Errorf("%d counts marked carried, want %d", len(got), len(f.a.tiers))
	}
	if got := byTestID(t, body, "census-carried"); len(got) != 1 || !strings.Contains(got[0], "Night shift, Sat 28 Feb 2026") {
		t.Errorf("carried notice %q", got)
	}
	if got := byTestID(t, body, "census-total"); len(got) != 1 || !strings.HasPrefix(got[0], "13 patients") {
		t.Errorf("total %q, want 13 patients", got)
	}
}
