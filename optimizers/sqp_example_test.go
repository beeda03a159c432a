package optimizers_test

import (
	"context"
	"fmt"

	"couplet/optimizers"
)

// Sextant (SQP with damped BFGS) on the Sellar problem, with the coupled
// derivatives of the analysis as gradients.
func ExampleSextant() {
	s, _ := optimizers.SellarMDF()
	res, rep, err := optimizers.Sextant{Starts: 2}.Explore(context.Background(), s)
	if err != nil {
		panic(err)
	}
	fmt.Printf("f = %.5f after %d analyses, %s, %d distinct optima\n", res.Objective(), res.Analyses, res.Stop, rep.Distinct)
	// Output:
	// f = 3.18339 after 16 analyses, converged, 2 distinct optima
}
