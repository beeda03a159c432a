//go:build !race

package symgen

// raceEnabled is set when the tests run under the race detector.
const raceEnabled = false
