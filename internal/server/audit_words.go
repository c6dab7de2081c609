// The audit log in words: what each action is called, what each recorded
// field is called, and how a stored before/after record reads as a list
// of changes. The log keeps JSON so that it outlives the code; people
// read it through this file and never see the JSON itself.

package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode"

	"wardload/internal/wardload"
	"wardload/web"
)

// auditAction is an action's plain name, in the order the filter lists
// them.
type auditAction struct{ code, name string }

var auditActions = []auditAction{
	{wardload.ActionSettingsSave, "Changed ward settings"},
	{wardload.ActionShiftCreate, "Added a shift pattern"},
	{wardload.ActionShiftUpdate, "Changed a shift pattern"},
	{wardload.ActionTierCreate, "Added an acuity tier"},
	{wardload.ActionTierUpdate, "Changed an acuity tier"},
	{wardload.ActionCensusCreate, "Entered a census"},
	{wardload.ActionProjectionCreate, "Made a staffing estimate"},
	{wardload.ActionShiftRecordCreate, "Entered an end-of-shift record"},
	{wardload.ActionObservationImport, "Imported observations"},
	{wardload.ActionObservationExclude, "Excluded an observation"},
	{wardload.ActionObservationRestore, "Restored an observation"},
	{wardload.ActionWardCreate, "Created a ward"},
	{wardload.ActionWardUpdate, "Changed a ward"},
	{wardload.ActionWardRetire, "Retired a ward"},
	{wardload.ActionWardReinstate, "Reinstated a ward"},
	{wardload.ActionShiftRetire, "Retired a shift pattern"},
	{wardload.ActionShiftReinstate, "Reinstated a shift pattern"},
	{wardload.ActionTierRetire, "Retired an acuity tier"},
	{wardload.ActionTierReinstate, "Reinstated an acuity tier"},
	{wardload.ActionStaffingPlan, "Planned staff for a shift"},
	{wardload.ActionUserCreate, "Created a user"},
	{wardload.ActionUserUpdate, "Changed a user"},
	{wardload.ActionTokenCreate, "Created an API token"},
	{wardload.ActionTokenRevoke, "Revoked an API token"},
	{wardload.ActionSignInOK, "Signed in"},
	{wardload.ActionSignInFail, "Failed sign-ins"},
	{wardload.ActionSignOut, "Signed out"},
	{wardload.ActionAPIRefused, "Refused a revoked API token"},
	{wardload.ActionAuditPurge, "Purged old sign-in records"},
}

// actionName is the plain name of an action. An action this table does
// not know yet (added by a later change) reads as its words, "ward
// retire" → "Ward retire", never as nothing.
func actionName(code string) string {
	for _, a := range auditActions {
		if a.code == code {
			return a.name
		}
	}
	return sentence(strings.NewReplacer(".", " ", "_", " ").Replace(code))
}

// auditFields names the recorded fields, by their key in the JSON (the
// Go field name, or the json tag of the sign-in and purge records).
var auditFields = map[string]string{
	"Code": "Code", "Name": "Name", "TimeZone": "Time zone", "FactorNames": "Recorded factors",
	"Label": "Label", "Description": "Description", "DisplayOrder": "Order on forms",
	"StartMinute": "Start", "NominalHours": "Length (hours)",
	"Date": "Date", "ShiftID": "Shift", "TierID": "Tier", "WindowHours": "Observation window (hours)",
	"CareMinutes": "Care minutes", "Factors": "Factors", "BatchID": "Import batch",
	"Excluded": "Excluded from the model", "ExcludedReason": "Reason for exclusion",
	"Revision": "Revision", "Counts": "Patients by tier", "Staff": "Staff on duty", "Nurses": "Nurses", "Support": "Support staff",
	"Worked": "Staff who worked", "Admissions": "Admissions", "Discharges": "Discharges",
	"CareLeftUndone": "Care left undone", "CareCategory": "Care left undone (kind)",
	"DirectCareFraction": "Direct-care fraction", "CoverLevel": "Cover level", "LookbackWeeks": "Lookback (weeks)",
	"Quartiles": "Quartile convention", "Beds": "Beds", "Floors": "Ratio floors",
	"ChangeoverMinutes": "Change-over window (minutes)", "SupportStaff": "Ward has support staff",
	"Escalation": "Escalation text", "Role": "Role", "Disabled": "Disabled", "WardIDs": "Wards",
	"MustChangePassword": "Must choose a new password", "PasswordChanges": "Password changes",
	"RevokedAt": "Revoked", "Rows": "Rows",
	"CensusRevision": "Census revision", "ShiftName": "Shift", "Start": "Shift starts", "End": "Shift ends",
	"ShiftHours": "Shift length (hours)", "TotalPatients": "Patients", "ExpectedNurseHours": "Expected nurse-hours",
	"CoverNurseHours": "Nurse-hours at the cover level", "BandLowNurseHours": "Band, low (nurse-hours)",
	"BandHighNurseHours": "Band, high (nurse-hours)", "NursesCover": "Nurses at the cover level",
	"Floor": "Nurses the ratio floor asks for", "Recommended": "Recommended nurses", "DecidedBy": "Decided by",
	"MethodVersion": "Method version", "Seed": "Simulation seed", "Draws": "Simulation draws",
	// Sign-in and purge records.
	"address": "Address", "count": "Attempts", "first": "First attempt", "last": "Last attempt",
	"reasons": "Reasons", "accounts": "Accounts", "more_accounts": "More accounts", "unknown_names": "Unknown names",
	"unknown_name_fingerprint": "Unknown-name fingerprint", "known_device": "From a known device",
	"window": "Counted over", "before": "Older than", "deleted": "Records deleted", "actions": "Kinds of record",
	"reason": "Reason",
}

