//go:build !race

package systemtest

// raceOn reports whether the race detector is on; the load test runs a
// reduced workshop then, to stay within a minute on two cores.
const raceOn = false
