package web

// WardNewVM is the admin's "New ward" page: the form, as typed when it was
// refused, and the time zones offered as suggestions.
type WardNewVM struct {
	ActionURL string
	Code      string
	Name      string
	TimeZone  string
	Beds      string
	// Zones are IANA names suggested for the time zone field; any other
	// name the server can load is accepted too.
	Zones []string
	// Errors are the messages by form field; Summary lists them, in the
	// order of the form, each linking to its input.
	Errors  map[string]string
	Summary []FormErrorVM
}

// WardSetupVM is the short checklist at the top of the settings page of a
// ward that cannot take a census yet. Nil: the ward is set up.
type WardSetupVM struct {
	HasShifts bool
	HasTiers  bool
	CensusURL string
}
