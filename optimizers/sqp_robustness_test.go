package optimizers

import (
	"context"
	"math"
	"strings"
	"testing"

	"couplet/disciplines"
	"couplet/mdo"
)

// regionalJetExample is the study of studies/regional_jet.study (the
// invented Kestrel R76): minimum mission fuel over wing area, aspect
// ratio, sweep and thickness ratio under the field lengths, the
// second-segment climb gradient, the static margins, the fuel volume and
// the layout constraints.
func regionalJetExample() (*mdo.Study, error) {
	rj := disciplines.Kestrel()
	sys, err := rj.NewSystem()
	if err != nil {
		return nil, err
	}
	return &mdo.Study{
		Name:   "regional_jet_min_fuel",
		System: sys,
		Design: []mdo.DesignVar{
			mdo.Continuous("wing.area", 60, 110),
			mdo.Continuous("wing.aspect_ratio", 7, 12),
			mdo.Continuous("wing.sweep", 15, 32),
			mdo.Continuous("wing.thickness_ratio", 0.09, 0.15),
		},
		Objectives: []mdo.Objective{mdo.Minimize("mass.fuel")},
		Constraints: append([]mdo.Constraint{
			mdo.AtMost("perf.takeoff_field_length", 1600),
			mdo.AtMost("perf.landing_field_length", 1400),
			// 14 CFR 25.121(b): 2.4 % for two engines
			mdo.AtLeast("perf.climb_gradient_second_segment", 0.024),
			mdo.AtLeast("stability.static_margin_takeoff", 0.05),
			mdo.AtLeast("stability.static_margin_cruise_start", 0.05),
			mdo.AtLeast("fuel_volume_margin", 0).WithFunc(func(v mdo.Values) float64 {
				return v.Get("mass.fuel_capacity") - v.Get("mass.fuel")
			}).WithScale(1000),
		}, disciplines.LayoutConstraints(1)...),
		Fixed: rj.Parameters,
		Seed:  76,
	}, nil
}

// moveLimit moves the limit of the study's constraint name by delta.
func moveLimit(t *testing.T, s *mdo.Study, name string, delta float64) {
	t.Helper()
	for i, c := range s.Constraints {
		if c.Name != name {
			continue
		}
		switch c.Kind {
		case mdo.LessEqual:
			c.Upper += delta
		case mdo.GreaterEqual:
			c.Lower += delta
		default:
			t.Fatalf("constraint %s is neither an upper nor a lower limit", name)
		}
		s.Constraints[i] = c
		return
	}
	t.Fatalf("the study has no constraint %s", name)
}

// startAt sets the study's baseline design (Sextant's start) at the
// fractions f of the design variables' ranges.
func startAt(s *mdo.Study, f ...float64) {
	fixed := map[string]float64{}
	for k, v := range s.Fixed {
		fixed[k] = v
	}
	for k, d := range s.Design {
		fixed[d.Name] = d.Lower + f[k]*(d.Upper-d.Lower)
	}
	s.Fixed = fixed
}

