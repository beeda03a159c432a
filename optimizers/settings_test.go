package optimizers

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"

	"couplet/mdo"
)

// badSetting is a value out of range of a setting: field is its path in
// the method's settings (an embedded block's fields read as the method's
// own, a named block's with its name), allowed words of what is allowed;
// shown is the value as the message gives it when not fmt.Sprint(value);
// only, when set, is the one method the row applies to.
type badSetting struct {
	field   string
	value   any
	allowed string
	shown   string
	only    string
}

// badSettings lists values out of range; each applies to every method
// that has the field.
var badSettings = []badSetting{
	{field: "MaxEvaluations", value: -1, allowed: ">= "},
	{field: "MaxIterations", value: -3, allowed: ">= 1"},
	{field: "SimplexSize", value: 2.0, allowed: "(0, 1]"},
	{field: "Tolerance", value: 2.0, allowed: "(0, 1]"},
	{field: "StallIterations", value: -5, allowed: ">= 1"},
	{field: "StallGenerations", value: -5, allowed: ">= 1"},
	{field: "Penalty.Method", value: PenaltyMethod(7), allowed: "AugmentedLagrangian or QuadraticPenalty", shown: "7"},
	{field: "Penalty.Weight", value: -1.0, allowed: "(0, 1e+12]"},
	{field: "Penalty.Weight", value: 1e10, allowed: "at most MaxWeight (1e+09)"},
	{field: "Penalty.Growth", value: 0.5, allowed: "[1, 1e6]"},
	{field: "Penalty.MaxWeight", value: -1.0, allowed: "(0, 1e+300]"},
	{field: "Penalty.OuterIterations", value: -1, allowed: ">= 1"},
	{field: "Penalty.Tolerance", value: 1.5, allowed: "(0, 1]"},
	{field: "Penalty.ObjectiveScale", value: -2.0, allowed: "must lie in (0, "},
	{field: "Penalty.FailedValue", value: math.NaN(), allowed: "must lie in (0, "},
	{field: "Population", value: 1, allowed: ">= "},
	{field: "StepSize", value: -0.1, allowed: "(0, 10]"},
	{field: "Generations", value: -2, allowed: ">= 1"},
	{field: "GradientRate", value: 1.5, allowed: "at most 1"},
	{field: "Relax", value: 2.0, allowed: "at most 1"},
	{field: "Tournament", value: -1, allowed: ">= 1"},
	{field: "Tournament", value: 200, allowed: "less than Population (120, the default for this study)"},
	{field: "CrossoverRate", value: 1.5, allowed: "[0, 1]"},
	{field: "CrossoverIndex", value: -1.0, allowed: "(0, 1000]"},
	{field: "MutationRate", value: -0.1, allowed: "[0, 1]"},
	{field: "MutationIndex", value: 2000.0, allowed: "(0, 1000]"},
	{field: "Weight", value: 3.0, allowed: "(0, 2]"},
	{field: "Repair", value: Repair(5), allowed: "Clip or Reflect", shown: "5"},
	{field: "Inertia", value: 1.5, allowed: "(0, 1]"},
	{field: "Cognitive", value: 5.0, allowed: "(0, 4]"},
	{field: "Social", value: -1.0, allowed: "(0, 4]"},
	{field: "Samples", value: -5, allowed: ">= 1"},
	{field: "BatchSize", value: -1, allowed: ">= 1"},
	{field: "Levels", value: -1, allowed: ">= 1"},
	{field: "VariableLevels", value: map[string]int{"x": 0}, allowed: ">= 1", shown: "0"},
	{field: "VariableLevels", value: map[string]int{"wing_area": 3}, allowed: "names no design variable of the study; allowed: x, z1, z2", shown: "3"},
	{field: "MaxPoints", value: -1, allowed: ">= 1"},
	{field: "OptimalityTolerance", value: 0.0 - 1, allowed: "(0, 1]"},
	{field: "FeasibilityTolerance", value: 3.0, allowed: "(0, 1]"},
	{field: "Starts", value: -2, allowed: ">= 1"},
	{field: "Parameters", value: []string{"z1"}, allowed: "must name fixed parameters", shown: `"z1"`},
	{field: "InitialSamples", value: 2, allowed: ">= 3"},
	{field: "InitialSamples", value: 100, allowed: "at most MaxEvaluations (60)"},
	{field: "Candidates", value: 5, allowed: ">= 10"},
	// upper limits of the sizes the methods allocate for
	{field: "Population", value: 200_000, allowed: "must be at most 100000: each "},
	{field: "Generations", value: 1_000_000_000, allowed: "must be at most 1e+09 without MaxEvaluations"},
	{field: "Starts", value: 20_000, allowed: "must be at most 10000: the starting points are drawn"},
	{field: "Restarts", value: 20_000, allowed: "must be at most 10000: the restart points are drawn"},
	{field: "Samples", value: 2_000_000, allowed: "must be at most 1000000: every point is drawn"},
	{field: "BatchSize", value: 200_000, allowed: "must be at most 100000: a batch's evaluations"},
	{field: "MaxPoints", value: 2_000_000, allowed: "must be at most 1000000: every point is drawn"},
	{field: "Candidates", value: 2_000_000, allowed: "must be at most 1000000: the candidates"},
	{field: "MaxEvaluations", value: 5000, allowed: "must be at most 2000: the Gaussian processes", only: "ExpectedImprovement"},
}

