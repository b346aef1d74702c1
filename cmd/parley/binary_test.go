package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"sync"
	"testing"
)

// The tests that run the real binary share one build, made on first use
// (so `go test -short`, which skips them, builds nothing) and removed
// when the package's tests end.
var (
	binOnce sync.Once
	binDir  string
	binPath string
	binErr  error
)

func TestMain(m *testing.M) {
	code := m.Run()
	if binDir != "" {
		os.RemoveAll(binDir)
	}
	os.Exit(code)
}

// parleyBinary builds this package into a temporary folder once per test
// run and returns the binary's path.
func parleyBinary(t testing.TB) string {
	t.Helper()
	binOnce.Do(func() {
		if binDir, binErr = os.MkdirTemp("", "parley-cmd-test-"); binErr != nil {
			return
		}
		binPath = filepath.Join(binDir, "parley")
		if out, err := exec.Command("go", "build", "-o", binPath, ".").CombinedOutput(); err != nil {
			binErr = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binErr != nil {
		t.Fatal(binErr)
	}
	return binPath
}
