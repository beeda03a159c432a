package sensitivity_test

import (
	"context"
	"fmt"

	"couplet/optimizers/sensitivity"
)

// Screening a function of three variables whose third does nothing.
func ExampleMorris_Screen() {
	f := func(x []float64) float64 { return 10*x[0] + x[1]*x[1] }
	model, err := sensitivity.FuncModel(f, []float64{0, 0, 0}, []float64{1, 2, 5})
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := sensitivity.Morris{Trajectories: 10}.Screen(context.Background(), model, []string{"a", "b", "c"}, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, i := range r.Ranking() {
		fmt.Printf("%s mu* %.3g\n", r.Names[i], r.MuStar[i])
	}
	// Output:
	// a mu* 10
	// b mu* 4
	// c mu* 0
}
