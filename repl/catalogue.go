package repl

import (
	"context"
	"flag"
	"fmt"
	"io"
	"strings"

	"couplet/disciplines"
	"couplet/mdo"
)

// VarsCommand is `couplet vars [--prefix P] [--markdown]`: it prints the
// catalogue of the aircraft model's variables (disciplines.NewAircraft
// with the default configuration), those whose names start with P, as a
// text table or, with --markdown, as the Markdown table of the reference
// page disciplines/VARIABLES.md. It returns the exit status: 0, or 2 for
// a bad flag or a prefix no variable has.
func VarsCommand(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("vars", flag.ContinueOnError)
	fs.SetOutput(stderr)
	prefix := fs.String("prefix", "", "list only the variables whose names start with this, e.g. mass. or wing.area")
	markdown := fs.Bool("markdown", false, "print a Markdown table")
	if err := fs.Parse(args); err != nil {
		if err == flag.ErrHelp {
			return 0
		}
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "couplet vars: unexpected argument %q; use --prefix P to filter\n", fs.Arg(0))
		return 2
	}
	sys, err := disciplines.NewAircraft(disciplines.DefaultAircraftConfig())
	if err != nil {
		fmt.Fprintf(stderr, "couplet vars: %v\n", err)
		return 1
	}
	entries, err := sys.Catalogue(*prefix)
	if err != nil {
		fmt.Fprintf(stderr, "couplet vars: --prefix %q: %v\n", *prefix, err)
		return 2
	}
	if *markdown {
		fmt.Fprint(stdout, mdo.CatalogueMarkdown(entries))
	} else {
		fmt.Fprint(stdout, mdo.FormatCatalogue(entries))
	}
	return 0
}

// cmdCatalogue is `@catalogue EXPR [PREFIX]`: the catalogue of the
// variables of a system (or of a study's system), filtered by a prefix.
func (s *Session) cmdCatalogue(ctx context.Context, arg string) bool {
	expr, prefix, _ := strings.Cut(strings.TrimSpace(arg), " ")
	prefix = strings.TrimSpace(prefix)
	if expr == "" {
		fmt.Fprintf(s.opts.Stderr, "%scatalogue needs a system or a study, and optionally a prefix, e.g. %scatalogue sys mass.\n", CommandPrefix, CommandPrefix)
		return false
	}
	v, err := s.Eval(ctx, CommandPrefix+"catalogue", expr)
	if err != nil {
		fmt.Fprintf(s.opts.Stderr, "%scatalogue %s: %v\n", CommandPrefix, expr, err)
		return false
	}
	sys := systemOf(v)
	if sys == nil {
		fmt.Fprintf(s.opts.Stderr, "%scatalogue %s: want a *mdo.System or a *mdo.Study, got %T\n", CommandPrefix, expr, v)
		return false
	}
	entries, err := sys.Catalogue(prefix)
	if err != nil {
		fmt.Fprintf(s.opts.Stderr, "%scatalogue %s %s: %v\n", CommandPrefix, expr, prefix, err)
		return false
	}
	fmt.Fprint(s.opts.Stdout, mdo.FormatCatalogue(entries))
	return false
}

// systemOf returns the system a value is or holds (a study's), nil if
// none.
func systemOf(v any) *mdo.System {
	switch t := v.(type) {
	case *mdo.System:
		return t
	case *mdo.Study:
		if t != nil {
			return t.System
		}
	case mdo.Study:
		return t.System
	}
	return nil
}
