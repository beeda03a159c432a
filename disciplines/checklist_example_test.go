package disciplines_test

import (
	"context"
	"fmt"

	"couplet/disciplines"
)

// The designer's checklist of the invented regional jet at its baseline:
// the rules of thumb it does not meet, each with its value, band and
// source. Flags, not constraints.
func ExampleDesignChecklist() {
	w, err := disciplines.Kestrel().Workspace()
	if err != nil {
		panic(err)
	}
	if err := w.Analyze(context.Background()); err != nil {
		panic(err)
	}
	cl := disciplines.DesignChecklist(func(name string) (float64, bool) {
		v, err := w.Lookup(name)
		return v, err == nil
	})
	for _, r := range cl.Flagged() {
		fmt.Println(r.Line())
	}
	fmt.Printf("%d of %d rules flagged\n", len(cl.Flagged()), len(cl))
	// Output:
	// tail tips behind the fuselage end: 0.288 m, <= 0 (or a declared overhang): FLAG (swept tail tips reach past the fuselage end: declare it or constrain it) [common practice (no source)]
	// 1 of 23 rules flagged
}
