package server

import (
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
