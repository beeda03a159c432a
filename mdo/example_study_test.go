package mdo_test

import (
	"context"
	"fmt"

	"couplet/mdo"
)

// A study names what varies (design variables with bounds), what to
// minimise and what must hold, over a coupled system. Here the Sellar
// problem (Sellar, Batill & Renaud, AIAA 96-0714, 1996) is declared by
// hand, as mdo.SellarStudy does, with one more constraint on a quantity
// computed from the analysis (WithFunc: the sum of the couplings,
// y1 + y2 ≤ 6.5), and one design point is evaluated: x = 0, z1 = 2,
// z2 = 0, near the published optimum (z1 = 1.97764), where by hand
// y1 = z1² − 0.2 y2 = 3.24, y2 = √y1 + z1 = 3.8 and
// f = y1 + e^(−y2) = 3.2624; the added constraint is violated there.
func ExampleStudy() {
	sys, err := mdo.NewSystem(mdo.Sellar()...)
	if err != nil {
		fmt.Println(err)
		return
	}
	sum := mdo.AtMost("y1_plus_y2", 6.5).WithFunc(func(v mdo.Values) float64 {
		return v.Get("y1") + v.Get("y2")
	})
	study := &mdo.Study{
		Name:        "sellar",
		System:      sys,
		Design:      []mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)},
		Objectives:  []mdo.Objective{mdo.Minimize("f")},
		Constraints: []mdo.Constraint{mdo.AtLeast("g1", 3.16), mdo.AtMost("g2", 24), sum},
		Workers:     1,
	}
	ev, err := study.NewEvaluator()
	if err != nil {
		fmt.Println(err)
		return
	}
	// optimisers work in the unit box: z1 = 2 is (2 + 10)/20
	e, err := ev.EvaluateOne(context.Background(), []float64{0, (2.0 + 10) / 20, 0})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("design %.5g, f = %.4f, feasible %v\n", e.Design, e.Objectives[0], e.Feasible)
	for i, c := range study.Constraints {
		fmt.Printf("%s %s: %.4f, margin %.4f\n", c.Name, c.Kind, e.Constraints[i], e.Margins[i])
	}
	// Output:
	// design [0 2 0], f = 3.2624, feasible false
	// g1 >=: 3.2400, margin 0.0800
	// g2 <=: 3.8000, margin 20.2000
	// y1_plus_y2 <=: 7.0400, margin -0.5400
}

// A continuous design variable takes any value between its bounds; an
// integer one whole values only (the evolutionary optimisers and the
// designs of experiments accept those).
func ExampleContinuous() {
	area := mdo.Continuous("wing.area", 90, 160)
	engines := mdo.Integer("engine.count", 2, 4)
	fmt.Println(area.Name, area.Lower, area.Upper, area.Integer)
	fmt.Println(engines.Name, engines.Lower, engines.Upper, engines.Integer)
	// Output:
	// wing.area 90 160 false
	// engine.count 2 4 true
}

// An objective is a system variable to minimise (or maximise), or a
// function of the analysis values.
func ExampleMinimize() {
	fmt.Println(mdo.Minimize("mass.takeoff"))
	fmt.Println(mdo.Maximize("perf.range"))
	lOverD := mdo.MaximizeFunc("lift_to_drag", func(v mdo.Values) float64 {
		return v.Get("aero.cl") / v.Get("aero.cd")
	})
	fmt.Println(lOverD)
	// Output:
	// minimise mass.takeoff
	// maximise perf.range
	// maximise lift_to_drag
}

// AtMost and AtLeast bound a system variable from above and below.
func ExampleAtMost() {
	field := mdo.AtMost("perf.takeoff_field_length", 1800)
	climb := mdo.AtLeast("perf.climb_gradient", 0.024)
	fmt.Println(field.Name, field.Kind, field.Upper)
	fmt.Println(climb.Name, climb.Kind, climb.Lower)
	// Output:
	// perf.takeoff_field_length <= 1800
	// perf.climb_gradient >= 0.024
}

// AtLeast: the Sellar problem's g1 ≥ 3.16.
func ExampleAtLeast() {
	g1 := mdo.AtLeast("g1", 3.16)
	fmt.Printf("%s %s %g\n", g1.Name, g1.Kind, g1.Lower)
	// Output: g1 >= 3.16
}

// WithFunc constrains a quantity computed from the analysis values
// rather than a variable (ExampleStudy evaluates one); its Name labels
// it in results.
func ExampleConstraint_WithFunc() {
	sum := mdo.AtMost("y1_plus_y2", 6.5).WithFunc(func(v mdo.Values) float64 {
		return v.Get("y1") + v.Get("y2")
	}).WithScale(10)
	fmt.Println(sum.Name, sum.Kind, sum.Upper, sum.Scale, sum.Func != nil)
	// Output: y1_plus_y2 <= 6.5 10 true
}
