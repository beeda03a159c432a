//go:build !race

package main

// raceDetector is set when the tests are built with -race.
const raceDetector = false
