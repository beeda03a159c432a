package mdo_test

import (
	"context"
	"fmt"

	"couplet/mdo"
)

// Converge the Sellar problem's coupled disciplines at a design point.
func ExampleSystem_Analyze() {
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		fmt.Println(err)
		return
	}
	sol, err := sys.Analyze(context.Background(), map[string]float64{"x": 0, "z1": 1.97764, "z2": 0})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("y1 = %.4f, y2 = %.4f, f = %.4f\n", sol.Get("y1"), sol.Get("y2"), sol.Get("f"))
	// Output: y1 = 3.1600, y2 = 3.7553, f = 3.1834
}

// A discipline made from a plain function, coupled to another one.
func ExampleFunc() {
	lift := mdo.Func("lift", []string{"alpha", "w"}, []string{"cl"}, func(in, out []float64) error {
		out[0] = 0.1 + 5.0*in[0] - 0.01*in[1]
		return nil
	})
	weight := mdo.Func("weight", []string{"cl"}, []string{"w"}, func(in, out []float64) error {
		out[0] = 2 + 0.5*in[0]
		return nil
	})
	sys, err := mdo.NewSystem(lift, weight)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Print(sys)
	sol, err := sys.Analyze(context.Background(), map[string]float64{"alpha": 0.1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("cl = %.6f\n", sol.Get("cl"))
	// Output:
	// system: 2 disciplines, 3 variables, 1 parameters
	//   A: {lift, weight} (coupled, aitken-gauss-seidel)
	// cl = 0.577114
}

// A result says why its optimiser stopped with a StopReason; compare it
// with the constants, and store or read it as text.
func ExampleStopReason() {
	r := &mdo.Result{Stop: mdo.StopBudget}
	fmt.Println(r.Stop, r.Stop == mdo.StopBudget)
	back, err := mdo.ParseStopReason("complete")
	fmt.Println(back == mdo.StopComplete, err)
	// Output:
	// budget true
	// true <nil>
}

// Get reads a value for an expression; Lookup gives an error naming a
// misspelt variable (Get panics with it), never a silent NaN or 0.
func ExampleSolution_Lookup() {
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		fmt.Println(err)
		return
	}
	sol, err := sys.Analyze(context.Background(), map[string]float64{"x": 1, "z1": 5, "z2": 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("y1 + y2 = %.4f\n", sol.Get("y1")+sol.Get("y2"))
	_, err = sol.Lookup("y3")
	fmt.Println(err)
	// Output:
	// y1 + y2 = 37.6468
	// mdo: the solution has no variable "y3"; similar: y1, y2
}

// The catalogue of a system lists its variables, filtered by a prefix,
// with their producer and the disciplines reading them.
func ExampleSystem_Catalogue() {
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		panic(err)
	}
	entries, err := sys.Catalogue("y")
	if err != nil {
		panic(err)
	}
	fmt.Print(mdo.FormatCatalogue(entries))
	// Output:
	// name  unit  default  range          producer  consumers                  description
	// y1    -     1        [0, 1000]      sellar1   sellar2, sellar_functions  coupling variable of discipline 1
	// y2    -     1        [-1000, 1000]  sellar2   sellar1, sellar_functions  coupling variable of discipline 2
}
