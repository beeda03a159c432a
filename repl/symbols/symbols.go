// Package symbols holds the generated yaegi symbol tables of everything a
// sandboxed study script may import: the couplet framework packages and a
// curated set of standard packages. Regenerate with `go generate` after an
// exported API of the framework changes (`go generate ./...`); CI
// regenerates them and fails when the committed ones differ.
package symbols

import "reflect"

//go:generate go run ../internal/symgen/symgen -dir .

// Symbols maps "importpath/name" to the exported symbols of a package, in
// the form interp.Interpreter.Use expects.
var Symbols = map[string]map[string]reflect.Value{}
