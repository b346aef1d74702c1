package main

import (
	"testing"

	"github.com/parley-elicit/parley/internal/testbin"
)

// The tests that run the real binary share one build (internal/testbin).
func TestMain(m *testing.M) { testbin.Main(m) }

// parleyBinary is this module's parley binary, built once per test run.
func parleyBinary(t testing.TB) string { return testbin.Parley(t, "../..") }
