package optimizers

import (
	"context"
	"testing"

	"couplet/mdo"
)

// TestGAAndSwarmOnPerturbedAircraft: the GA and the particle swarm at
// their defaults on variants of the regional-jet example whose take-off
// field limit is shorter than the 1 600 m field the engines are sized for
// (disciplines.Kestrel), so that the field length is flat at 1 600 m
// wherever that sizing rules and the feasible designs are those whose
// engines another requirement sizes: a thin set bounded by active
// limits. Both end feasible within 1 % of the reference optimum. The
// references are invented-data figures of this code, not published
// values: 8 330.9275 kg (16 m shorter) is the best of differential
// evolution (60 agents, 400 generations) and of Sextant with 12 starts
// (TestSextantOnPerturbedAircraft); 8 315.5798 kg (8 m shorter) is the
// best of differential evolution (80 agents, 800 generations, 64 080
// evaluations), of Sextant started from it and of Sextant with 30
// starts. (They were 8 346.1292 and 8 331.1686 kg before the Oswald
// efficiency of swept wings was held at the transport relation,
// disciplines.OswaldEfficiency: the optimum's sweep is no longer held
// forward where e fell with it; recomputed the same way.) Before the gradient-based mutation acted
// on inequalities the GA ended 4.99 % and 2.27 % above them, the swarm
// 1.74 % and 2.37 %.
func TestGAAndSwarmOnPerturbedAircraft(t *testing.T) {
	if testing.Short() {
		t.Skip("aircraft optimisations (TestGradientMutationOnInequalities is the fast check)")
	}
	tests := []struct {
		name      string
		shorter   float64
		reference float64
	}{
		{"take-off field length limit 16 m shorter", 16, 8330.9275},
		{"take-off field length limit 8 m shorter", 8, 8315.5798},
	}
	for _, tc := range tests {
		for _, o := range []Optimizer{GA{}, ParticleSwarm{}} {
			t.Run(tc.name+"/"+o.Name(), func(t *testing.T) {
				s, err := regionalJetExample()
				if err != nil {
					t.Fatal(err)
				}
				moveLimit(t, s, "perf.takeoff_field_length", -tc.shorter)
				res, err := o.Minimize(context.Background(), s)
				if err != nil {
					t.Fatal(err)
				}
				gap := res.Objective()/tc.reference - 1
				t.Logf("%.8g kg (%+.3f %%) after %d evaluations, %v", res.Objective(), 100*gap, res.Evaluations, res.Stop)
				if !res.Feasible() || gap > 0.01 || gap < -1e-6 {
					t.Errorf("mission fuel %.8g kg (feasible %v), want feasible within 1 %% above the reference %.8g kg", res.Objective(), res.Feasible(), tc.reference)
				}
			})
		}
	}
}

// The GA and the particle swarm give the gradient-based mutation to
// infeasible offspring of a study with inequality constraints only when
// every design variable is continuous; differential evolution, which
// reaches such optima by Deb's rules, only with an equality constraint.
func TestGradientMutationOnInequalities(t *testing.T) {
	tests := []struct {
		name  string
		study func() (*mdo.Study, error)
		o     evolutionary
		want  bool
	}{
		{"GA, welded beam", WeldedBeam, GA{}, true},
		{"particle swarm, welded beam", WeldedBeam, ParticleSwarm{}, true},
		{"differential evolution, welded beam", WeldedBeam, DifferentialEvolution{}, false},
		{"GA, pressure vessel (integer thicknesses)", PressureVessel, GA{}, false},
		{"GA, welded beam, GradientRate negative", WeldedBeam, GA{EqualityHandling: EqualityHandling{GradientRate: -1}}, false},
		{"differential evolution, Sellar IDF", SellarIDF, DifferentialEvolution{}, true},
	}
	for _, tc := range tests {
		s, err := tc.study()
		if err != nil {
			t.Fatal(err)
		}
		_, inequalities := tc.o.(DifferentialEvolution)
		e, err := newEngine(context.Background(), s, tc.o, 1, !inequalities)
		if err != nil {
			t.Fatal(err)
		}
		if got := e.grad != nil; got != tc.want {
			t.Errorf("%s: gradient-based mutation %v, want %v", tc.name, got, tc.want)
		}
	}
	// the mutation moves an infeasible point of the welded beam onto its
	// violated constraints: the violation falls
	s, err := WeldedBeam()
	if err != nil {
		t.Fatal(err)
	}
	e, err := newEngine(context.Background(), s, GA{}, 1, true)
	if err != nil {
		t.Fatal(err)
	}
	m := e.newMember([]float64{0.05, 0.5, 0.5, 0.05})
	if err := e.evaluateAll([]*member{m}); err != nil {
		t.Fatal(err)
	}
	before := m.ev.Violation
	if m.ev.Feasible || !m.ev.Converged {
		t.Fatalf("the probe point is feasible %v, converged %v", m.ev.Feasible, m.ev.Converged)
	}
	if err := e.grad.newton(e.evaluateAll, e.dim, []*member{m}, e.fresh.add); err != nil {
		t.Fatal(err)
	}
	if !(m.ev.Violation < before/10) {
		t.Errorf("violation %g after the gradient-based mutation, %g before", m.ev.Violation, before)
	}
}
