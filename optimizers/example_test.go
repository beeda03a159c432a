package optimizers_test

import (
	"context"
	"fmt"
	"math"

	"couplet/mdo"
	"couplet/optimizers"
)

// A study over a System of one discipline, minimised by Nelder–Mead with
// the augmented-Lagrangian constraint wrapper.
func ExampleNelderMead() {
	in := []mdo.Var{
		{Name: "x", Unit: "m", Default: 2, Min: -5, Max: 5},
		{Name: "y", Unit: "m", Default: 2, Min: -5, Max: 5},
	}
	out := []mdo.Var{{Name: "f", Unit: "m2"}, {Name: "g", Unit: "m"}}
	sys, err := mdo.NewSystem(mdo.FuncVars("circle", in, out, func(in, out []float64) error {
		out[0] = in[0]*in[0] + in[1]*in[1] // squared distance from the origin
		out[1] = in[0] + in[1]             // must reach the line x + y = 2
		return nil
	}))
	if err != nil {
		fmt.Println(err)
		return
	}
	s := &mdo.Study{
		Name:        "closest point",
		System:      sys,
		Design:      []mdo.DesignVar{mdo.Continuous("x", -5, 5), mdo.Continuous("y", -5, 5)},
		Objectives:  []mdo.Objective{mdo.Minimize("f")},
		Constraints: []mdo.Constraint{mdo.AtLeast("g", 2)},
		Seed:        1,
	}
	res, err := optimizers.NelderMead{}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	d := res.DesignValues()
	fmt.Printf("x = %.3f, y = %.3f, f = %.3f, feasible %v\n", d["x"], d["y"], res.Objective(), res.Feasible())
	// Output: x = 1.000, y = 1.000, f = 2.000, feasible true
}

// The Sellar problem (MDF) by the genetic algorithm.
func ExampleGA() {
	s, err := optimizers.SellarMDF()
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Seed = 1
	res, err := optimizers.GA{}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("f = %.2f, feasible %v, within 1e-2 of 3.18339: %v\n", res.Objective(), res.Feasible(), math.Abs(res.Objective()-optimizers.SellarOptimum) < 1e-2)
	// Output: f = 3.18, feasible true, within 1e-2 of 3.18339: true
}

// A two-objective study (ZDT1) by NSGA-II: the Result's Front holds the
// non-dominated designs.
func ExampleNSGA2() {
	s, err := optimizers.ZDT1(30)
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Seed = 1
	res, err := optimizers.NSGA2{Evolution: optimizers.Evolution{Population: 100, Generations: 200}}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	hv, err := optimizers.FrontHypervolume(res, [2]float64{1, 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("front of more than 100 designs: %v; hypervolume %.2f (true front 2/3)\n", len(res.Front) > 100, hv)
	// Output: front of more than 100 designs: true; hypervolume 0.66 (true front 2/3)
}

// A Latin hypercube design of experiments over the Sellar problem.
func ExampleLatinHypercube() {
	s, err := optimizers.SellarMDF()
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Seed = 1
	res, err := optimizers.LatinHypercube{Samples: 200}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d evaluations, stop %q, best feasible %v\n", res.Evaluations, res.Stop, res.Feasible())
	// Output: 200 evaluations, stop "complete", best feasible true
}

// Every optimiser takes a context: cancelling it stops the run and returns
// the best point so far.
func ExampleOptimizer_cancel() {
	s, err := optimizers.SellarMDF()
	if err != nil {
		fmt.Println(err)
		return
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	s.Progress = func(p mdo.Progress) {
		if p.Iteration == 10 {
			cancel() // as Ctrl-C in the notebook would
		}
	}
	var opt optimizers.Optimizer = optimizers.DifferentialEvolution{}
	res, err := opt.Minimize(ctx, s)
	fmt.Println(res.Stop, err, res.Best != nil)
	// Output: cancelled <nil> true
}

// CMA-ES on the Rosenbrock function; every generation is one batch on the
// study's workers.
func ExampleCMAES() {
	s, err := optimizers.Rosenbrock(2)
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Seed = 1
	res, err := optimizers.CMAES{}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	d := res.DesignValues()
	fmt.Printf("x1 = %.3f, x2 = %.3f, f below 1e-8: %v\n", d["x1"], d["x2"], res.Objective() < 1e-8)
	// Output: x1 = 1.000, x2 = 1.000, f below 1e-8: true
}

// Differential evolution on CEC 2006 g08, with Deb's feasibility rules.
func ExampleDifferentialEvolution() {
	s, err := optimizers.G08()
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Seed = 1
	res, err := optimizers.DifferentialEvolution{}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("f = %.7f, feasible %v\n", res.Objective(), res.Feasible())
	// Output: f = -0.0958250, feasible true
}

// A particle swarm on CEC 2006 g11, whose equality constraint the swarm
// follows with the ε-level comparison and the gradient-based mutation.
func ExampleParticleSwarm() {
	s, err := optimizers.G11()
	if err != nil {
		fmt.Println(err)
		return
	}
	s.Seed = 1
	res, err := optimizers.ParticleSwarm{}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("f = %.3f, feasible %v\n", res.Objective(), res.Feasible())
	// Output: f = 0.750, feasible true
}

// A full-factorial design with 5 levels of x1 and 3 of x2.
func ExampleFullFactorial() {
	s, err := optimizers.Rosenbrock(2)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := optimizers.FullFactorial{Levels: 3, VariableLevels: map[string]int{"x1": 5}}.Minimize(context.Background(), s)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(res.Evaluations, res.Stop)
	// Output: 15 complete
}
