// Package testbin builds the parley binary once per test process for the
// tests that run it as a child, and removes it when the tests end.
package testbin

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"sync"
	"testing"
)

var (
	once sync.Once
	dir  string
	bin  string
	err  error
)

// Parley builds cmd/parley from the module rooted at root (the folder
// holding go.mod) on first use, so that `go test -short`, which skips
// the tests that need it, builds nothing, and returns the binary's path.
// The build is without -race: the child's speed matters more than its
// own race checks, which the unit tests cover.
func Parley(t testing.TB, root string) string {
	t.Helper()
	once.Do(func() {
		var abs string
		if abs, err = filepath.Abs(root); err != nil {
			return
		}
		if _, err = os.Stat(filepath.Join(abs, "go.mod")); err != nil {
			err = fmt.Errorf("testbin: no module at %s: %w", abs, err)
			return
		}
		if dir, err = os.MkdirTemp("", "parley-test-bin-"); err != nil {
			return
		}
		bin = filepath.Join(dir, "parley")
		cmd := exec.Command("go", "build", "-o", bin, "./cmd/parley")
		cmd.Dir = abs
		if out, e := cmd.CombinedOutput(); e != nil {
			err = fmt.Errorf("testbin: go build ./cmd/parley: %v\n%s", e, out)
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	return bin
}

// Main runs the package's tests and then removes the binary; call it
// from TestMain.
func Main(m *testing.M) {
	code := m.Run()
	if dir != "" {
		os.RemoveAll(dir)
	}
	os.Exit(code)
}
