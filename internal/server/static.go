package server

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"io/fs"
	"net/http"
	"time"

	"github.com/go-chi/chi/v5"

	"wardload/internal/wardload"
)

// assets are the embedded static files, read once at start. Each URL carries
// a hash of the content (?v=…), so a versioned URL can be cached for a year
// and a new release still reaches browsers at once.
type assets struct {
	files map[string]asset
}

type asset struct {
	data []byte
	hash string // hex SHA-256 of data
}

func loadAssets(fsys fs.FS) (*assets, error) {
	a := &assets{files: map[string]asset{}}
	err := fs.WalkDir(fsys, ".", func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		data, err := fs.ReadFile(fsys, path)
		if err != nil {
			return err
		}
		sum := sha256.Sum256(data)
		a.files[path] = asset{data: data, hash: hex.EncodeToString(sum[:])}
		return nil
	})
	return a, err
}

// URL returns the versioned URL of the named asset. A name that does not
// exist panics: templates name assets at compile time, so that is a bug.
func (a *assets) URL(name string) string {
	f, ok := a.files[name]
	if !ok {
		panic("server: no static asset " + name)
	}
	return "/static/" + name + "?v=" + f.hash[:12]
}

// handleStatic serves one embedded asset. Only files that exist are
// served; there are no directory listings.
func (s *Server) handleStatic(w http.ResponseWriter, r *http.Request) error {
	name := chi.URLParam(r, "*")
	f, ok := s.assets.files[name]
	if !ok {
		return wardload.Errorf(wardload.ENOTFOUND, "There is no file at this address.")
	}
	h := w.Header()
	h.Set("ETag", `"`+f.hash+`"`)
	if v := r.URL.Query().Get("v"); v != "" && v == f.hash[:12] {
		h.Set("Cache-Control", "public, max-age=31536000, immutable")
	} else {
		// Unversioned or stale URL: cache, but check the ETag each time.
		h.Set("Cache-Control", "no-cache")
	}
	// ServeContent answers If-None-Match from the ETag above, sets the
	// content type from the extension, and handles HEAD and ranges.
	http.ServeContent(w, r, name, time.Time{}, bytes.NewReader(f.data))
	return nil
}
