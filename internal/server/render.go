package server

import (
	"bytes"
	"encoding/json"
	"fmt"
	"net/http"
	"slices"
	"sync"

	"github.com/a-h/templ"

	"wardload/internal/wardload"
	"wardload/web"
)

// render writes c with status, rendering into a buffer first so that a
// failing component yields an error page instead of half a page.
func (s *Server) render(w http.ResponseWriter, r *http.Request, status int, c templ.Component) error {
	buf := renderBuffers.Get().(*bytes.Buffer)
	defer func() {
		if buf.Cap() <= maxPooledBuffer { // let an unusually large page go
			buf.Reset()
			renderBuffers.Put(buf)
		}
	}()
	if err := c.Render(r.Context(), buf); err != nil {
		return fmt.Errorf("render %s: %w", r.URL.Path, err)
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	// Pages show ward data; keep them out of shared caches and the
	// back-button cache of a shared ward computer.
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	_, err := w.Write(buf.Bytes())
	return err
}

// renderBuffers recycles page buffers: pages are rendered whole before a
// byte is sent, and growing a fresh buffer to a page's size on every
// request was a measurable share of a page view.
var renderBuffers = sync.Pool{New: func() any { return bytes.NewBuffer(make([]byte, 0, 64<<10)) }}

const maxPooledBuffer = 1 << 20

// navItem is a header link and the roles that see it.
type navItem struct {
	web.NavItem
	roles []string
}

// nav is the header navigation; each signed-in user sees the links their
// role may use (the route table still decides access).
var nav = []navItem{
	{web.NavItem{Label: "Wards", URL: "/"}, allRoles},
	{web.NavItem{Label: "Board", URL: "/board"}, allRoles},
	{web.NavItem{Label: "API tokens", URL: "/tokens"}, readers},
	{web.NavItem{Label: "Audit log", URL: "/audit"}, []string{wardload.RoleManager, wardload.RoleAdmin}},
	{web.NavItem{Label: "Users", URL: "/admin/users"}, []string{wardload.RoleAdmin}},
}

// layout returns the frame of a page titled title.
func (s *Server) layout(r *http.Request, title string) web.LayoutVM {
	vm := web.LayoutVM{
		Title:      title,
		Stylesheet: s.stylesheetURL,
		Icon:       s.iconURL,
	}
	u := principalFrom(r.Context()).User
	if u == nil {
		vm.Nav = []web.NavItem{{Label: "Sign in", URL: "/signin", Current: r.URL.Path == "/signin"}}
		return vm
	}
	vm.UserName, vm.UserRole = u.Name, u.Role
	for _, n := range nav {
		if slices.Contains(n.roles, u.Role) {
			n.Current = r.URL.Path == n.URL
			vm.Nav = append(vm.Nav, n.NavItem)
		}
	}
	return vm
}

// writeJSON writes v as the JSON body of an API response. It encodes into a
// buffer first, so an encoding failure becomes an error for the adapter
// instead of a truncated body.
func writeJSON(w http.ResponseWriter, status int, v any) error {
	b, err := json.Marshal(v)
	if err != nil {
		return fmt.Errorf("encode JSON: %w", err)
	}
	w.Header().Set("Content-Type", "application/json; charset=utf-8")
	w.Header().Set("Cache-Control", "no-store")
	w.WriteHeader(status)
	_, err = w.Write(append(b, '\n'))
	return err
}

// seeOther ends a successful POST with a 303 to url, so reloading the page
// that follows does not submit the form again.
func seeOther(w http.ResponseWriter, r *http.Request, url string) error {
	http.Redirect(w, r, url, http.StatusSeeOther)
	return nil
}
