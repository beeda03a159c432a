package mdo_test

import (
	"context"
	"fmt"

	"couplet/mdo"
)

// The total derivatives of the converged Sellar analysis, and a check of
// one discipline's analytic partials against finite differences.
func ExampleWorkspace_Totals() {
	sys, _ := mdo.NewSystem(mdo.Sellar()...)
	w := sys.NewWorkspace()
	if err := w.Analyze(context.Background()); err != nil {
		panic(err)
	}
	tot, err := w.Totals([]string{"f", "y1"}, []string{"x", "z1", "z2"}, mdo.TotalsOptions{})
	if err != nil {
		panic(err)
	}
	df, _ := tot.At("f", "z1")
	fmt.Printf("%s mode, df/dz1 = %.4f\n", tot.Mode, df)
	c, _ := mdo.CheckPartials(sys.Disciplines()[1], []float64{9, 5, 2}, 0)
	fmt.Println(c.Worst.RelativeDifference < 1e-8)
	// Output:
	// adjoint mode, df/dz1 = 9.6100
	// true
}
