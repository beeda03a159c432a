package optimizers

import (
	"context"
	"fmt"
	"math"
	"testing"

	"couplet/mdo"
)

// integerFront is a two-objective study on the 21³ integer points
// x1, x2, x3 ∈ {0, …, 20}: f1 = x1, f2 = (20 − x1) + (x2 − 10)² + (x3 − 10)²
// (a test problem of our own).
func integerFront() (*mdo.Study, error) {
	s, _, err := funcStudy("integer_front", []float64{0, 0, 0}, []float64{20, 20, 20}, []string{"f1", "f2"},
		func(in, out []float64) error {
			out[0] = in[0]
			out[1] = (20 - in[0]) + (in[1]-10)*(in[1]-10) + (in[2]-10)*(in[2]-10)
			return nil
		})
	if err != nil {
		return nil, err
	}
	for k := range s.Design {
		s.Design[k].Integer = true
	}
	s.Objectives = []mdo.Objective{mdo.Minimize("f1"), mdo.Minimize("f2")}
	return s, nil
}

// The evolutionary methods send only points they have not asked for
// before: on problems with integer variables, and in runs long enough for
// the population to collapse, every point asked for is analysed, so the
// evaluations are the population times the generations plus one, with no
// repeat. Before the rule, these runs asked for the repeats given beside
// each row (measured with seed 1 on the code before the rule, whose
// default populations and generations the rows set). A row with
// repairs counts the gradient-based mutation's points on top (its steps
// to a point asked for before are not taken): every point is analysed,
// none is a repeat.
func TestEvolutionAsksOnlyNewPoints(t *testing.T) {
	tests := []struct {
		name  string
		study func() (*mdo.Study, error)
		opt   Optimizer
		n, g  int
		// repairs: the gradient-based mutation adds evaluations
		repairs bool
	}{
		// before: 2 678 repeats of 16 080 points asked for
		{"GA/pressure vessel", PressureVessel, GA{Evolution: Evolution{Population: 80, Generations: 200}}, 80, 200, false},
		// before: 23 repeats of 8 040
		{"DE/pressure vessel", PressureVessel, DifferentialEvolution{}, 40, 200, false},
		// before: 4 397 repeats of 24 040
		{"PSO/pressure vessel, 600 generations", PressureVessel, ParticleSwarm{Evolution: Evolution{Population: 40, Generations: 600}}, 40, 600, false},
		// before: 984 repeats of 16 080 (the gradient-based mutation off,
		// as it was then in a study with inequalities only)
		{"GA/welded beam", WeldedBeam, GA{Evolution: Evolution{Population: 80, Generations: 200}, EqualityHandling: EqualityHandling{GradientRate: -1}}, 80, 200, false},
		// with it: 1–6 repeats a run before its steps to points asked
		// for were dropped (seeds 1–8)
		{"GA/welded beam, gradient-based mutation", WeldedBeam, GA{Evolution: Evolution{Population: 80, Generations: 200}}, 80, 200, true},
		// the swarm's repairs count in its budget (no equality
		// constraint): exactly the population times the generations plus
		// one
		{"PSO/welded beam, gradient-based mutation", WeldedBeam, ParticleSwarm{}, 80, 100, false},
		// before: 402 repeats of 620
		{"NSGA-II/integer front", integerFront, NSGA2{Evolution: Evolution{Population: 20, Generations: 30}}, 20, 30, false},
		// before: 500 repeats of 620
		{"GA/Sellar on integers", func() (*mdo.Study, error) {
			s, err := SellarMDF()
			if err == nil {
				for k := range s.Design {
					s.Design[k].Integer = true
				}
			}
			return s, err
		}, GA{Evolution: Evolution{Population: 20, Generations: 30}}, 20, 30, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := tc.study()
			if err != nil {
				t.Fatal(err)
			}
			s.Seed = 1
			res, err := tc.opt.Minimize(context.Background(), s)
			if err != nil {
				t.Fatal(err)
			}
			want := tc.n * (tc.g + 1)
			if tc.repairs && res.Evaluations > want {
				want = res.Evaluations
			}
			if res.Repeats != 0 || res.Evaluations != want || res.Analyses != want {
				t.Errorf("%v; want %d evaluations, all analysed, and no repeat", res.EvalCounters, want)
			}
		})
	}
}

