package server

import (
	"context"
	"math/rand/v2"
	"strings"
	"testing"

	"golang.org/x/net/html"

	"wardload/internal/wardload"
)

// censusWard is what newCensusFixture adds to a ward: tiers, two shift
// patterns (Day 08:00 and Night 20:00, 12 hours), settings with a ratio
// floor on Day only, and invented care observations (seeded) for the eight
// weeks before the fixture's 2 March 2026. Tier t4 has no observations.
type censusWard struct {
	ward       *wardload.Ward
	tiers      []*wardload.Tier // t1, t2, t3, t4
	day, night *wardload.ShiftPattern
}

// censusFixture is the access fixture with ward A and ward B set up for
// census entry.
type censusFixture struct {
	*fixture
	a, b *censusWard
}

func newCensusFixture(tb testing.TB) *censusFixture {
	tb.Helper()
	f := &censusFixture{fixture: newFixture(tb)}
	f.a = mustCensusWard(tb, f.fixture, f.wardA, 1)
	f.b = mustCensusWard(tb, f.fixture, f.wardB, 2)
	return f
}

func mustCensusWard(tb testing.TB, f *fixture, ward *wardload.Ward, seed uint64) *censusWard {
	tb.Helper()
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	must := func(err error) {
		tb.Helper()
		if err != nil {
			tb.Fatal(err)
		}
	}
	cw := &censusWard{ward: ward}
	for i, t := range []struct{ code, label, desc string }{
		{"t1", "Tier 1 · stable", "Self-caring; observations twice a shift."},
		{"t2", "Tier 2 · moderate", "Needs help with mobility and hygiene."},
		{"t3", "Tier 3 · high", "Frequent observations, complex medication."},
		{"t4", "Tier 4 · one to one", "Continuous presence of a nurse."},
	} {
		tier := &wardload.Tier{WardID: ward.ID, Code: t.code, Label: t.label, Description: t.desc, DisplayOrder: i}
		must(f.st.CreateTier(ctx, tier))
		cw.tiers = append(cw.tiers, tier)
	}
	cw.day = &wardload.ShiftPattern{WardID: ward.ID, Name: "Day", StartMinute: 8 * 60, NominalHours: 12}
	cw.night = &wardload.ShiftPattern{WardID: ward.ID, Name: "Night", StartMinute: 20 * 60, NominalHours: 12}
	must(f.st.CreateShiftPattern(ctx, cw.day))
	must(f.st.CreateShiftPattern(ctx, cw.night))
	st := wardload.DefaultSettings(ward.ID)
	st.Beds = 30
	st.Floors = []wardload.RatioFloor{{ShiftID: cw.day.ID, PatientsPerNurse: 5}}
	must(f.st.SaveSettings(ctx, st))

	// Invented care minutes: tier k's mean grows with k, spread about a
	// third of the mean; 12-hour windows with a few 4-hour ones.
	rng := rand.New(rand.NewPCG(seed, 0x63656e73))
	var obs []*wardload.Observation
	first := wardload.Date{Year: 2026, Month: 1, Day: 5}
	for d := first; d.Before(wardload.Date{Year: 2026, Month: 3, Day: 2}); d = d.AddDays(1) {
		for _, sh := range []*wardload.ShiftPattern{cw.day, cw.night} {
			for k, t := range cw.tiers[:3] {
				window := 12.0
				if rng.IntN(10) == 0 {
					window = 4
				}
				mean := []float64{60, 150, 300}[k]
				if sh == cw.night {
					mean *= 0.7
				}
				m := max(0, mean*(1+rng.NormFloat64()/3)) * window / 12
				obs = append(obs, &wardload.Observation{WardID: ward.ID, TierID: t.ID, ShiftID: sh.ID, Date: d,
					WindowHours: window, CareMinutes: float64(int(m*10)) / 10})
			}
		}
	}
	_, err := f.st.CreateObservations(ctx, obs)
	must(err)
	return cw
}

// counts returns how many census entries and projections the store holds.
func (f *censusFixture) counts(tb testing.TB) (census, projections int) {
	tb.Helper()
	_, census, err := f.st.FindCensus(context.Background(), wardload.CensusFilter{})
	if err != nil {
		tb.Fatal(err)
	}
	_, projections, err = f.st.FindProjections(context.Background(), wardload.ProjectionFilter{})
	if err != nil {
		tb.Fatal(err)
	}
	return census, projections
}

// attrByID returns attribute attr of the element with id, and whether the
// element has it.
func attrByID(tb testing.TB, page, id, attr string) (string, bool) {
	tb.Helper()
	doc, err := html.Parse(strings.NewReader(page))
	if err != nil {
		tb.Fatal(err)
	}
	var val string
	var found bool
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			isIt := false
			for _, a := range n.Attr {
				isIt = isIt || (a.Key == "id" && a.Val == id)
			}
			if isIt {
				for _, a := range n.Attr {
					if a.Key == attr {
						val, found = a.Val, true
					}
				}
				return
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	return val, found
}
