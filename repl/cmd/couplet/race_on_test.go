//go:build race

package main

// raceDetector is set when the tests are built with -race: its shadow
// memory counts against a memory cap, so a low cap ends a process at
// its start.
const raceDetector = true