// A repeated candidate is moved: an integer coordinate by at least one
// whole step (inwards at a bound), a continuous one off its value.
func TestFreshPointsMoveRepeats(t *testing.T) {
	tests := []struct {
		name    string
		lo, hi  float64
		integer bool
		u       float64
	}{
		{"integer inside", 0, 10, true, 0.5},
		{"integer at the lower bound", 0, 10, true, 0},
		{"integer at the upper bound", 0, 10, true, 1},
		{"integer, two values", 0, 1, true, 0},
		{"integer, many values", -500, 500, true, 0.5004},
		{"continuous inside", -1, 3, false, 0.3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _, err := funcStudy("one", []float64{tc.lo}, []float64{tc.hi}, []string{"f"},
				func(in, out []float64) error { out[0] = in[0]; return nil })
			if err != nil {
				t.Fatal(err)
			}
			s.Design[0].Integer = tc.integer
			s.Objectives = []mdo.Objective{mdo.Minimize("f")}
			ev, err := s.NewEvaluator()
			if err != nil {
				t.Fatal(err)
			}
			f := newFreshPoints(ev, 7)
			p0 := ev.ToPhysical([]float64{tc.u})[0]
			for i := 0; i < 200; i++ {
				x := []float64{tc.u}
				f.nudge(x)
				p := ev.ToPhysical(x)[0]
				if tc.integer && math.Abs(p-p0) < 1 || !tc.integer && p == p0 {
					t.Fatalf("draw %d: %g moved to %g", i, p0, p)
				}
			}
		})
	}
}

// A point not asked for before is kept as it is and draws no random
// number, so a run without repeats is the run it was before the rule.
func TestFreshPointsKeepNewOnes(t *testing.T) {
	s, err := PressureVessel()
	if err != nil {
		t.Fatal(err)
	}
	s.Seed = 3
	ev, err := s.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	f := newFreshPoints(ev, 11)
	pts := [][]float64{{0, 0, 0, 0}, {0.5, 0.5, 0.5, 0.5}, {0.5, 0.5, 0.5, 0.6}, {1, 1, 1, 1}}
	for _, x := range pts {
		y := append([]float64(nil), x...)
		if f.fresh(y) || !equalBits(x, y) {
			t.Fatalf("new point %v moved to %v", x, y)
		}
	}
	if got, want := f.rng.Int63(), newRand(3, 11).Int63(); got != want {
		t.Errorf("the moves' random stream was drawn from for new points")
	}
	// the same points again (the first one a different unit point of the
	// same integer cell) are moved, each to a point of its own
	again := [][]float64{{0.001, 0, 0, 0}, {0.5, 0.5, 0.5, 0.5}, {0.5, 0.5, 0.5, 0.6}, {1, 1, 1, 1}}
	// compared by their physical values' bits, not by the set's digests
	key := func(x []float64) string { return fmt.Sprint(bitsOf(ev.ToPhysical(x))) }
	seen := map[string]bool{}
	for _, x := range pts {
		seen[key(x)] = true
	}
	for _, x := range again {
		if !f.fresh(x) {
			t.Fatalf("repeat %v was not moved", x)
		}
		if seen[key(x)] {
			t.Fatalf("repeat moved onto a point asked for before: %v", x)
		}
		seen[key(x)] = true
	}
	if f.moved != len(again) {
		t.Errorf("moved = %d, want %d", f.moved, len(again))
	}
}

// bitsOf returns the bits of each value.
func bitsOf(v []float64) []uint64 {
	out := make([]uint64, len(v))
	for k, x := range v {
		out[k] = math.Float64bits(x)
	}
	return out
}

// equalBits reports whether two vectors are equal bit for bit.
func equalBits(a, b []float64) bool {
	for k := range a {
		if math.Float64bits(a[k]) != math.Float64bits(b[k]) {
			return false
		}
	}
	return len(a) == len(b)
}
