package plot_test

import (
	"fmt"

	"couplet/mdo/plot"
)

// A constraint diagram: two thrust-to-weight boundaries, a landing limit
// on wing loading and the chosen design (numbers invented).
func ExampleConstraintDiagram() {
	fig, err := plot.ConstraintDiagram(plot.Diagram{
		MinWingLoading: 1500, MaxWingLoading: 6500,
		Boundaries: []plot.Boundary{
			{Label: "take-off field length", MinThrustToWeight: func(ws float64) float64 { return ws / 14000 }},
			{Label: "climb gradient", MinThrustToWeight: func(float64) float64 { return 0.25 }},
		},
		Limits:  []plot.WingLoadingLimit{{Label: "approach speed", Max: 5000}},
		Designs: []plot.DesignPoint{{Label: "design", WingLoading: 4200, ThrustToWeight: 0.36}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	svg, err := fig.SVG()
	fmt.Println(fig.Name, len(svg) > 0, err)
	// Output:
	// constraint_diagram true <nil>
}

// The planform of a forward-swept wing (numbers invented).
func ExamplePlanform() {
	a := plot.Aircraft{WingSpan: 20, WingRootChord: 4, WingTipChord: 1.6, WingSweepLE: -25, WingApex: 14}
	fig, err := plot.Planform(a)
	if err != nil {
		fmt.Println(err)
		return
	}
	c, _, _ := a.MAC()
	fmt.Printf("%s: S = %.1f m2, AR = %.2f, MAC = %.3f m\n", fig.Name, a.WingArea(), a.AspectRatio(), c)
	// Output:
	// planform: S = 56.0 m2, AR = 7.14, MAC = 2.971 m
}
