// Package migrations holds Parley's SQLite schema as numbered SQL files,
// NNNN_name.sql, embedded in the binary. store applies each file once,
// in order, inside a transaction, and records it in schema_migrations.
// An applied file is never edited; a change is a new file.
package migrations

import "embed"

// FS holds the numbered migration files.
//
//go:embed *.sql
var FS embed.FS
