// Package migrations holds the numbered SQL migrations of each database
// dialect, embedded so that the binary carries its own schema.
package migrations

import (
	"embed"
	"io/fs"
)

//go:embed sqlite/*.sql
var sqliteFiles embed.FS

// SQLite is the directory of SQLite migrations, rooted so that goose finds
// the .sql files at ".".
var SQLite fs.FS = mustSub(sqliteFiles, "sqlite")

// mustSub panics only if the embed pattern above and the directory name
// disagree, which is a build mistake, not a runtime condition.
func mustSub(fsys fs.FS, dir string) fs.FS {
	sub, err := fs.Sub(fsys, dir)
	if err != nil {
		panic(err)
	}
	return sub
}