// anySetting lists the settings every value of which is allowed, and why.
var anySetting = map[string]string{
	"CMAES.GradientSteps": "negative means none, 0 the default, a positive value the steps",
}

// settingMethods is a settings value of every method.
func settingMethods() []Optimizer {
	return []Optimizer{NelderMead{}, CMAES{}, GA{}, DifferentialEvolution{}, ParticleSwarm{}, NSGA2{}, Sextant{}, ExpectedImprovement{},
		RandomDesign{}, LatinHypercube{}, Halton{}, FullFactorial{}}
}

// settingFields lists the paths of a settings struct's fields (as
// badSetting.field).
func settingFields(t reflect.Type, prefix string) []string {
	var out []string
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		switch {
		case !f.IsExported():
		case f.Type.Kind() == reflect.Struct && f.Anonymous:
			out = append(out, settingFields(f.Type, prefix)...)
		case f.Type.Kind() == reflect.Struct:
			out = append(out, settingFields(f.Type, prefix+f.Name+".")...)
		default:
			out = append(out, prefix+f.Name)
		}
	}
	return out
}

// withSetting returns o with the setting at path set to value, and
// whether o has it.
func withSetting(o Optimizer, path string, value any) (Optimizer, bool) {
	v := reflect.New(reflect.TypeOf(o)).Elem()
	v.Set(reflect.ValueOf(o))
	f := v
	for _, name := range strings.Split(path, ".") {
		if f = f.FieldByName(name); !f.IsValid() {
			return nil, false
		}
	}
	f.Set(reflect.ValueOf(value))
	return v.Interface().(Optimizer), true
}

