package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// postStaffed posts the census of f.censusForm with the staff on duty and
// returns the stored projection it led to.
func (f *censusFixture) postStaffed(t *testing.T, who, nurses, support string) *wardload.Projection {
	t.Helper()
	form := f.censusForm(f.a.day, "4", "6", "3", "0")
	form.Set(nursesOnDutyField, nurses)
	form.Set(supportOnDutyField, support)
	res, body := f.do(t, f.as(t, who, post("/wards/w-a/census", form)))
	m := projectionPath.FindStringSubmatch(res.Header.Get("Location"))
	if res.StatusCode != 303 || m == nil {
		t.Fatalf("status %d Location %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}
	id, _ := strconv.ParseInt(m[1], 10, 64)
	p, err := f.st.FindProjectionByID(context.Background(), id)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestCensusStaffOnDutyGap: the staff on duty entered with a census are
// stored with the revision, and the projection page states the gap to the
// recommendation and to the floor in words, the chance of a shortfall with
// them as the page's table gives it, and the ward's escalation text only
// when below.
func TestCensusStaffOnDutyGap(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	st, err := f.st.FindSettings(ctx, f.wardA.ID)
	if err != nil {
		t.Fatal(err)
	}
	st.SupportStaff = true
	st.Escalation = "Call the site manager on 4410.\nWrite it in the shift log."
	if err := f.st.SaveSettings(ctx, st); err != nil {
		t.Fatal(err)
	}
	page := func(p *wardload.Projection, who string) string {
		_, body := f.do(t, f.as(t, who, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
		return body
	}

	// Without staff on duty there is no staff block.
	p0 := f.postStaffed(t, pNurseA, "", "")
	if got := byTestID(t, page(p0, pNurseA), "duty"); len(got) != 0 {
		t.Fatalf("duty block without staff: %q", got)
	}
	if p0.Floor == nil || p0.Recommended < 3 {
		t.Fatalf("fixture: want a floor and at least 3 recommended, got floor %v recommended %d", p0.Floor, p0.Recommended)
	}
	rec, floor := p0.Recommended, *p0.Floor

	// Two short of the recommendation: gap, chance, support staff and the
	// escalation text.
	short := rec - 2
	p1 := f.postStaffed(t, pNurseA, strconv.Itoa(short), "2")
	c, err := f.st.FindCensusByID(ctx, p1.CensusID)
	if err != nil {
		t.Fatal(err)
	}
	if c.Staff.Nurses == nil || *c.Staff.Nurses != short || c.Staff.Support == nil || *c.Staff.Support != 2 {
		t.Fatalf("stored staff %+v", c.Staff)
	}
	body := page(p1, pNurseA)
	gap := strings.Join(byTestID(t, body, "duty-gap"), "")
	want := fmt.Sprintf("You have %d nurses on duty; the estimate is %d — 2 short; the ratio floor needs %d", short, rec, floor)
	if !strings.HasPrefix(gap, want) {
		t.Errorf("gap %q, want it to start %q", gap, want)
	}
	if short < floor && !strings.Contains(gap, fmt.Sprintf("needs %d — %d short.", floor, floor-short)) {
		t.Errorf("gap %q does not say the floor is %d short", gap, floor-short)
	}
	// The chance is the shortfall table's text for that headcount, or
	// (below the table's first row) said to be higher than the first row's.
	chance := strings.Join(byTestID(t, body, "duty-chance"), "")
	rows := byTestID(t, body, "shortfall-row")
	if chance == "" || len(rows) == 0 {
		t.Fatalf("chance %q, shortfall rows %d", chance, len(rows))
	}
	if strings.Contains(chance, " 0%") || strings.Contains(chance, " 100%") {
		t.Errorf("chance printed as a bare 0 or 1: %q", chance)
	}
	nurses, chances := byTestID(t, body, "shortfall-nurses"), byTestID(t, body, "shortfall-chance")
	wantChance := ""
	for i, n := range nurses {
		if strings.Fields(n)[0] == strconv.Itoa(short) {
			wantChance = fmt.Sprintf("Chance of a shortfall with the %d nurses on duty: %s.", short, chances[i])
		}
	}
	if first, _ := strconv.Atoi(strings.Fields(nurses[0])[0]); short < first {
		wantChance = fmt.Sprintf("Chance of a shortfall with the %d nurses on duty: higher than with %d nurses, which is %s.", short, first, chances[0])
	}
	if chance != wantChance {
		t.Errorf("chance %q,\nwant     %q (table %q %q)", chance, wantChance, nurses, chances)
	}
	if got := strings.Join(byTestID(t, body, "duty-support"), ""); !strings.HasPrefix(got, "2 support staff on duty") {
		t.Errorf("support %q", got)
	}
	if got := strings.Join(byTestID(t, body, "duty-escalation"), ""); !strings.Contains(got, "Call the site manager on 4410.") {
		t.Errorf("escalation %q", got)
	}
	if len(byTestID(t, body, "projection-caution")) != 1 {
		t.Error("the caution is missing from the page with staff on duty")
	}

	// As many as recommended: no escalation.
	p2 := f.postStaffed(t, pNurseA, strconv.Itoa(rec), "")
	body = page(p2, pNurseA)
	gap = strings.Join(byTestID(t, body, "duty-gap"), "")
	if !strings.Contains(gap, fmt.Sprintf("the estimate is %d — as many", rec)) || strings.Contains(gap, "short") {
		t.Errorf("gap at the recommendation %q", gap)
	}
	if len(byTestID(t, body, "duty-escalation")) != 0 || len(byTestID(t, body, "duty-no-escalation")) != 0 {
		t.Error("escalation shown when not below")
	}

	// Below, on a ward without escalation text: the nurse is told to ask
	// a manager; a manager gets the link to the settings.
	st.Escalation = ""
	if err := f.st.SaveSettings(ctx, st); err != nil {
		t.Fatal(err)
	}
	for who, link := range map[string]bool{pNurseA: false, pManagerA: true} {
		body = page(p1, who)
		msg := byTestID(t, body, "duty-no-escalation")
		if len(msg) != 1 || strings.Contains(body, `href="/wards/w-a/settings#staffing"`) != link {
			t.Errorf("%s: no-escalation %q, settings link %v, want %v", who, msg, !link, link)
		}
	}
}

// TestCensusSupportStaffField: the support staff field is shown only on a
// ward whose settings say it has support staff, and a bad count there is
// refused beside the field with nothing stored.
func TestCensusSupportStaffField(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	fields := func() int {
		_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
		return len(byTestID(t, body, "staff-field"))
	}
	if n := fields(); n != 1 {
		t.Fatalf("without support staff: %d staff fields, want 1", n)
	}
	st, err := f.st.FindSettings(ctx, f.wardA.ID)
	if err != nil {
		t.Fatal(err)
	}
	st.SupportStaff = true
	if err := f.st.SaveSettings(ctx, st); err != nil {
		t.Fatal(err)
	}
	if n := fields(); n != 2 {
		t.Fatalf("with support staff: %d staff fields, want 2", n)
	}
	form := f.censusForm(f.a.day, "4", "6", "3", "0")
	form.Set(nursesOnDutyField, "6")
	form.Set(supportOnDutyField, "-1")
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
	if res.StatusCode != 400 {
		t.Fatalf("status %d, want 400", res.StatusCode)
	}
	if v, _ := attrByID(t, body, "staff-support", "aria-invalid"); v != "true" {
		t.Error("staff-support not aria-invalid")
	}
	if v, _ := attrByID(t, body, "staff-nurses", "value"); v != "6" {
		t.Errorf("staff-nurses = %q, want the typed 6", v)
	}
	if nc, np := f.counts(t); nc != 0 || np != 0 {
		t.Errorf("stored %d census, %d projections", nc, np)
	}
}