// auditHidden are fields the entry shows elsewhere (ward, who, when) or
// that mean nothing to a reader (row IDs, bookkeeping). Hash fields are
// never recorded (wardload.NewAudit); they are listed so that an old or
// hand-made row holding one still never shows it.
var auditHidden = map[string]bool{
	"ID": true, "WardID": true, "CensusID": true, "UpdatedAt": true, "UpdatedBy": true,
	"EnteredAt": true, "EnteredBy": true, "CreatedAt": true, "CreatedBy": true,
	"ExcludedBy": true, "ExcludedAt": true, "LastUsedAt": true,
	"Hash": true, "PasswordHash": true, "Input": true, "Result": true,
}

// fieldName is a field's plain name; an unknown field reads as its words.
func fieldName(key string) string {
	if n, ok := auditFields[key]; ok {
		return n
	}
	var b strings.Builder
	for i, r := range key {
		if i > 0 && unicode.IsUpper(r) {
			b.WriteByte(' ')
		}
		b.WriteRune(unicode.ToLower(r))
	}
	return sentence(strings.ReplaceAll(b.String(), "_", " "))
}

func sentence(s string) string {
	s = strings.TrimSpace(s)
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// auditNames resolves the IDs a record holds to what people call them:
// ward codes, shift pattern names and tier codes.
type auditNames struct {
	wards  map[int64]*wardload.Ward
	shifts map[int64]string
	tiers  map[int64]string
}

// auditWords turns one entry's records into words, times in loc.
type auditWords struct {
	names auditNames
	loc   *time.Location
}

// changes lists the entry's change field by field: for a new thing every
// field it was given, for a change only the fields that differ, for a
// removal every field it had. Records that cannot be read yield one line
// saying so, never the raw text.
func (w auditWords) changes(before, after string) []web.AuditChangeVM {
	b, okB := decodeRecord(before)
	a, okA := decodeRecord(after)
	if !okB || !okA {
		return []web.AuditChangeVM{{Field: "Record", After: "cannot be shown"}}
	}
	var keys []string
	for k := range b {
		keys = append(keys, k)
	}
	for k := range a {
		if _, ok := b[k]; !ok {
			keys = append(keys, k)
		}
	}
	slices.SortFunc(keys, func(x, y string) int {
		if d := fieldOrder(x) - fieldOrder(y); d != 0 {
			return d
		}
		return strings.Compare(fieldName(x), fieldName(y))
	})
	var out []web.AuditChangeVM
	for _, k := range keys {
		if auditHidden[k] {
			continue
		}
		if _, named := a["ShiftName"]; k == "ShiftID" && named {
			continue // a projection names its shift as it was then
		}
		bv, inB := b[k]
		av, inA := a[k]
		bs, as := "", ""
		if inB && before != "" {
			bs = w.value(k, bv)
		}
		if inA && after != "" {
			as = w.value(k, av)
		}
		if before != "" && after != "" && bs == as {
			continue
		}
		out = append(out, web.AuditChangeVM{Field: fieldName(k), Before: bs, After: as})
	}
	return out
}

// fieldOrder puts what names the thing (codes, names, the dated shift)
// before the rest, which follows alphabetically by plain name.
func fieldOrder(k string) int {
	switch k {
	case "Code", "Name", "Label", "ShiftName", "Date", "ShiftID", "TierID":
		return 0
	}
	return 1
}

// decodeRecord reads a stored record; "" is an empty record.
func decodeRecord(s string) (map[string]any, bool) {
	if s == "" {
		return map[string]any{}, true
	}
	d := json.NewDecoder(bytes.NewReader([]byte(s)))
	d.UseNumber()
	var m map[string]any
	if err := d.Decode(&m); err != nil {
		return nil, false
	}
	return m, true
}

// value writes one field's value in words.
func (w auditWords) value(key string, v any) string {
	switch key {
	case "StartMinute":
		if n, ok := number(v); ok && n >= 0 && n < 24*60 {
			return fmt.Sprintf("%02d:%02d", int(n)/60, int(n)%60)
		}
	case "ShiftID":
		if n, ok := number(v); ok {
			return w.names.shift(int64(n))
		}
	case "TierID":
		if n, ok := number(v); ok {
			if n == 0 {
				return "all patients"
			}
			return w.names.tier(int64(n))
		}
	case "WardIDs":
		if list, ok := v.([]any); ok {
			var codes []string
			for _, x := range list {
				if n, ok := number(x); ok {
					codes = append(codes, w.names.ward(int64(n)))
				}
			}
			return listOr(codes, "none")
		}
	case "Quartiles":
		if s, ok := v.(string); ok {
			for _, q := range quartileOptions {
				if q.Value == s {
					return q.Label
				}
			}
		}
	case "Counts":
		if list, ok := v.([]any); ok {
			var parts []string
			for _, x := range list {
				m, _ := x.(map[string]any)
				t, _ := number(m["TierID"])
				p, _ := number(m["Patients"])
				parts = append(parts, fmt.Sprintf("%s %g", w.names.tier(int64(t)), p))
			}
			return listOr(parts, "none")
		}
	case "Floors":
		if list, ok := v.([]any); ok {
			var parts []string
			for _, x := range list {
				m, _ := x.(map[string]any)
				sh, _ := number(m["ShiftID"])
				t, _ := number(m["TierID"])
				ppn, _ := number(m["PatientsPerNurse"])
				who := "all patients"
				if t != 0 {
					who = w.names.tier(int64(t)) + " patients"
				}
				s := fmt.Sprintf("%s: at most %g %s per nurse", w.names.shift(int64(sh)), ppn, who)
				if c, _ := m["ChargeNurseCounts"].(bool); c {
					s += ", nurse in charge counts"
				}
				parts = append(parts, s)
			}
			return strings.Join(parts, "; ")
		}
	}
	return w.plain(v)
}

// plain writes any decoded JSON value in words.
func (w auditWords) plain(v any) string {
	switch x := v.(type) {
	case nil:
		return "none"
	case bool:
		if x {
			return "yes"
		}
		return "no"
	case json.Number:
		return numberWords(x)
	case string:
		if x == "" {
			return "(empty)"
		}
		if t, err := time.Parse(time.RFC3339Nano, x); err == nil {
			if t.IsZero() {
				return "never"
			}
			return t.In(w.loc).Format("2006-01-02 15:04")
		}
		return x
	case []any:
		var parts []string
		for _, e := range x {
			parts = append(parts, w.plain(e))
		}
		return listOr(parts, "none")
	case map[string]any:
		if y, ok := x["Year"]; ok { // a wardload.Date
			yy, _ := number(y)
			mm, _ := number(x["Month"])
			dd, _ := number(x["Day"])
			return fmt.Sprintf("%04d-%02d-%02d", int(yy), int(mm), int(dd))
		}
		keys := make([]string, 0, len(x))
		for k := range x {
			if !auditHidden[k] {
				keys = append(keys, k)
			}
		}
		slices.Sort(keys)
		var parts []string
		for _, k := range keys {
			parts = append(parts, strings.ToLower(fieldName(k))+" "+w.value(k, x[k]))
		}
		return listOr(parts, "none")
	}
	return "?"
}

// numberWords writes a recorded number: whole numbers (seeds, counts) as
// stored, others to at most three decimals, which is finer than anything
// the pages show.
func numberWords(n json.Number) string {
	if !strings.ContainsAny(n.String(), ".eE") {
		return n.String()
	}
	f, err := n.Float64()
	if err != nil {
		return n.String()
	}
	return strconv.FormatFloat(math.Round(f*1000)/1000, 'f', -1, 64)
}

func number(v any) (float64, bool) {
	n, ok := v.(json.Number)
	if !ok {
		return 0, false
	}
	f, err := n.Float64()
	return f, err == nil
}

func listOr(parts []string, none string) string {
	if len(parts) == 0 {
		return none
	}
	return strings.Join(parts, ", ")
}

func (n auditNames) ward(id int64) string {
	if w, ok := n.wards[id]; ok {
		return w.Code
	}
	return "ward " + strconv.FormatInt(id, 10)
}

func (n auditNames) shift(id int64) string {
	if s, ok := n.shifts[id]; ok {
		return s
	}
	return "shift pattern " + strconv.FormatInt(id, 10)
}

func (n auditNames) tier(id int64) string {
	if s, ok := n.tiers[id]; ok {
		return s
	}
	return "tier " + strconv.FormatInt(id, 10)
}

// subject names the thing an entry is about, from its record: a code or
// name, "" when the record has neither.
func (w auditWords) subject(e *wardload.AuditEntry) string {
	rec := e.After
	if rec == "" {
		rec = e.Before
	}
	m, ok := decodeRecord(rec)
	if !ok {
		return ""
	}
	for _, k := range []string{"Code", "Name"} {
		if v, ok := m[k].(string); ok && v != "" {
			return v
		}
	}
	if d, ok := m["Date"]; ok {
		s := w.plain(d)
		if sh, ok := number(m["ShiftID"]); ok {
			s += ", " + w.names.shift(int64(sh))
		}
		return s
	}
	return ""
}

// auditLink is the page of the thing an entry changed, and what to call
// the link; "" when there is none the viewer can open (a ward-less entry
// for a manager, a purge).
func auditLink(e *wardload.AuditEntry, ward *wardload.Ward, admin bool) (string, string) {
	switch e.Action {
	case wardload.ActionUserCreate, wardload.ActionUserUpdate, wardload.ActionSignInOK, wardload.ActionSignInFail, wardload.ActionSignOut:
		if admin {
			return "/admin/users", "User administration"
		}
		return "", ""
	}
	if ward == nil {
		return "", ""
	}
	id := strconv.FormatInt(e.EntityID, 10)
	switch e.Entity {
	case "settings", "ward":
		return settingsURL(ward) + "#" + web.StaffingAnchor, "Ward settings"
	case "tier":
		return settingsURL(ward) + "#" + web.TierAnchor(id), "The tier in ward settings"
	case "shift":
		return settingsURL(ward) + "#" + web.ShiftAnchor(id), "The shift pattern in ward settings"
	case "census":
		return projectionsURL(ward), "Shift list"
	case "projection":
		return projectionURL(ward, e.EntityID), "The staffing estimate"
	case "observation", "observation_batch":
		return reviewURL(ward), "Weekly review"
	case "token":
		return tokensURL(ward), "API tokens"
	case "planned_staff":
		return staffingURL(ward, ""), "Planned staff"
	case "shift_record":
		if m, ok := decodeRecord(e.After); ok {
			var d wardload.Date
			if dm, ok := m["Date"].(map[string]any); ok {
				y, _ := number(dm["Year"])
				mo, _ := number(dm["Month"])
				dd, _ := number(dm["Day"])
				d = wardload.Date{Year: int(y), Month: time.Month(mo), Day: int(dd)}
			}
			if sh, ok := number(m["ShiftID"]); ok && d.Year > 0 {
				return shiftRecordURL(ward, d, int64(sh)), "The end-of-shift record"
			}
		}
		return projectionsURL(ward), "Shift list"
	}
	return "", ""
}

// namesShiftsOrTiers are the entities whose records refer to a shift
// pattern or tier by ID (a tier or shift record names itself).
var namesShiftsOrTiers = map[string]bool{"settings": true, "census": true, "projection": true, "planned_staff": true,
	"observation": true, "shift_record": true}

// loadAuditNames reads the shift pattern names and tier codes of the
// wards whose entries on the page refer to them: two small reads per
// ward, at most a page's worth of wards.
func (s *Server) loadAuditNames(ctx context.Context, wards map[int64]*wardload.Ward, es []*wardload.AuditEntry) (auditNames, error) {
	n := auditNames{wards: wards, shifts: map[int64]string{}, tiers: map[int64]string{}}
	seen := map[int64]bool{}
	for _, e := range es {
		w, ok := wards[e.WardID]
		if !ok || seen[e.WardID] || !namesShiftsOrTiers[e.Entity] {
			continue
		}
		seen[e.WardID] = true
		shifts, tiers, err := s.shiftsAndTiers(ctx, w, "audit")
		if err != nil {
			return n, err
		}
		for _, p := range shifts {
			n.shifts[p.ID] = p.Name
		}
		for _, t := range tiers {
			n.tiers[t.ID] = t.Code
		}
	}
	return n, nil
}

// zoneOf is the time zone an entry's time is shown in: its ward's, or
// UTC for an entry of no ward (users, sign-ins), named either way.
func zoneOf(ward *wardload.Ward) (*time.Location, string) {
	if ward != nil {
		if loc, err := ward.Location(); err == nil {
			return loc, ward.TimeZone
		}
	}
	return time.UTC, "UTC"
}
