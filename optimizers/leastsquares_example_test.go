package optimizers_test

import (
	"context"
	"fmt"
	"math"

	"couplet/optimizers"
)

// Fit y = a·(1 − exp(−b·x)) to five points with a 0.1 uncertainty each.
func ExampleLeastSquares_Fit() {
	x := []float64{1, 2, 4, 8, 16}
	y := []float64{3.9, 7.0, 11.1, 15.2, 17.3}
	res, err := optimizers.LeastSquares{}.Fit(context.Background(), optimizers.FitProblem{
		Names:    []string{"a", "b"},
		Start:    []float64{10, 0.1},
		Observed: y,
		Sigma:    []float64{0.1, 0.1, 0.1, 0.1, 0.1},
		Predict: func(_ context.Context, p, pred []float64) error {
			for i, xi := range x {
				pred[i] = p[0] * (1 - math.Exp(-p[1]*xi))
			}
			return nil
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for j, n := range res.Names {
		fmt.Printf("%s = %.3f ± %.3f\n", n, res.Params[j], res.StdErr[j])
	}
	fmt.Printf("correlation %.2f, %v\n", res.Correlation[0][1], res.Stop)
	// Output:
	// a = 17.598 ± 0.050
	// b = 0.251 ± 0.002
	// correlation -0.79, converged
}
