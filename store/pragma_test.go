package store

import (
	"context"
	"testing"
)

// TestPragmas checks that both pools run with the settings crash safety
// and the record's integrity rely on.
func TestPragmas(t *testing.T) {
	db := newDB(t)
	ctx := context.Background()
	want := []struct {
		pragma string
		value  string
	}{
		{"journal_mode", "wal"},
		{"foreign_keys", "1"},
		{"synchronous", "2"}, // FULL
		{"busy_timeout", "5000"},
	}
	for name, pool := range map[string]querier{"writer": db.w, "reader": db.r} {
		for _, w := range want {
			var got string
			if err := pool.QueryRowContext(ctx, "PRAGMA "+w.pragma).Scan(&got); err != nil {
				t.Fatal(err)
			}
			if got != w.value {
				t.Errorf("%s: PRAGMA %s = %s, want %s", name, w.pragma, got, w.value)
			}
		}
	}
	if _, err := db.r.ExecContext(ctx, `INSERT INTO workshops (title, created) VALUES ('x', 'x')`); err == nil {
		t.Error("the reader pool accepted a write")
	}
}
