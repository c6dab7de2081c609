package web

// LayoutVM is what every page's frame needs. Handlers fill it; the layout
// renders it.
type LayoutVM struct {
	// Title is the page's own title; the layout appends " · wardload".
	Title string
	// Stylesheet is the versioned URL of wardload.css, so that browsers may
	// cache it for a long time and still see a new version after a release.
	Stylesheet string
	// Icon is the versioned URL of the favicon.
	Icon string
	// Nav lists the navigation links; the current page has Current set.
	Nav []NavItem
	// UserName is the signed-in user, "" when nobody is signed in. The
	// layout shows it beside the navigation.
	UserName string
	// UserRole is the signed-in user's role, shown beside the name.
	UserRole string
}

// NavItem is one link in the header navigation.
type NavItem struct {
	Label   string
	URL     string
	Current bool
}

// HomeVM is the home page: the wards the visitor may see.
type HomeVM struct {
	// SignedOut: the visitor sees ward names only and is asked to sign in.
	SignedOut bool
	Wards     []WardRowVM
	// NewWardURL links to the form that creates a ward; "" for everyone
	// but admins.
	NewWardURL string
}

// WardRowVM is one ward in a list of wards.
type WardRowVM struct {
	Code     string
	Name     string
	TimeZone string
	// TokensURL links to the ward's API tokens; "" for roles that may
	// not manage them.
	TokensURL string
	// CensusURL and ProjectionsURL link to census entry and the shift
	// list; census entry is "" for the staffing office.
	CensusURL      string
	ProjectionsURL string
	// StaffingURL links to the ward's planned staff; "" for the staffing
	// office, which reads only (as CensusURL).
	StaffingURL string
	// SettingsURL links to the ward's settings; "" for charge nurses.
	SettingsURL string
	// ReviewURL links to the ward's weekly tier review; "" for charge
	// nurses.
	ReviewURL string
	// Retired marks a retired ward (only admins see those listed); its
	// census link is then "". EditURL links to the admin's ward form.
	Retired bool
	EditURL string
}

// ErrorVM is the error page. Message is already safe to show (it comes from
// wardload.ErrorMessage); RequestID lets staff quote the failure to an
// administrator, who finds it in the logs.
type ErrorVM struct {
	Status    int
	Title     string
	Message   string
	RequestID string
	// StillSignedIn says the person has not been signed out, when their
	// session could not be read because the database is away.
	StillSignedIn bool
}