// Every setting of every method that is out of range is refused with an
// error naming the setting (Method.Field), its value and what is allowed;
// the table covers every field of every method (a setting every value of
// which is allowed is listed in anySetting with the reason).
func TestSettingsValidation(t *testing.T) {
	for _, o := range settingMethods() {
		typ := reflect.TypeOf(o)
		covered := map[string]bool{}
		for _, b := range badSettings {
			if b.only != "" && b.only != typ.Name() {
				continue
			}
			bad, ok := withSetting(o, b.field, b.value)
			if !ok {
				continue
			}
			covered[b.field] = true
			setting := typ.Name() + "." + b.field
			t.Run(setting+"="+fmt.Sprint(b.value), func(t *testing.T) {
				s, err := SellarMDF()
				if err != nil {
					t.Fatal(err)
				}
				rec := &beginCounter{}
				s.Recorder = rec
				_, err = bad.Minimize(context.Background(), s)
				if err == nil {
					t.Fatalf("%#v: no error", bad)
				}
				if rec.begun != 0 {
					t.Errorf("the run was begun (its record started) before the refusal %q", err)
				}
				shown := b.shown
				if shown == "" {
					shown = fmt.Sprint(b.value)
				}
				for _, w := range []string{setting, shown, b.allowed} {
					if !strings.Contains(err.Error(), w) {
						t.Errorf("error %q does not say %q", err, w)
					}
				}
			})
		}
		for _, f := range settingFields(typ, "") {
			if _, ok := anySetting[typ.Name()+"."+f]; !covered[f] && !ok {
				t.Errorf("%s.%s: no value out of range in badSettings, nor a reason in anySetting", typ.Name(), f)
			}
		}
	}
	// the map of a full factorial that names several variables: the
	// first bad one in order of the names is reported
	s, err := SellarMDF()
	if err != nil {
		t.Fatal(err)
	}
	_, err = FullFactorial{VariableLevels: map[string]int{"z2": 0, "x": -1, "z1": 0}}.Minimize(context.Background(), s)
	if err == nil || !strings.Contains(err.Error(), "VariableLevels[x] = -1") {
		t.Errorf("error %v, want one naming VariableLevels[x] = -1", err)
	}
}

// beginCounter counts the runs begun on it.
type beginCounter struct{ begun int }

func (b *beginCounter) Begin(mdo.RunInfo) error      { b.begun++; return nil }
func (b *beginCounter) Record(*mdo.Evaluation) error { return nil }
func (b *beginCounter) End(*mdo.Result) error        { return nil }

// wantRefusedUnbegun runs o on s and checks that it is refused with an
// error saying every one of want, before the run's record began.
func wantRefusedUnbegun(t *testing.T, o Optimizer, s *mdo.Study, want []string) {
	t.Helper()
	rec := &beginCounter{}
	s.Recorder = rec
	_, err := o.Minimize(context.Background(), s)
	if err == nil {
		t.Fatal("no error")
	}
	for _, w := range want {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("error %q does not say %q", err, w)
		}
	}
	if rec.begun != 0 {
		t.Errorf("the run was begun %d times before the refusal", rec.begun)
	}
}

