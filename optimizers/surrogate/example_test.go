package surrogate_test

import (
	"fmt"
	"math"

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
