// Command symgen regenerates the interpreter's symbol tables; it is run by
// `go generate` in couplet/repl/symbols.
package main

import (
	"flag"
	"fmt"
	"os"

	"couplet/repl/internal/symgen"
)

func main() {
	dir := flag.String("dir", ".", "directory of package symbols (trusted tables go to DIR/trusted)")
	flag.Parse()
	if err := symgen.Generate(*dir); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
