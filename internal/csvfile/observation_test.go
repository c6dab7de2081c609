package csvfile

import (
	"fmt"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func observationFixture() (*wardload.Ward, []*wardload.Tier, []*wardload.ShiftPattern) {
	ward := &wardload.Ward{ID: 7, Code: "w7", TimeZone: "UTC", FactorNames: []string{"score"}}
	tiers := []*wardload.Tier{{ID: 11, WardID: 7, Code: "t1", Label: "T1"}, {ID: 12, WardID: 7, Code: "t2", Label: "T2"}}
	shifts := []*wardload.ShiftPattern{{ID: 21, WardID: 7, Name: "Day", StartMinute: 450, NominalHours: 12.5}}
	return ward, tiers, shifts
}

// TestObservationProblemsAtOnce: every bad cell of every row comes back
// in one error, in file order, each naming its line and column; good rows
// between them do not hide the later ones.
func TestObservationProblemsAtOnce(t *testing.T) {
	ward, tiers, shifts := observationFixture()
	file := "date,shift,tier,window_hours,care_minutes,score\n" +
		"2026-03-01,Day,t1,12,40,\n" + // line 2: good
		"2026-02-30,Day,t9,12,40,\n" + // line 3: date and tier
		"2026-03-01,Day,t1,12,40,\n" + // line 4: good
		"2026-03-01,Eve,t2,0,4O,x\n" + // line 5: shift, minutes, score (the window is read, then Validate is skipped)
		"2026-03-01,Day,t2,30,40,\n" // line 6: window over 24 h (Validate)
	_, _, err := ReadObservations(strings.NewReader(file), ward, tiers, shifts)
	if wardload.ErrorCode(err) != wardload.EINVALID {
		t.Fatalf("err = %v, want EINVALID", err)
	}
	want := []string{
		`line 3, column "date": "2026-02-30" is not a date`,
		`line 3, column "tier": "t9" is not a tier code`,
		`line 5, column "shift": "Eve" is not a shift pattern`,
		`line 5, column "care_minutes": "4O" is not a number.`,
		`line 5, column "score": "x" is not a number.`,
		`line 6, column "window_hours": Observation window must be more than 0 and at most 24 hours.`,
	}
	got := wardload.ErrorFields(err)
	if len(got) != len(want) {
		t.Fatalf("%d problems, want %d: %v", len(got), len(want), err)
	}
	for i, w := range want {
		if !strings.HasPrefix(got[i].Message, w) {
			t.Errorf("problem %d = %q, want prefix %q", i, got[i].Message, w)
		}
	}
	msg := wardload.ErrorMessage(err)
	if !strings.HasPrefix(msg, "The file has 6 problems, so nothing was imported:\n") || strings.Count(msg, "\n") != 6 {
		t.Errorf("message = %q", msg)
	}
}

// TestObservationProblemsCapped: a file with more than MaxProblems bad
// cells lists the first MaxProblems and says how many there were.
func TestObservationProblemsCapped(t *testing.T) {
	ward, tiers, shifts := observationFixture()
	var b strings.Builder
	b.WriteString("date,shift,tier,window_hours,care_minutes\n")
	for i := range 150 {
		fmt.Fprintf(&b, "2026-03-01,Day,t1,12,bad%d\n", i)
	}
	_, _, err := ReadObservations(strings.NewReader(b.String()), ward, tiers, shifts)
	got := wardload.ErrorFields(err)
	if len(got) != MaxProblems {
		t.Fatalf("%d problems listed, want %d", len(got), MaxProblems)
	}
	if !strings.HasPrefix(got[99].Message, `line 101, column "care_minutes": "bad99"`) {
		t.Errorf("last listed = %q", got[99].Message)
	}
	if msg := wardload.ErrorMessage(err); !strings.HasPrefix(msg, "The file has 150 problems, so nothing was imported. The first 100 are:\n") {
		t.Errorf("message starts %q", msg[:min(len(msg), 120)])
	}
}

// TestObservationOneProblem keeps a single problem's own message.
func TestObservationOneProblem(t *testing.T) {
	ward, tiers, shifts := observationFixture()
	_, _, err := ReadObservations(strings.NewReader("date,shift,tier,window_hours,care_minutes\n2026-03-01,Day,t3,12,40\n"), ward, tiers, shifts)
	if got := wardload.ErrorMessage(err); !strings.HasPrefix(got, `line 2, column "tier": "t3" is not a tier code`) || len(wardload.ErrorFields(err)) != 1 {
		t.Errorf("message = %q", got)
	}
}
