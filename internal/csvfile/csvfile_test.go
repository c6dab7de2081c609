package csvfile

import (
	"errors"
	"slices"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func TestReadGroups(t *testing.T) {
	in := "\ufefftier, care_minutes ,window_hours\n" +
		"t1,12.5,1\n" +
		"t2,30,1\n" +
		"\"t1\",\"1e1\",1\n" +
		"t2, 7 ,1\n"
	tab, err := Read(strings.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(tab.Header, "|"); got != "tier|care_minutes|window_hours" {
		t.Fatalf("header = %q", got)
	}
	if got, want := tab.Lines, []int{2, 3, 4, 5}; !slices.Equal(got, want) {
		t.Fatalf("lines = %v, want %v", got, want)
	}
	groups, err := tab.Groups("care_minutes")
	if err != nil {
		t.Fatal(err)
	}
	if len(groups) != 2 {
		t.Fatalf("got %d groups", len(groups))
	}
	for _, tc := range []struct {
		tier   string
		values []float64
		rows   []int
	}{
		{"t1", []float64{12.5, 10}, []int{1, 3}},
		{"t2", []float64{30, 7}, []int{2, 4}},
	} {
		var g *Group
		for i := range groups {
			if groups[i].Tier == tc.tier {
				g = &groups[i]
			}
		}
		if g == nil {
			t.Fatalf("tier %s missing", tc.tier)
		}
		if len(g.Values) != len(tc.values) || g.Values[0] != tc.values[0] || g.Values[1] != tc.values[1] {
			t.Errorf("tier %s values = %v, want %v", tc.tier, g.Values, tc.values)
		}
		if !slices.Equal(g.Rows, tc.rows) {
			t.Errorf("tier %s rows = %v, want %v", tc.tier, g.Rows, tc.rows)
		}
	}
	if groups[0].Tier != "t1" {
		t.Errorf("groups not in order of first appearance: %q first", groups[0].Tier)
	}
}

func TestNoTierColumnIsOneGroup(t *testing.T) {
	tab, err := Read(strings.NewReader("care_minutes\n1\n2\n3\n"))
	if err != nil {
		t.Fatal(err)
	}
	groups, err := tab.Groups("care_minutes")
	if err != nil {
		t.Fatal(err)
	}
	if len(groups) != 1 || groups[0].Tier != "" || len(groups[0].Values) != 3 || !slices.Equal(groups[0].Rows, []int{1, 2, 3}) {
		t.Fatalf("groups = %+v", groups)
	}
}

// A quoted cell that spans lines moves later rows down; line numbers in
// messages must follow the file, not the record count.
func TestMultilineCellLineNumbers(t *testing.T) {
	tab, err := Read(strings.NewReader("note,care_minutes\n\"a\nb\",1\nc,zz\n"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = tab.Floats("care_minutes")
	wantErr(t, err, `line 4, column "care_minutes": "zz" is not a number.`)
}

func TestErrors(t *testing.T) {
	for _, tc := range []struct {
		name, in, column, want string
	}{
		{"empty file", "", "care_minutes", "The file is empty"},
		{"only BOM", "\ufeff", "care_minutes", "The file is empty"},
		{"header only", "care_minutes\n", "care_minutes", "no data rows"},
		{"not a number", "tier,care_minutes\nt1,5\nt1,6\nt1,7\nt1,8\nt1,9\nt1,12x\n", "care_minutes", `line 7, column "care_minutes": "12x" is not a number.`},
		{"NaN", "care_minutes\nNaN\n", "care_minutes", `line 2, column "care_minutes": "NaN" is not a number.`},
		{"Inf", "care_minutes\n1\n-Inf\n", "care_minutes", `line 3, column "care_minutes": "-Inf" is not a number.`},
		{"hex", "care_minutes\n0x10\n", "care_minutes", `line 2, column "care_minutes": "0x10" is not a number.`},
		{"overflow", "care_minutes\n1e400\n", "care_minutes", `line 2, column "care_minutes": "1e400" is too large`},
		{"empty cell", "a,care_minutes\nx,\n", "care_minutes", `line 2, column "care_minutes": the cell is empty`},
		{"missing column", "a,b\n1,2\n", "care_minutes", `line 1: there is no column "care_minutes" (the columns are "a", "b").`},
		{"duplicate column", "a,a\n1,2\n", "a", `line 1: column "a" appears twice.`},
		{"blank column", "a,\n1,2\n", "a", `line 1, column 2: the column name is blank.`},
		{"field count", "a,b\n1,2\n3\n", "a", "line 3: the row does not have the same number of fields"},
		{"bad quote", "a\n\"1\n", "a", "line 2: a quote"},
		{"bad utf8", "a\n\xff\n", "a", `line 2, column "a": the cell is not valid UTF-8`},
		{"empty tier", "tier,a\nt1,1\n ,2\n", "a", `line 3, column "tier": the tier is empty.`},
		{"long line", "a\n" + strings.Repeat("1", MaxLineBytes+10) + "\n", "a", "line 2: the line is longer than"},
		{"long last line", "a\n1\n" + strings.Repeat("1", MaxLineBytes+10), "a", "line 3: the line is longer than"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tab, err := Read(strings.NewReader(tc.in))
			if err == nil {
				_, err = tab.Groups(tc.column)
			}
			wantErr(t, err, tc.want)
		})
	}
}

func TestTooManyFields(t *testing.T) {
	h := strings.Repeat("a,", MaxFields) + "a"
	_, err := Read(strings.NewReader(h + "\n"))
	wantErr(t, err, "at most 1000 are allowed")
}

func wantErr(t *testing.T, err error, want string) {
	t.Helper()
	var we *wardload.Error
	if !errors.As(err, &we) || we.Code != wardload.EINVALID {
		t.Fatalf("error = %v, want EINVALID containing %q", err, want)
	}
	if !strings.Contains(we.Message, want) {
		t.Fatalf("message = %q, want it to contain %q", we.Message, want)
	}
}
