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
// the .sql files at ".". (No helper function here: postgres.go shares this
// package, and a shared helper name would collide.)
var SQLite fs.FS = func() fs.FS {
	sub, err := fs.Sub(sqliteFiles, "sqlite")
	if err != nil {
		// Only reachable if the embed pattern and the directory disagree,
		// which is a build mistake.
		panic(err)
	}
	return sub
}()
