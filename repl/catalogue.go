package repl

import (
	"context"
	"fmt"
	"strings"

	"couplet/mdo"
)

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
