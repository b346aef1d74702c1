// Package record is a workshop's export record: built from its stored
// snapshot, written as JSON or CSV, and parsed and validated strictly when
// a record is imported.
//
// The JSON keys and the CSV header are a public contract that users'
// scripts read (testdata/export.schema.json); they never change. It does
// no I/O beyond the readers and writers it is given.
package record
