// Package trusted holds the generated yaegi symbol tables of the standard
// packages exposed only when the sandbox is lifted for a trusted script
// (file system, processes, encodings). It is regenerated together with
// package symbols.
package trusted

import "reflect"

// Symbols maps "importpath/name" to the exported symbols of a package.
var Symbols = map[string]map[string]reflect.Value{}
