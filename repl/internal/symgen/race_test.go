//go:build race

package symgen

// raceEnabled is set when the tests run under the race detector, which
// makes type-checking the exposed packages from source take minutes.
const raceEnabled = true