// A design of experiments whose points would not fit the limits is
// refused before the run begins (the recorder is not begun), naming the
// levels and their product, or the points, variables and bytes.
func TestDesignSizeRefused(t *testing.T) {
	sellar := func() (*mdo.Study, error) { return SellarMDF() }
	wide := func() (*mdo.Study, error) { return ZDT1(200) }
	tests := []struct {
		name  string
		study func() (*mdo.Study, error)
		o     Optimizer
		want  []string
	}{
		{"levels over MaxPoints", sellar, FullFactorial{Levels: 100, MaxPoints: 1000},
			[]string{"FullFactorial", "levels (x 100, z1 100, z2 100)", "100 × 100 × 100 = 1e+06 points", "more than MaxPoints = 1000"}},
		{"levels over the default MaxPoints", sellar, FullFactorial{VariableLevels: map[string]int{"x": 1000, "z1": 1000}},
			[]string{"levels (x 1000, z1 1000, z2 3)", "1000 × 1000 × 3 = 3e+06 points", "more than MaxPoints = 100000", "at most 1000000"}},
		{"levels whose product overflows", sellar, FullFactorial{Levels: 1 << 30, MaxPoints: 1_000_000},
			[]string{"1073741824 × 1073741824 × 1073741824 = 1.238e+27 points", "more than MaxPoints = 1000000"}},
		{"samples of many variables", wide, LatinHypercube{Samples: 1_000_000},
			[]string{"LatinHypercube", "1000000 points of 200 variables take 1.6 GB", "limit of 1.07 GB", "lower Samples"}},
		{"full factorial of many variables", wide, FullFactorial{Levels: 1, MaxPoints: 1},
			nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := tc.study()
			if err != nil {
				t.Fatal(err)
			}
			if tc.want == nil {
				if _, err := tc.o.Minimize(context.Background(), s); err != nil {
					t.Fatalf("a design within the limits refused: %v", err)
				}
				return
			}
			wantRefusedUnbegun(t, tc.o, s, tc.want)
		})
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

// A method refuses a study it cannot run before anything is recorded:
// the recorder is never begun, so no empty run record is left (before,
// each of these refusals came after the run had begun). The table has a
// row for every method.
func TestRefusedBeforeTheRecord(t *testing.T) {
	wide := func() (*mdo.Study, error) { return Rosenbrock(maxHaltonDim + 1) }
	wideFront := func() (*mdo.Study, error) { return ZDT1(maxHaltonDim + 1) }
	front := func() (*mdo.Study, error) { return ZDT1(3) }
	sellar := func() (*mdo.Study, error) { return SellarMDF() }
	tests := []struct {
		o     Optimizer
		study func() (*mdo.Study, error)
		want  []string
	}{
		{NelderMead{}, integerStudy, []string{"Nelder-Mead works on continuous variables only", "n_engines"}},
		{NelderMead{}, front, []string{"minimises one objective", "has 2", "NSGA2"}},
		{CMAES{}, integerStudy, []string{"continuous variables only", "n_engines"}},
		{CMAES{}, front, []string{"minimises one objective"}},
		{ExpectedImprovement{}, integerStudy, []string{"continuous variables only", "n_engines"}},
		{ExpectedImprovement{}, front, []string{"minimises one objective"}},
		{Sextant{}, integerStudy, []string{"continuous variables only", "n_engines"}},
		{Sextant{}, front, []string{"minimises one objective"}},
		{Sextant{Parameters: []string{"z1"}}, sellar, []string{"Sextant.Parameters = \"z1\"", "must name fixed parameters"}},
		{Sextant{}, wide, []string{"Sextant.Restarts = 0", "Halton sequence", "at most 1000 variables", "the study has 1001", "Restarts = -1"}},
		{Sextant{Restarts: -1, Starts: 3}, wide, []string{"Sextant.Starts = 3", "at most 1000 variables", "the study has 1001"}},
		{GA{}, front, []string{"GA minimises one objective"}},
		{DifferentialEvolution{}, front, []string{"minimises one objective"}},
		{ParticleSwarm{}, front, []string{"minimises one objective"}},
		{NSGA2{Evolution: Evolution{Population: 1}}, front, []string{"NSGA2.Population = 1"}},
		{Halton{}, wideFront, []string{"Halton handles at most 1000 variables", "the study has 1001", "LatinHypercube"}},
		{RandomDesign{Samples: -1}, sellar, []string{"RandomDesign.Samples = -1"}},
		{LatinHypercube{BatchSize: -1}, sellar, []string{"LatinHypercube.BatchSize = -1"}},
		{FullFactorial{VariableLevels: map[string]int{"span": 3}}, sellar, []string{"VariableLevels[span]", "names no design variable"}},
	}
	methods := map[string]bool{}
	for _, tc := range tests {
		methods[reflect.TypeOf(tc.o).Name()] = true
		t.Run(fmt.Sprintf("%s/%s", tc.o.Name(), tc.want[0]), func(t *testing.T) {
			s, err := tc.study()
			if err != nil {
				t.Fatal(err)
			}
			wantRefusedUnbegun(t, tc.o, s, tc.want)
		})
	}
	for _, o := range settingMethods() {
		if !methods[reflect.TypeOf(o).Name()] {
			t.Errorf("%s has no row", reflect.TypeOf(o).Name())
		}
	}
}
