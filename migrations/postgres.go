package migrations

import "embed"

// Postgres holds the PostgreSQL migrations under "postgres/", in goose's
// annotated SQL format; use fs.Sub(Postgres, "postgres") as goose's file
// system. Table and column names mirror sqlite/ one for one.
//
//go:embed postgres/*.sql
var Postgres embed.FS
