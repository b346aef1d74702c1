//go:build !race

package elicit

const raceEnabled = false
