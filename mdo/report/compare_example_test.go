package report_test

import (
	"context"
	"fmt"

	"couplet/mdo"
	"couplet/mdo/report"
)

// gridResult evaluates a few points (in the unit box of the design
// variables) of the Sellar study over the given design variables and
// returns its result.
func gridResult(name string, design []mdo.DesignVar, points [][]float64) *mdo.Result {
	st, _ := mdo.SellarStudy(mdo.MDF)
	st.Name, st.Design, st.Workers = name, design, 1
	ev, _ := st.NewEvaluator()
	_ = ev.Begin("grid", nil)
	_, _ = ev.Evaluate(context.Background(), points)
	r, _ := ev.Finish(mdo.StopBudget)
	return r
}

// A native Go program compares two results side by side, without the
// interpreter: the second study has no design variable z2, which is
// shown as absent. report.ReadCompared reads results from their folders
// instead, and report.WriteComparison writes the page.
func ExampleCompare() {
	all := gridResult("three", []mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)},
		[][]float64{{0.1, 0.75, 0.2}, {0, 0.6, 0}})
	two := gridResult("two", []mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10)},
		[][]float64{{0.1, 0.7}, {0.02, 0.62}})
	results, err := report.ComparedResults(all, two)
	if err != nil {
		fmt.Println(err)
		return
	}
	c, err := report.Compare(context.Background(), results, report.CompareOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Print(c)
	// Output:
	// comparison of 2 results (conceptual estimates, not for certification, flight or airworthiness decisions)
	//                    unit  three        two
	// runs
	//   study            -     three        two
	//   optimiser        -     grid         grid
	//   formulation      -     MDF          MDF
	//   seed             -     0            0
	//   evaluations      -     2            2
	//   failed analyses  -     0            0
	//   stop             -     budget       budget
	//   best point       -     #1 feasible  #1 feasible
	// design variables
	//   x                -     0            0.2
	//   z1               -     2            2.4
	//   z2               -     0            absent
	// objectives
	//   minimise f       -     3.262371     8.608405
	// constraints
	//   g1 >= 3.16       -     3.24         6.567459
	//   g2 <= 24         -     3.8          6.962705
	// margins
	//   g1               -     0.08 ok      3.407459 ok
	//   g2               -     20.2 ok      17.03729 ok
}
