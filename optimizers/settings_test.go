package optimizers

import (
	"context"
	"errors"
	"strings"
	"testing"

	"couplet/mdo"
)

// Bad settings are errors naming the setting, its value and what is allowed.
func TestSettingsValidation(t *testing.T) {
	cases := []struct {
		opt  Optimizer
		want []string
	}{
		{NelderMead{MaxEvaluations: -1}, []string{"NelderMead.MaxEvaluations", "-1", ">= 1"}},
		{NelderMead{SimplexSize: 2}, []string{"NelderMead.SimplexSize", "2", "(0, 1]"}},
		{NelderMead{Penalty: Penalty{Growth: 0.5}}, []string{"NelderMead.Penalty.Growth", "0.5", "[1, 1e6]"}},
		{NelderMead{Penalty: Penalty{Method: 7}}, []string{"NelderMead.Penalty.Method", "7", "AugmentedLagrangian or QuadraticPenalty"}},
		{CMAES{Population: 1}, []string{"CMAES.Population", "1", ">= 2"}},
		{CMAES{StepSize: -0.1}, []string{"CMAES.StepSize", "-0.1"}},
		{GA{Evolution: Evolution{Population: 3}}, []string{"GA.Population", "3", ">= 4"}},
		{GA{Variation: Variation{CrossoverRate: 1.5}}, []string{"GA.CrossoverRate", "1.5", "[0, 1]"}},
		{GA{Evolution: Evolution{Population: 10}, Tournament: 10}, []string{"GA.Tournament", "10", "less than Population"}},
		{GA{EqualityHandling: EqualityHandling{Relax: 2}}, []string{"GA.Relax", "2", "at most 1"}},
		{DifferentialEvolution{Weight: 3}, []string{"DifferentialEvolution.Weight", "3", "(0, 2]"}},
		{DifferentialEvolution{Repair: 5}, []string{"DifferentialEvolution.Repair", "5", "Clip or Reflect"}},
		{ParticleSwarm{Inertia: 1.5}, []string{"ParticleSwarm.Inertia", "1.5"}},
		{NSGA2{Evolution: Evolution{Generations: -2}}, []string{"NSGA2.Generations", "-2"}},
		{NSGA2{Variation: Variation{MutationRate: -0.1}}, []string{"NSGA2.MutationRate", "-0.1"}},
		{RandomDesign{Samples: -5}, []string{"RandomDesign.Samples", "-5"}},
		{LatinHypercube{BatchSize: -1}, []string{"LatinHypercube.BatchSize", "-1"}},
		{FullFactorial{VariableLevels: map[string]int{"x": 0}}, []string{"FullFactorial.VariableLevels[x]", "0", ">= 1"}},
		{FullFactorial{Levels: 100, MaxPoints: 1000}, []string{"FullFactorial", "MaxPoints"}},
	}
	for _, c := range cases {
		s, err := SellarMDF()
		if err != nil {
			t.Fatal(err)
		}
		_, err = c.opt.Minimize(context.Background(), s)
		if err == nil {
			t.Errorf("%#v: no error", c.opt)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%#v: error %q does not mention %q", c.opt, err, w)
			}
		}
	}
}

// integerStudy is Sellar with an added integer parameter as a design
// variable.
func integerStudy() (*mdo.Study, error) {
	sys, err := mdo.NewSystem(append(mdo.Sellar(), mdo.FuncVars("count", []mdo.Var{{Name: "n_engines", Default: 2, Min: 1, Max: 4}}, []mdo.Var{{Name: "engine_term"}},
		func(in, out []float64) error { out[0] = 0.01 * in[0]; return nil }))...)
	if err != nil {
		return nil, err
	}
	return &mdo.Study{
		Name:   "sellar with engines",
		System: sys,
		Design: []mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10), mdo.Integer("n_engines", 1, 4)},
		Objectives: []mdo.Objective{mdo.MinimizeFunc("f_plus", func(v mdo.Values) float64 {
			return v.Get("f") + v.Get("engine_term")
		})},
		Constraints: []mdo.Constraint{mdo.AtLeast("g1", 3.16), mdo.AtMost("g2", 24)},
	}, nil
}

