// Package web holds the HTML of wardload: templ components, the view-model
// structs they take, and the static assets. Components receive view models
// only; they never read the database or the clock, so a page renders the
// same way in a test as in production.
package web

import (
	"embed"
	"io/fs"
)

//go:embed static
var staticFiles embed.FS

// Static is the static asset tree (stylesheet, icon), rooted so that
// "wardload.css" names web/static/wardload.css.
var Static fs.FS = func() fs.FS {
	sub, err := fs.Sub(staticFiles, "static")
	if err != nil {
		// Only reachable if the embed pattern and the directory disagree,
		// which is a build mistake.
		panic(err)
	}
	return sub
}()