// TestSextantOnPerturbedAircraft: Sextant in its default settings on
// variants of the aircraft examples that nobody tuned it for (a limit
// moved, a design bound moved, another start). Where a feasible design is
// known it ends there, on its convergence test, within 1e-5 of the
// reference optimum: the best of differential evolution (60 agents, 400
// generations, 24 060 evaluations) and of Sextant with 12 starts, run on
// the same variants (/work/notes/s5-sextant.md has the whole table).
// Where none is known (the long runs end infeasible too) it says so:
// stalled, and the Result's StopDetail names the cause. Each row failed
// before the fix its comment names.
func TestSextantOnPerturbedAircraft(t *testing.T) {
	if testing.Short() {
		t.Skip("aircraft optimisations")
	}
	tests := []struct {
		name     string
		study    func() (*mdo.Study, error)
		edit     func(t *testing.T, s *mdo.Study)
		settings Sextant
		// reference is the reference optimum; NaN when no feasible
		// design is known
		reference float64
		// detail lists words the Result's StopDetail must hold
		detail []string
	}{
		{
			// the start does not analyse (its tail cannot be placed):
			// Sextant stopped after the one evaluation, with nothing
			name: "business jet, start at 80 % of every range", study: businessJetExample,
			edit:      func(t *testing.T, s *mdo.Study) { startAt(s, 0.8, 0.8, 0.8, 0.8) },
			reference: 35166.885,
			detail:    []string{"does not analyse", "htail.volume", "started from"},
		},
		{
			// the optimum has two variables on their lower bounds and
			// the optimality measure counted the Lagrangian's gradient
			// there as a violation when the subproblem's step stopped
			// 1e-9 inside the bound: it ended, not converged, after the
			// gradient sampling, reported as converged
			name: "business jet, start in a corner", study: businessJetExample,
			edit:      func(t *testing.T, s *mdo.Study) { startAt(s, 0.05, 0.05, 0.95, 0.95) },
			reference: 35166.885,
		},
		{
			// the engines are sized for a 1 600 m take-off field, so
			// the field length is flat at 1 600 m where that sizing
			// rules: the start ends at a local minimum of the violation
			// (reported as converged, infeasible); a restart finds the
			// designs whose engines another requirement sizes (the
			// seventh spread point since the Oswald efficiency of swept
			// wings was held at the transport relation, which moved the
			// reference from 8346.1292 to 8330.9275 kg, recomputed by
			// differential evolution and Sextant with 12 starts)
			name: "regional jet, take-off field length limit 16 m shorter", study: regionalJetExample,
			edit:      func(t *testing.T, s *mdo.Study) { moveLimit(t, s, "perf.takeoff_field_length", -16) },
			reference: 8330.9275,
			detail:    []string{"local minimum of the constraint violation", "perf.takeoff_field_length", "restarted from 7 spread points"},
		},
		{
			// no feasible design in the box (the wing area at least
			// 136 m²): the sampled subproblem's interior-point
			// iteration broke down (NaN) and the run returned an error
			// and no result
			name: "business jet, wing area bound moved up", study: businessJetExample,
			edit: func(t *testing.T, s *mdo.Study) {
				d := s.Design[0]
				d.Lower += 0.3 * (d.Upper - d.Lower)
				s.Design[0] = d
			},
			settings:  Sextant{Restarts: -1},
			reference: math.NaN(),
			detail:    []string{"no feasible point found"},
		},
		{
			// no feasible design with a landing field 100 m shorter:
			// the run ended infeasible and said "converged"
			name: "business jet, landing field length limit 100 m shorter", study: businessJetExample,
			edit:      func(t *testing.T, s *mdo.Study) { moveLimit(t, s, "perf.landing_field_length", -100) },
			settings:  Sextant{Restarts: -1},
			reference: math.NaN(),
			detail:    []string{"local minimum of the constraint violation", "perf.landing_field_length", "no feasible point found in"},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := tc.study()
			if err != nil {
				t.Fatal(err)
			}
			tc.edit(t, s)
			res, rep, err := tc.settings.Explore(context.Background(), s)
			if err != nil {
				t.Fatalf("Sextant: %v", err)
			}
			t.Logf("%s after %d evaluations: %.8g (feasible %v); %s", res.Stop, res.Evaluations, res.Objective(), res.Feasible(), res.StopDetail)
			for _, w := range tc.detail {
				if !strings.Contains(res.StopDetail, w) {
					t.Errorf("StopDetail %q does not say %q", res.StopDetail, w)
				}
			}
			if math.IsNaN(tc.reference) {
				if res.Feasible() || res.Stop != mdo.StopStalled {
					t.Errorf("no feasible design is known, yet the result is feasible %v, stopped %v", res.Feasible(), res.Stop)
				}
				return
			}
			if !res.Feasible() || math.Abs(res.Objective()-tc.reference) > 1e-5*tc.reference {
				t.Errorf("objective %.8g (feasible %v), reference %.8g", res.Objective(), res.Feasible(), tc.reference)
			}
			last := rep.Optima[len(rep.Optima)-1]
			if res.Stop != mdo.StopConverged || !last.Converged {
				t.Errorf("stopped %v, converged %v (optimality %.3g, violation %.3g)", res.Stop, last.Converged, last.Optimality, last.Violation)
			}
		})
	}
}
