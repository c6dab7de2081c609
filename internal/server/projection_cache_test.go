package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// TestProjectionPageCache: a cached page still refuses another ward,
// shows a ward renamed or moved to another zone after it was cached, lists
// a revision saved after it was cached, and gives each role its own links.
func TestProjectionPageCache(t *testing.T) {
	f := newCensusFixture(t)
	first := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 4, 6, 3, 0)
	path := fmt.Sprintf("/wards/w-a/projections/%d", first.ID)
	get := func(p, path string) (int, string) {
		t.Helper()
		res, body := f.do(t, f.as(t, p, httptest.NewRequest("GET", path, nil)))
		return res.StatusCode, body
	}
	code, miss := get(pNurseA, path)
	if code != 200 {
		t.Fatalf("first view = %d", code)
	}
	if n := f.s.projections.Len(); n != 1 {
		t.Fatalf("cached pages = %d, want 1", n)
	}
	if _, hit := get(pNurseA, path); hit != miss {
		t.Error("the page from the cache differs from the page built from the store")
	}

	// Ward B's path with ward A's cached projection is still not found.
	if code, _ := get(pAdmin, fmt.Sprintf("/wards/w-b/projections/%d", first.ID)); code != 404 {
		t.Errorf("ward A's cached projection via ward B = %d, want 404", code)
	}

	// The link to set a floor (shown when the shift has none) is per
	// user, not cached with the page.
	noFloor := f.mustProject(t, pNurseA, f.a, "2026-03-01", f.a.night, 5, 5, 2, 0)
	noFloorPath := fmt.Sprintf("/wards/w-a/projections/%d", noFloor.ID)
	_, nurse := get(pNurseA, noFloorPath)
	_, manager := get(pManagerA, noFloorPath)
	if strings.Contains(nurse, "/wards/w-a/settings") || !strings.Contains(manager, "/wards/w-a/settings") {
		t.Errorf("settings link: nurse has %v, manager has %v; want false, true",
			strings.Contains(nurse, "/wards/w-a/settings"), strings.Contains(manager, "/wards/w-a/settings"))
	}

	// A correction saved after the page was cached shows at once.
	second := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 5, 6, 3, 0)
	_, body := get(pNurseA, path)
	if got := byTestID(t, body, "revision-item"); len(got) != 2 {
		t.Errorf("revisions after a correction = %q, want 2", got)
	}
	if len(byTestID(t, body, "newer-revision")) != 1 || !strings.Contains(body, fmt.Sprintf("/wards/w-a/projections/%d", second.ID)) {
		t.Error("the cached page does not link to the newer revision")
	}

	// A ward renamed and moved to another zone (as another process
	// could) shows on the next view.
	name, tz := "Ward A renamed", "America/New_York"
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	if _, err := f.st.UpdateWard(ctx, f.wardA.ID, wardload.WardUpdate{Name: &name, TimeZone: &tz}); err != nil {
		t.Fatal(err)
	}
	_, body = get(pNurseA, path)
	if !strings.Contains(body, name) || !strings.Contains(body, "(America/New_York)") || strings.Contains(body, "Europe/Dublin") {
		t.Errorf("page after rename does not show the new name and zone only")
	}
}

// The sentence under the headcount says the cover level as a share of
// shifts, without float noise (100 × 0.57 is 56.99999999999999 in float64).
func TestDecidedTextNamesCoverAsShareOfShifts(t *testing.T) {
	floor := 4
	for _, tc := range []struct {
		p    wardload.Projection
		want string
	}{
		{wardload.Projection{CoverLevel: 0.9}, "Set by the workload on 90% of such shifts; no ratio floor is configured for this shift."},
		{wardload.Projection{CoverLevel: 0.925, Floor: &floor, DecidedBy: stats.DecidedByFloor, NursesCover: 3}, "Set by the ratio floor of 4 nurses; the workload on 92.5% of such shifts needs 3."},
		{wardload.Projection{CoverLevel: 0.8, Floor: &floor, DecidedBy: stats.DecidedByCover}, "Set by the workload on 80% of such shifts; the ratio floor asks for 4."},
		{wardload.Projection{CoverLevel: 0.57}, "Set by the workload on 57% of such shifts; no ratio floor is configured for this shift."},
	} {
		if got := decidedText(&tc.p); got != tc.want {
			t.Errorf("got %q\nwant %q", got, tc.want)
		}
	}
	// The page's cover percentage says the level the same way.
	for level, want := range map[float64]string{0.57: "57%", 0.9: "90%", 0.925: "92.5%", 0.29: "29%"} {
		if got := coverPercent(level); got != want {
			t.Errorf("coverPercent(%v) = %q, want %q", level, got, want)
		}
	}
}
