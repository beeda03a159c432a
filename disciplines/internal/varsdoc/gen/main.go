// Command gen writes the reference page of the aircraft model's
// variables (varsdoc.Page) into the file its argument names.
package main

import (
	"fmt"
	"os"

	"couplet/disciplines/internal/varsdoc"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: gen FILE")
		os.Exit(2)
	}
	page, err := varsdoc.Page()
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	if err := os.WriteFile(os.Args[1], []byte(page), 0o644); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
