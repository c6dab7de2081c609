package web

// SignInVM is the sign-in form. Error is one plain message that never says
// which of name and password was wrong.
type SignInVM struct {
	Name  string // re-shown after a failure; the password never is
	Next  string // local path to go to after signing in
	Error string
}

// TokensVM is a ward's API token page. NewSecret is set only on the one
// page view right after a token was created.
type TokensVM struct {
	WardName   string
	CreateURL  string
	Tokens     []TokenRowVM
	NewName    string
	NewSecret  string
	SecretLost bool   // a secret was made but can no longer be shown
	Notice     string // e.g. "Token revoked."
	FormName   string // the name typed into the create form
	Error      string // why the create form failed
}

// TokenRowVM is one API token in the list.
type TokenRowVM struct {
	Name      string
	Wards     string // comma-separated ward codes
	CreatedAt string
	LastUsed  string // "never" when unused
	Revoked   string // "" while active
	RevokeURL string
}

// AuditVM is the audit log page: filters, one page of entries, paging.
type AuditVM struct {
	Ward, Action, Entity, User, From, To string // the filters as typed
	WardCodes                            []string
	Actions                              []AuditActionVM // the action filter's choices
	Error                                string
	Rows                                 []AuditRowVM
	Total                                int
	PageText                             string // e.g. "Entries 1–50 of 120"
	PrevURL, NextURL                     string
}

// AuditActionVM is one choice of the action filter: a plain name for an
// action code.
type AuditActionVM struct {
	Value, Name string
	Selected    bool
}

// AuditRowVM is one audit entry in words. There is deliberately no field
// for the stored record: the page shows Changes, never JSON.
type AuditRowVM struct {
	At         string // in Zone, to the second
	Zone       string // the IANA name of the ward's zone, or "UTC"
	Actor      string
	What       string // e.g. "Changed ward settings"
	ActionCode string // e.g. "settings.save", for the filter
	Subject    string // the thing's code or name, or its date and shift; may be ""
	Ward       string // ward code, "" for none
	Changes    []AuditChangeVM
	LinkURL    string // the page of the thing changed; "" for none
	LinkText   string
}

// AuditChangeVM is one field of a change. Before is "" for a new thing
// and After "" for one removed.
type AuditChangeVM struct {
	Field, Before, After string
}

// UsersVM is the user administration page.
type UsersVM struct {
	Users  []UserRowVM
	Wards  []WardOptionVM // every ward, for the create form
	Roles  []string
	Form   UserFormVM
	Notice string
}

// UserFormVM is the create form as typed, with its messages by field.
type UserFormVM struct {
	Name   string
	Role   string
	Errors map[string]string
}

// UserRowVM is one user with an edit form.
type UserRowVM struct {
	ID        string
	Name      string
	Role      string
	Disabled  bool
	Wards     []WardOptionVM
	CreatedAt string
	UpdateURL string
	Error     string
}

// WardOptionVM is a ward checkbox.
type WardOptionVM struct {
	ID      string
	Code    string
	Checked bool
}

// RoleLabel is a role as people say it ("Charge nurse"), for display; forms
// still send the stored value (charge_nurse). An unknown role is shown as
// stored rather than hidden.
func RoleLabel(role string) string {
	switch role {
	case "charge_nurse":
		return "Charge nurse"
	case "manager":
		return "Manager"
	case "admin":
		return "Admin"
	case "staffing_office":
		return "Staffing office"
	}
	return role
}

// PasswordVM is the page where signed-in users choose a new password.
// The passwords typed are never shown again.
type PasswordVM struct {
	UserName  string
	MinLength int    // characters, per NIST SP 800-63B-4
	MaxLength int    // characters
	Required  bool   // an administrator's reset: no other page until changed
	Notice    string // e.g. after a refused page while Required
	Errors    map[string]string
}
