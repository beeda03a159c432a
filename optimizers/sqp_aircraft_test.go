package optimizers

import (
	"context"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
)

// businessJetExample is the study of studies/business_jet.study (the
// invented Swiftlet S12): minimum take-off mass over wing area, aspect
// ratio, sweep and thickness ratio under the field lengths, the
// second-segment climb gradient, the take-off static margin, the fuel
// volume and the layout constraints.
func businessJetExample() (*mdo.Study, error) {
	jet := disciplines.Swiftlet()
	sys, err := jet.NewSystem()
	if err != nil {
		return nil, err
	}
	return &mdo.Study{
		Name:   "business_jet_min_mass",
		System: sys,
		Design: []mdo.DesignVar{
			mdo.Continuous("wing.area", 100, 220),
			mdo.Continuous("wing.aspect_ratio", 1.8, 3.6),
			mdo.Continuous("wing.sweep", 52, 64),
			mdo.Continuous("wing.thickness_ratio", 0.024, 0.05),
		},
		Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")},
		Constraints: append([]mdo.Constraint{
			mdo.AtMost("perf.takeoff_field_length", 2400),
			mdo.AtMost("perf.landing_field_length", 1950),
			// 14 CFR 25.121(b): 2.4 % for two engines
			mdo.AtLeast("perf.climb_gradient_second_segment", 0.024),
			mdo.AtLeast("stability.static_margin_takeoff", 0.05),
			mdo.AtLeast("fuel_volume_margin", 0).WithFunc(func(v mdo.Values) float64 {
				return v.Get("mass.fuel_capacity") - v.Get("mass.fuel")
			}).WithScale(1000),
		}, disciplines.LayoutConstraints(2)...),
		Fixed: jet.Parameters,
		Seed:  2026,
	}, nil
}

// TestSextantBusinessJet: on the business-jet example, the gradient-based
// method finds the minimum take-off mass within 0.1 % of the example's
// gradient-free answer (Nelder–Mead with its 1 200 evaluations) with at
// most a fifth of its analyses (the requirement), ending on its
// convergence test at a feasible point, with the sensitivity.
func TestSextantBusinessJet(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the example's Nelder–Mead search")
	}
	s, err := businessJetExample()
	if err != nil {
		t.Fatal(err)
	}
	nm, err := NelderMead{MaxEvaluations: 1200}.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	s, _ = businessJetExample()
	res, rep, err := Sextant{}.Explore(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("Nelder–Mead %.6g kg in %d analyses; Sextant %.6g kg in %d analyses (%v, optimality %.2g, %d linear solves, %d discipline calls for the gradients)",
		nm.Objective(), nm.Analyses, res.Objective(), res.Analyses, res.Stop, rep.Optima[0].Optimality, rep.LinearSolves, rep.DisciplineCalls)
	if !res.Feasible() || res.Objective() > nm.Objective()*1.001 {
		t.Errorf("Sextant: %.8g kg (feasible %v), Nelder–Mead %.8g kg", res.Objective(), res.Feasible(), nm.Objective())
	}
	opt := rep.Optima[0]
	if res.Stop != mdo.StopConverged || !opt.Converged || !opt.Feasible || res.Sensitivity == nil {
		t.Errorf("Sextant: stopped %v, converged %v, feasible %v (optimality %.3g, violation %.3g), sensitivity %v",
			res.Stop, opt.Converged, opt.Feasible, opt.Optimality, opt.Violation, res.Sensitivity)
	}
	// the optimum lies where the engines' take-off and cruise sizing
	// requirements are equal (disciplines.Propulsion sizes them to the
	// larger): a kink, which the gradient sampling resolves
	if !opt.Sampled {
		t.Errorf("the business jet's optimum was reached without sampling the gradients")
	}
	t.Log("\n" + res.Sensitivity.String())
	if 5*res.Analyses > nm.Analyses {
		t.Errorf("Sextant ran %d analyses, more than a fifth of Nelder–Mead's %d", res.Analyses, nm.Analyses)
	}
}
