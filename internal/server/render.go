package server

import (
	"bytes"
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
