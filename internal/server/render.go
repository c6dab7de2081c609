package server

import (
	"bytes"
	"encoding/json"
	"fmt"
	"net/http"

	"github.com/a-h/templ"

	"wardload/web"
)

// render writes c with status, rendering into a buffer first so that a
// failing component yields an error page instead of half a page.
func (s *Server) render(w http.ResponseWriter, r *http.Request, status int, c templ.Component) error {
	var buf bytes.Buffer
	if err := c.Render(r.Context(), &buf); err != nil {
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

// nav is the header navigation. Sign-in and role-dependent links join it
// with the accounts work.
var nav = []web.NavItem{
	{Label: "Wards", URL: "/"},
}

// layout returns the frame of a page titled title.
func (s *Server) layout(r *http.Request, title string) web.LayoutVM {
	items := make([]web.NavItem, len(nav))
	for i, n := range nav {
		n.Current = r.URL.Path == n.URL
		items[i] = n
	}
	return web.LayoutVM{
		Title:      title,
		Stylesheet: s.assets.URL("wardload.css"),
		Icon:       s.assets.URL("favicon.svg"),
		Nav:        items,
	}
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
