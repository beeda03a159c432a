package surrogate_test

import (
	"context"
	"fmt"
	"math"

	"couplet/mdo"
	"couplet/optimizers"
	"couplet/optimizers/surrogate"
)

// Fitting a Gaussian process to seven values of a sine and predicting
// between them.
func ExampleFitGP() {
	var xs [][]float64
	var ys []float64
	for i := 0; i <= 6; i++ {
		x := float64(i) / 6
		xs = append(xs, []float64{x})
		ys = append(ys, math.Sin(2*x))
	}
	g, err := surrogate.FitGP(xs, ys, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	m, sd := g.Predict([]float64{0.25})
	fmt.Printf("sin(0.5) = %.4f, predicted %.4f (sd below 1e-3: %v)\n", math.Sin(0.5), m, sd < 1e-3)
	// Output:
	// sin(0.5) = 0.4794, predicted 0.4794 (sd below 1e-3: true)
}

// A stand-in for a discipline: the same name and variables, its output
// estimated by a model fitted to samples of it. A study whose system
// holds it says which of its numbers are estimates.
func ExampleFitDiscipline() {
	sellar2 := mdo.Sellar()[1] // y2 = sqrt(y1) + z1 + z2
	sd, err := surrogate.FitDiscipline(context.Background(), sellar2, surrogate.Fit{Samples: 40, Seed: 2, Model: surrogate.Kriging,
		Ranges: map[string][2]float64{"y1": {1, 40}, "z1": {-2, 10}}})
	if err != nil {
		fmt.Println(err)
		return
	}
	out := make([]float64, 1)
	if err := sd.Compute([]float64{9, 1, 2}, out); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: y2(9, 1, 2) = 6, estimated %.2f\n", sd.Name(), out[0])
	// Output:
	// sellar2: y2(9, 1, 2) = 6, estimated 6.00
}

// A stand-in for a whole study: search it, then analyse its best design
// with the true study, whose answer is the one to state.
func ExampleStandIn() {
	study, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		fmt.Println(err)
		return
	}
	cheap, err := surrogate.StandIn(context.Background(), study, surrogate.Fit{Samples: 40, Seed: 5, Model: surrogate.Kriging,
		Ranges: map[string][2]float64{"x": {0, 4}, "z1": {0, 6}, "z2": {0, 4}}})
	if err != nil {
		fmt.Println(err)
		return
	}
	found, err := optimizers.NelderMead{}.Minimize(context.Background(), cheap)
	if err != nil {
		fmt.Println(err)
		return
	}
	truth, err := surrogate.Confirm(context.Background(), study, found)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d surrogate; true f at its optimum %.2f (published optimum 3.18)\n", cheap.Name, len(found.Surrogates), truth.Objective())
	// Output:
	// sellar_surrogate: 1 surrogate; true f at its optimum 3.18 (published optimum 3.18)
}