// Nelder–Mead and CMA-ES refuse integer design variables with a message
// naming the variable; the evolutionary methods and designs handle them.
func TestIntegerVariables(t *testing.T) {
	for _, o := range []Optimizer{NelderMead{}, CMAES{}} {
		s, err := integerStudy()
		if err != nil {
			t.Fatal(err)
		}
		_, err = o.Minimize(context.Background(), s)
		if err == nil || !strings.Contains(err.Error(), "n_engines") || !strings.Contains(err.Error(), "integer") {
			t.Errorf("%s: error %v, want a refusal naming the integer variable n_engines", o.Name(), err)
		}
	}
	for _, o := range []Optimizer{GA{Evolution: Evolution{Population: 20, Generations: 10}}, DifferentialEvolution{Evolution: Evolution{Population: 20, Generations: 10}},
		ParticleSwarm{Evolution: Evolution{Population: 20, Generations: 10}}, NSGA2{Evolution: Evolution{Population: 20, Generations: 10}}, LatinHypercube{Samples: 30}, FullFactorial{}} {
		s, err := integerStudy()
		if err != nil {
			t.Fatal(err)
		}
		res, err := o.Minimize(context.Background(), s)
		if err != nil {
			t.Fatalf("%s: %v", o.Name(), err)
		}
		n := res.DesignValues()["n_engines"]
		if n != float64(int(n)) || n < 1 || n > 4 {
			t.Errorf("%s: n_engines = %g, want a whole number in [1, 4]", o.Name(), n)
		}
	}
}

// Single-objective methods refuse several objectives.
func TestMultiObjectiveRefused(t *testing.T) {
	for _, o := range []Optimizer{NelderMead{}, CMAES{}, GA{}, DifferentialEvolution{}, ParticleSwarm{}} {
		s, err := ZDT1(3)
		if err != nil {
			t.Fatal(err)
		}
		_, err = o.Minimize(context.Background(), s)
		if err == nil || !strings.Contains(err.Error(), "2 (") || !strings.Contains(err.Error(), "NSGA2") {
			t.Errorf("%s: error %v, want a refusal pointing to NSGA2", o.Name(), err)
		}
	}
}

// A nil study and a study that does not validate are errors.
func TestBadStudy(t *testing.T) {
	for _, o := range allOptimizers() {
		if _, err := o.Minimize(context.Background(), nil); err == nil {
			t.Errorf("%s: nil study gave no error", o.Name())
		}
		s, err := SellarMDF()
		if err != nil {
			t.Fatal(err)
		}
		s.Design = append(s.Design, mdo.Continuous("no_such_variable", 0, 1))
		if _, err := o.Minimize(context.Background(), s); err == nil || !strings.Contains(err.Error(), "no_such_variable") {
			t.Errorf("%s: error %v, want one naming no_such_variable", o.Name(), err)
		}
	}
}

// The settings are recorded field by field; the fields of an embedded
// settings block read as the method's own, a named block's with its name.
func TestSettingsMap(t *testing.T) {
	tests := []struct {
		name     string
		settings any
		want     map[string]string
	}{
		{"named block", NelderMead{MaxEvaluations: 10, Penalty: Penalty{Weight: 5}}, map[string]string{"MaxEvaluations": "10", "Penalty.Weight": "5"}},
		{"embedded blocks", GA{Evolution: Evolution{Population: 30, MaxEvaluations: 900}, EqualityHandling: EqualityHandling{Relax: -1}, Tournament: 3},
			map[string]string{"Population": "30", "Generations": "0", "MaxEvaluations": "900", "Relax": "-1", "GradientRate": "0", "Tournament": "3"}},
	}
	for _, tc := range tests {
		m := settingsMap(tc.settings)
		for k, v := range tc.want {
			if m[k] != v {
				t.Errorf("%s: settings[%q] = %q, want %q (map %v)", tc.name, k, m[k], v, m)
			}
		}
		for k := range m {
			if strings.HasPrefix(k, "Evolution.") || strings.HasPrefix(k, "EqualityHandling.") {
				t.Errorf("%s: settings key %q names the embedded block", tc.name, k)
			}
		}
	}
}

// failingRecorder fails on the n-th record.
type failingRecorder struct{ n int }

func (f *failingRecorder) Begin(mdo.RunInfo) error { return nil }
func (f *failingRecorder) Record(*mdo.Evaluation) error {
	f.n--
	if f.n == 0 {
		return errRecorder
	}
	return nil
}
func (f *failingRecorder) End(*mdo.Result) error { return nil }

var errRecorder = errors.New("disk full")

// A failing recorder stops the run with an error wrapping the recorder's,
// and the result so far.
func TestRecorderFailure(t *testing.T) {
	for _, o := range allOptimizers() {
		s, err := SellarMDF()
		if err != nil {
			t.Fatal(err)
		}
		s.Recorder = &failingRecorder{n: 5}
		res, err := o.Minimize(context.Background(), s)
		if !errors.Is(err, errRecorder) {
			t.Errorf("%s: error %v, want one wrapping %v", o.Name(), err, errRecorder)
		}
		if res == nil {
			t.Errorf("%s: no result with the recorder error", o.Name())
		}
	}
}
