package main

import (
	"errors"
	"flag"
	"fmt"
	"io"

	"couplet/disciplines"
	"couplet/mdo"
)

// varsCommand is `couplet vars [--prefix P] [--markdown]`: it prints the
// catalogue of the aircraft model's variables (disciplines.NewAircraft
// with the default configuration), those whose names start with P, as a
// text table or, with --markdown, as the Markdown table of the reference
// page disciplines/VARIABLES.md. It returns the exit status: 0, 1 when
// the model cannot be built, or 2 for a bad flag or a prefix no variable
// has.
func varsCommand(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("vars", flag.ContinueOnError)
	prefix := fs.String("prefix", "", "list only the variables whose names start with this, e.g. mass. or wing.area")
	markdown := fs.Bool("markdown", false, "print a Markdown table, as in disciplines/VARIABLES.md")
	pos, err := parseFlags("vars", fs, args, nil)
	if errors.Is(err, errHelp) {
		fmt.Fprint(stdout, "usage: couplet vars [--prefix P] [--markdown]\n\nLists the variables of the aircraft model (its default configuration): name,\nunit, default, validity range, producer, consumers and description.\n\nflags:\n")
		printFlags(stdout, fs)
		return 0
	}
	if err == nil && len(pos) > 0 {
		err = fmt.Errorf("unexpected argument %q: use --prefix %s to list the variables whose names start with it", pos[0], pos[0])
	}
	if err != nil {
		return usageFailed(stderr, "vars", err)
	}
	sys, err := disciplines.NewAircraft(disciplines.DefaultAircraftConfig())
	if err != nil {
		fmt.Fprintf(stderr, "couplet vars: %v\n", err)
		return 1
	}
	entries, err := sys.Catalogue(*prefix)
	if err != nil {
		return usageFailed(stderr, "vars", fmt.Errorf("--prefix %q: %w", *prefix, err))
	}
	if *markdown {
		fmt.Fprint(stdout, mdo.CatalogueMarkdown(entries))
	} else {
		fmt.Fprint(stdout, mdo.FormatCatalogue(entries))
	}
	return 0
}
