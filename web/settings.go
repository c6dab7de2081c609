package web

import (
	"slices"
	"strconv"
)

// SettingsVM is a ward's settings page for managers: the staffing
// settings, the ratio floors per shift, the shift patterns and the tiers,
// each in its own form. A form that failed shows the input as typed and
// its messages by field; the others show what is stored.
type SettingsVM struct {
	WardName string
	Notice   string // one-time "Saved: …" after a successful post
	// SavedAt is the anchor of the form the last post saved: Notice is
	// shown next to it. "" shows Notice at the top.
	SavedAt string
	Updated string // when and by whom the settings were last saved; "" if never

	GeneralURL string
	General    GeneralFormVM
	Quartiles  []QuartileOptionVM

	FloorsURL   string
	FloorShifts []FloorShiftVM
	FloorsError string // a message about the floors as a whole

	Shifts      []ShiftFormVM // one edit form per stored pattern
	NewShift    ShiftFormVM
	NewShiftURL string

	Tiers      []TierFormVM // one edit form per stored tier
	NewTier    TierFormVM
	NewTierURL string
}

// GeneralFormVM is the staffing settings form. Values are strings so that
// a rejected entry is shown back exactly as typed.
type GeneralFormVM struct {
	DirectCareFraction string
	CoverLevel         string
	LookbackWeeks      string
	Quartiles          string
	Beds               string
	ChangeoverMinutes  string
	SupportStaff       bool
	Escalation         string
	Errors             map[string]string // by form field name
}

// QuartileOptionVM is one quartile convention with a one-line explanation.
type QuartileOptionVM struct {
	Value       string
	Label       string
	Explanation string
	Default     bool
}

// FloorShiftVM is the ratio floors of one shift pattern: a ward-wide
// floor and optional floors for single tiers. Field names are the form's.
type FloorShiftVM struct {
	ShiftName         string
	WardField         string
	WardValue         string
	ChargeField       string
	ChargeNurseCounts bool
	Tiers             []FloorTierVM
	Errors            map[string]string // by form field name
}

// FloorTierVM is the floor of one tier on one shift.
type FloorTierVM struct {
	Field string
	Code  string
	Label string
	Value string
}

// ShiftFormVM is a shift pattern form (edit or add). ID is "new" for the
// add form; IDs of inputs are made unique with it.
type ShiftFormVM struct {
	ID     string
	URL    string
	Name   string
	Start  string // HH:MM
	Hours  string
	Errors map[string]string
	// Retire retires or reinstates a stored pattern (nil on the add form).
	Retire *RetireVM
	Saved  string // "Saved: …" when the last post saved this form
}

// TierFormVM is a tier form (edit or add). Code can only be set when
// adding: census and observations refer to it. ID is "new" for the add
// form.
type TierFormVM struct {
	New         bool // the add form
	ID          string
	URL         string
	Code        string
	Label       string
	Description string
	Order       string
	Errors      map[string]string
	// Retire retires or reinstates a stored tier (nil on the add form).
	Retire *RetireVM
	Saved  string // "Saved: …" when the last post saved this form
}

// The anchors of the settings forms: a post's action and its 303 carry
// them, so the page reopens at the form that was sent, with its error
// summary or its "Saved" line in view.
const (
	StaffingAnchor = "staffing"
	FloorsAnchor   = "floors"
)

// ShiftAnchor and TierAnchor are the anchors of one shift pattern or tier
// form; id is the stored ID or "new" for the add form.
func ShiftAnchor(id string) string { return "shift-" + id }
func TierAnchor(id string) string  { return "tier-" + id }

// fieldRef is one input of a form: its field name and element id.
type fieldRef struct{ name, id string }

// summaryOf lists errs in the order of fields, each linking to its input;
// a message about a field the form has no input for links to the form
// itself (anchor).
func summaryOf(errs map[string]string, fields []fieldRef, anchor string) []FormErrorVM {
	var out []FormErrorVM
	seen := map[string]bool{}
	for _, f := range fields {
		if msg, ok := errs[f.name]; ok && msg != "" && !seen[f.name] {
			out = append(out, FormErrorVM{Href: "#" + f.id, Message: msg})
			seen[f.name] = true
		}
	}
	var rest []string
	for name, msg := range errs {
		if !seen[name] && msg != "" {
			rest = append(rest, name)
		}
	}
	slices.Sort(rest)
	for _, name := range rest {
		out = append(out, FormErrorVM{Href: "#" + anchor, Message: errs[name]})
	}
	return out
}

// Summary lists the staffing form's messages in the order of its fields.
func (g GeneralFormVM) Summary() []FormErrorVM {
	return summaryOf(g.Errors, []fieldRef{
		{"direct_care_fraction", "s-dcf"}, {"cover_level", "s-cover"}, {"lookback_weeks", "s-lookback"},
		{"beds", "s-beds"}, {"quartiles", "s-q"}, {"changeover_minutes", "s-changeover"},
		{"escalation", "s-escalation"},
	}, StaffingAnchor)
}

// FloorsSummary lists the floors form's messages: the one about the
// floors as a whole, then each field's, shift by shift.
func (p SettingsVM) FloorsSummary() []FormErrorVM {
	var out []FormErrorVM
	if p.FloorsError != "" {
		out = append(out, FormErrorVM{Href: "#" + FloorsAnchor, Message: p.FloorsError})
	}
	var fields []fieldRef
	var errs map[string]string
	for _, s := range p.FloorShifts {
		errs = s.Errors // one map shared by every shift of the form
		fields = append(fields, fieldRef{s.WardField, "f-" + s.WardField})
		for _, t := range s.Tiers {
			fields = append(fields, fieldRef{t.Field, "f-" + t.Field})
		}
	}
	return append(out, summaryOf(errs, fields, FloorsAnchor)...)
}

// Summary lists a shift pattern form's messages.
func (s ShiftFormVM) Summary() []FormErrorVM {
	return summaryOf(s.Errors, []fieldRef{{"name", "sh-" + s.ID + "-name"}, {"start", "sh-" + s.ID + "-start"},
		{"hours", "sh-" + s.ID + "-hours"}}, ShiftAnchor(s.ID))
}

// Summary lists a tier form's messages.
func (t TierFormVM) Summary() []FormErrorVM {
	return summaryOf(t.Errors, []fieldRef{{"code", "t-new-code"}, {"label", "t-" + t.ID + "-label"},
		{"description", "t-" + t.ID + "-description"}, {"order", "t-" + t.ID + "-order"}}, TierAnchor(t.ID))
}

// problemCount is an error summary's heading: how many problems.
func problemCount(n int) string {
	if n == 1 {
		return "1 problem to fix"
	}
	return strconv.Itoa(n) + " problems to fix"
}
