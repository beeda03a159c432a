package mdo_test

import (
	"context"
	"errors"
	"fmt"

	"couplet/mdo"
)

// A loop whose balance asks for a value outside a validity range: y1 =
// 0.5·y2 − 2 with y1 ≥ 0 for its consumer. The analysis says the design
// does not close, which balance runs away and by how much.
func ExampleClassify() {
	y1 := mdo.Var{Name: "y1", Description: "the balanced quantity", Default: 1, Min: 0, Max: 100}
	y2 := mdo.Var{Name: "y2", Default: 1, Min: -100, Max: 100}
	sys, err := mdo.NewSystem(
		mdo.FuncVars("supply", []mdo.Var{y2}, []mdo.Var{y1}, func(in, out []float64) error { out[0] = 0.5*in[0] - 2; return nil }),
		mdo.FuncVars("demand", []mdo.Var{y1}, []mdo.Var{y2}, func(in, out []float64) error { out[0] = in[0]; return nil }),
	)
	if err != nil {
		fmt.Println(err)
		return
	}
	err = sys.NewWorkspace().Analyze(context.Background())
	class := mdo.Classify(err)
	var nc *mdo.NotClosingError
	if errors.As(err, &nc) {
		fmt.Printf("%s: %s = %.3g, limit %g of %s\n", class, nc.Var, nc.Value, nc.Limit, nc.Discipline)
	}
	fmt.Println("remedy:", class.Remedy())
	// Output:
	// does-not-close: y1 = -2, limit 0 of demand
	// remedy: no physical solution here: move the design away from this region or relax the requirement that drives the runaway quantity
}
