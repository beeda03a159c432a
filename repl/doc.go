// Package repl is couplet's notebook: an embedded Go interpreter (yaegi)
// that exposes the framework and a curated set of standard packages, a
// session of numbered cells with commands of its own, study files that
// save and replay a session, and the headless runner behind
// `couplet run`.
//
// Results of a session are conceptual-design estimates; they are not for
// certification, flight or airworthiness decisions.
package repl

// Version is the tool version written in the header of study files and
// in summary.json.
const Version = "0.1.0"
