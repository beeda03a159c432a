package optimizers

import (
	"context"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
)

// bizjetStudy is the business-jet demonstration study (invented data,
// disciplines.Swiftlet): minimum take-off mass over wing area, aspect
// ratio, sweep, thickness ratio, tail volume and engine size, subject to
// the design range, take-off and landing field lengths, the second-segment
// climb gradient and a static-margin band.
func bizjetStudy(sc disciplines.Scenario, sweepLo, sweepHi float64) (*mdo.Study, error) {
	sys, err := sc.NewSystem()
	if err != nil {
		return nil, err
	}
	fixed := map[string]float64{}
	for k, v := range sc.Parameters {
		fixed[k] = v
	}
	return &mdo.Study{
		Name:   "business jet, minimum take-off mass",
		System: sys,
		Fixed:  fixed,
		Seed:   1,
		Design: []mdo.DesignVar{
			mdo.Continuous("wing.area", 80, 220),
			mdo.Continuous("wing.aspect_ratio", 2, 4.5),
			mdo.Continuous("wing.sweep", sweepLo, sweepHi),
			mdo.Continuous("wing.thickness_ratio", 0.02, 0.05),
			mdo.Continuous("htail.volume", 0.1, 0.5),
			mdo.Continuous("engine.thrust_scale", 1, 1.5),
		},
		Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")},
		Constraints: []mdo.Constraint{
			// the design range flown with full tanks
			mdo.AtLeast("perf.range_full_fuel", sc.Parameters["mission.range"]),
			// field lengths of the invented requirement
			mdo.AtMost("perf.takeoff_field_length", 2400),
			mdo.AtMost("perf.landing_field_length", 2000),
			// 14 CFR 25.121(b): 2.4 % for two engines
			mdo.AtLeast("perf.climb_gradient_second_segment", 0.024),
			// a stable transport flies with 5–15 % of the MAC: common
			// practice (no source)
			mdo.Between("stability.static_margin_takeoff", 0.05, 0.15),
		},
	}, nil
}

// checkFeasibleWithActive checks a single-objective aircraft result.
func checkFeasibleWithActive(t *testing.T, res *mdo.Result) {
	t.Helper()
	if !res.Feasible() {
		t.Fatalf("best design infeasible:\n%v", res)
	}
	base := res.Best.Objectives[0]
	if base <= 0 {
		t.Fatalf("take-off mass %g", base)
	}
	active := res.Active(1e-2)
	if len(active) == 0 {
		t.Errorf("no active constraint named at the optimum:\n%v", res)
	}
	names := map[string]bool{}
	for _, c := range res.Constraints {
		names[c.Name] = true
	}
	for _, a := range active {
		if !names[a] {
			t.Errorf("active constraint %q is not a constraint of the study", a)
		}
	}
	t.Logf("minimum take-off mass %.0f kg; active: %s", base, strings.Join(active, ", "))
}

// The business jet optimised for minimum take-off mass: the result is
// feasible and its active constraints are named.
func TestBusinessJetMinimumMass(t *testing.T) {
	if testing.Short() {
		t.Skip("aircraft optimisation")
	}
	s, err := bizjetStudy(disciplines.Swiftlet(), 45, 65)
	if err != nil {
		t.Fatal(err)
	}
	res, err := NelderMead{MaxEvaluations: 1500}.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	checkFeasibleWithActive(t, res)
	// the optimum is lighter than the scenario's own (infeasible) baseline
	// design would allow: it must not exceed it
	ev, err := s.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	start, err := ev.EvaluateOne(context.Background(), ev.Start())
	if err != nil {
		t.Fatal(err)
	}
	if start.Converged && start.Feasible && res.Objective() > start.Objectives[0] {
		t.Errorf("optimum %.0f kg heavier than the feasible baseline %.0f kg", res.Objective(), start.Objectives[0])
	}
}

// With the sweep free to go forward the wing's divergence margin joins the
// constraints (forward sweep couples bending into torsion and lowers the
// divergence dynamic pressure), and the wing position is free to restore
// the balance. The forward-swept variant is heavier: its invented design
// range is 3 000 km.
func TestForwardSweptBusinessJet(t *testing.T) {
	if testing.Short() {
		t.Skip("aircraft optimisation")
	}
	sc := disciplines.SwiftletForwardSwept()
	sc.Parameters["mission.range"] = 3.0e6
	s, err := bizjetStudy(sc, -45, -15)
	if err != nil {
		t.Fatal(err)
	}
	s.Design = append(s.Design, mdo.Continuous("wing.position", 0.4, 0.65))
	s.Constraints = append(s.Constraints, mdo.AtLeast("stability.divergence_margin", 0))
	res, err := ParticleSwarm{Evolution: Evolution{Population: 30, Generations: 40}}.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	checkFeasibleWithActive(t, res)
	if m, err := res.Lookup("stability.divergence_margin"); err != nil || m < 0 {
		t.Errorf("divergence margin %g (%v), want >= 0", m, err)
	}
}

// Take-off mass against take-off field length: NSGA-II gives a front of
// at least 20 non-dominated feasible designs.
func TestBusinessJetFront(t *testing.T) {
	if testing.Short() {
		t.Skip("aircraft optimisation")
	}
	sc := disciplines.Swiftlet()
	sc.Parameters["mission.range"] = 5.0e6
	s, err := bizjetStudy(sc, 45, 65)
	if err != nil {
		t.Fatal(err)
	}
	s.Name = "business jet, mass against field length"
	s.Objectives = []mdo.Objective{mdo.Minimize("mass.takeoff"), mdo.Minimize("perf.takeoff_field_length")}
	s.Constraints = s.Constraints[:1] // the range
	res, err := NSGA2{Evolution: Evolution{Population: 40, Generations: 25}}.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Front) < 20 {
		t.Fatalf("front of %d designs, want at least 20", len(res.Front))
	}
	for i, p := range res.Front {
		if !p.Feasible {
			t.Fatalf("front design %d infeasible", p.ID)
		}
		for j, q := range res.Front {
			if i != j && mdo.Dominates(q, p) {
				t.Fatalf("front design %d is dominated by %d", p.ID, q.ID)
			}
		}
	}
}
