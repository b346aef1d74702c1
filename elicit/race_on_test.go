//go:build race

package elicit

// raceEnabled: the tests run under the race detector, about ten times
// slower, and the largest reference sets are sampled.
const raceEnabled = true
