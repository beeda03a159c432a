package surrogate_test

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/store"
	"couplet/optimizers"
	"couplet/optimizers/surrogate"
)

// The Sellar optimum (Sellar, Batill & Renaud, AIAA 96-0714, 1996):
// f = 3.18339 at z = (1.97764, 0), x = 0.
const sellarOptimum = 3.18339

// sellar2StandIn fits a Kriging stand-in for Sellar's second discipline,
// y2 = sqrt(y1) + z1 + z2, over the part of its inputs the optimisation
// sees.
func sellar2StandIn(t *testing.T) *surrogate.Discipline {
	t.Helper()
	d2 := mdo.Sellar()[1]
	sd, err := surrogate.FitDiscipline(context.Background(), d2, surrogate.Fit{Samples: 40, Seed: 2, Model: surrogate.Kriging,
		Ranges: map[string][2]float64{"y1": {1, 40}, "z1": {-2, 10}}})
	if err != nil {
		t.Fatal(err)
	}
	return sd
}

// TestDisciplineStandIn replaces Sellar's second discipline by its
// stand-in: same name and variables, estimates close to the true
// discipline, no allocation; the optimum found on it is near the
// published one, and the result, its summary and its report say which
// numbers came from the surrogate; the true analysis of that design
// confirms it.
func TestDisciplineStandIn(t *testing.T) {
	sd := sellar2StandIn(t)
	d2 := mdo.Sellar()[1]
	if sd.Name() != d2.Name() || !slices.Equal(sd.Outputs(), d2.Outputs()) || len(sd.Inputs()) != len(d2.Inputs()) {
		t.Fatalf("stand-in %s %v → %v, true %s %v → %v", sd.Name(), sd.Inputs(), sd.Outputs(), d2.Name(), d2.Inputs(), d2.Outputs())
	}
	// the same variables, the sampled inputs' ranges narrowed to the
	// intervals sampled (y1 and z1 by Fit.Ranges, z2 over its validity range)
	sampled := map[string][2]float64{"y1": {1, 40}, "z1": {-2, 10}, "z2": {0, 10}}
	for k, v := range sd.Inputs() {
		tv := d2.Inputs()[k]
		if v.Name != tv.Name || v.Unit != tv.Unit || v.Default != tv.Default {
			t.Errorf("input %d: stand-in %+v, true %+v", k, v, tv)
		}
		if r := sampled[v.Name]; v.Min != r[0] || v.Max != r[1] {
			t.Errorf("input %s: stand-in range [%g, %g], want the sampled [%g, %g]", v.Name, v.Min, v.Max, r[0], r[1])
		}
	}
	var worst float64
	out, want := make([]float64, 1), make([]float64, 1)
	for _, in := range [][]float64{{3.16, 1.97764, 0}, {5, 0, 2}, {20, 4, 6}, {2, -1, 1}, {35, 9, 9}} {
		if err := sd.Compute(in, out); err != nil {
			t.Fatal(err)
		}
		if err := d2.Compute(in, want); err != nil {
			t.Fatal(err)
		}
		worst = math.Max(worst, math.Abs(out[0]-want[0]))
	}
	// common practice (no source): Kriging of a smooth function of three
	// inputs from 40 samples is good to a few hundredths
	if worst > 0.05 {
		t.Errorf("stand-in's largest error %.4f, want below 0.05", worst)
	}
	in := []float64{5, 1, 2}
	if a := testing.AllocsPerRun(100, func() { _ = sd.Compute(in, out) }); a != 0 {
		t.Errorf("Compute allocates %v times", a)
	}
	if !strings.Contains(sd.Surrogate(), "40 samples of sellar2 (0 refused)") || !strings.Contains(sd.Surrogate(), "y1 in [1, 40]") {
		t.Errorf("description %q", sd.Surrogate())
	}

	ds := mdo.Sellar()
	sys, err := mdo.NewSystem(ds[0], sd, ds[2])
	if err != nil {
		t.Fatal(err)
	}
	study, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	truth := *study
	study.System = sys
	res, err := optimizers.NelderMead{}.Minimize(context.Background(), study)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.Objective()-sellarOptimum) > 0.02 {
		t.Errorf("optimum on the stand-in %.5f, published %.5f", res.Objective(), sellarOptimum)
	}
	if len(res.Surrogates) != 1 {
		t.Fatalf("surrogates %v", res.Surrogates)
	}
	u := res.Surrogates[0]
	// y1 depends on y2 through the coupling, f on both
	if u.Discipline != "sellar2" || !slices.Equal(u.Outputs, []string{"y2"}) || !slices.Equal(u.Affects, []string{"f", "g1", "g2"}) {
		t.Errorf("surrogate use %+v", u)
	}
	if text := res.String(); !strings.Contains(text, `SURROGATE: the values of y2 from discipline "sellar2" are estimates of a surrogate model (Kriging (Gaussian process) fitted to 40 samples`) ||
		!strings.Contains(text, "so are those of f, g1, g2") || !strings.Contains(text, mdo.SurrogateCaution) {
		t.Errorf("the result's text does not say what came from the surrogate:\n%s", text)
	}
	b, err := json.Marshal(store.NewSummary(res, store.SummaryOptions{}))
	if err != nil {
		t.Fatal(err)
	}
	var sum struct {
		Surrogates []store.SummarySurrogate `json:"surrogates"`
	}
	if err := json.Unmarshal(b, &sum); err != nil || len(sum.Surrogates) != 1 || sum.Surrogates[0].Discipline != "sellar2" || !slices.Equal(sum.Surrogates[0].Affects, []string{"f", "g1", "g2"}) {
		t.Errorf("summary.json surrogates %s (%v)", b, err)
	}
	var page bytes.Buffer
	if err := report.Write(&page, res, report.Options{}); err != nil {
		t.Fatal(err)
	}
	if html := page.String(); !strings.Contains(html, "Numbers from surrogate models") || !strings.Contains(html, "the values of y2 from discipline &#34;sellar2&#34; are estimates") {
		t.Error("the report does not say which numbers came from the surrogate")
	}
	conf, err := surrogate.Confirm(context.Background(), &truth, res)
	if err != nil {
		t.Fatal(err)
	}
	if len(conf.Surrogates) != 0 || conf.Evaluations != 1 || math.Abs(conf.Objective()-res.Objective()) > 0.02 {
		t.Errorf("confirmed %.5f in %d evaluations (surrogates %v), stand-in %.5f", conf.Objective(), conf.Evaluations, conf.Surrogates, res.Objective())
	}
	t.Logf("stand-in optimum %.5f at %v; true analysis %.5f (feasible %v)", res.Objective(), res.Best.Design, conf.Objective(), conf.Feasible())
}

// TestStudyStandIn searches a stand-in for the whole Sellar analysis and
// confirms its best design with the true analysis.
func TestStudyStandIn(t *testing.T) {
	study, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	study.Seed = 3
	st, err := surrogate.StandIn(context.Background(), study, surrogate.Fit{Samples: 40, Seed: 5, Model: surrogate.Kriging,
		Ranges: map[string][2]float64{"x": {0, 4}, "z1": {0, 6}, "z2": {0, 4}}})
	if err != nil {
		t.Fatal(err)
	}
	if st.Name != "sellar_surrogate" || len(st.System.Disciplines()) != 1 {
		t.Fatalf("stand-in study %s with %d disciplines", st.Name, len(st.System.Disciplines()))
	}
	res, err := optimizers.NelderMead{}.Minimize(context.Background(), st)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Surrogates) != 1 || !slices.Equal(res.Surrogates[0].Affects, []string{"f", "g1", "g2"}) || !strings.Contains(res.Surrogates[0].Model, "40 converged of 40 true analyses of study sellar") {
		t.Errorf("surrogates %+v", res.Surrogates)
	}
	conf, err := surrogate.Confirm(context.Background(), study, res)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("stand-in optimum %.5f at %v; true analysis %.5f (feasible %v, margins %v)", res.Objective(), res.Best.Design, conf.Objective(), conf.Feasible(), conf.Best.Margins)
	if math.Abs(conf.Objective()-sellarOptimum) > 0.05 {
		t.Errorf("true objective at the stand-in's optimum %.5f, published optimum %.5f", conf.Objective(), sellarOptimum)
	}
}

func TestStandInBadInput(t *testing.T) {
	d2 := mdo.Sellar()[1]
	idf, err := mdo.SellarStudy(mdo.IDF)
	if err != nil {
		t.Fatal(err)
	}
	unbounded := mdo.Func("free", []string{"a"}, []string{"b"}, func(in, out []float64) error { out[0] = in[0]; return nil })
	tests := []struct {
		run  func() error
		want string
	}{
		{func() error {
			_, err := surrogate.FitDiscipline(context.Background(), d2, surrogate.Fit{Ranges: map[string][2]float64{"y9": {0, 1}}})
			return err
		}, `Fit.Ranges names "y9"`},
		{func() error {
			_, err := surrogate.FitDiscipline(context.Background(), d2, surrogate.Fit{Ranges: map[string][2]float64{"y1": {3, 1}}})
			return err
		}, "the sampled range of y1 is [3, 1]"},
		{func() error {
			_, err := surrogate.FitDiscipline(context.Background(), unbounded, surrogate.Fit{})
			return err
		}, "input a has no finite validity range"},
		{func() error {
			_, err := surrogate.FitDiscipline(context.Background(), d2, surrogate.Fit{Samples: 3})
			return err
		}, "Fit.Samples = 3, need at least 5"},
		{func() error {
			_, err := surrogate.StandIn(context.Background(), idf, surrogate.Fit{})
			return err
		}, "allowed MDF"},
		{func() error {
			_, err := surrogate.FitDiscipline(context.Background(), d2, surrogate.Fit{Ranges: map[string][2]float64{"z1": {-20, 5}}})
			return err
		}, "Fit.Ranges gives z1 the interval [-20, 5], not inside its validity range [-10, 10]"},
		{func() error {
			mdf, err := mdo.SellarStudy(mdo.MDF)
			if err != nil {
				return err
			}
			_, err = surrogate.StandIn(context.Background(), mdf, surrogate.Fit{Ranges: map[string][2]float64{"x": {0, 12}}})
			return err
		}, "Fit.Ranges gives x the interval [0, 12], not inside its design bounds [0, 10]"},
	}
	for _, tc := range tests {
		if err := tc.run(); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want one naming %s", err, tc.want)
		}
	}
}

// TestRBFStandInReproducesALinearDiscipline: the cubic interpolant has a
// linear tail, so a linear discipline is reproduced to rounding (Powell
// 1992), an input held at one value is no coordinate, and Compute
// allocates nothing.
func TestRBFStandInReproducesALinearDiscipline(t *testing.T) {
	lin := mdo.FuncVars("linear", []mdo.Var{{Name: "a", Unit: "m", Min: 0, Max: 2}, {Name: "b", Min: -1, Max: 1}, {Name: "c", Min: 0, Max: 9}},
		[]mdo.Var{{Name: "y", Unit: "m"}}, func(in, out []float64) error {
			out[0] = 2*in[0] + 3*in[1] - 1 + 0*in[2]
			return nil
		})
	sd, err := surrogate.FitDiscipline(context.Background(), lin, surrogate.Fit{Seed: 1, Ranges: map[string][2]float64{"c": {4, 4}}})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(sd.Surrogate(), "cubic radial-basis function fitted to 30 samples of linear") || !strings.Contains(sd.Surrogate(), "c held at 4") {
		t.Errorf("description %q", sd.Surrogate())
	}
	out := make([]float64, 1)
	for _, in := range [][]float64{{0, 0, 4}, {1.5, -0.5, 4}, {2, 1, 4}} {
		if err := sd.Compute(in, out); err != nil {
			t.Fatal(err)
		}
		if want := 2*in[0] + 3*in[1] - 1; math.Abs(out[0]-want) > 1e-9 {
			t.Errorf("y%v = %.12g, want %g", in, out[0], want)
		}
	}
	in := []float64{1, 0.2, 4}
	if a := testing.AllocsPerRun(100, func() { _ = sd.Compute(in, out) }); a != 0 {
		t.Errorf("Compute allocates %v times", a)
	}
}

// TestStandInIsNotAskedBeyondItsSamples: a stand-in answers inside the
// interval it was sampled over and nowhere else. A discipline's
// stand-in refuses an input beyond its samples as an invalid input
// naming the variable, its value and the sampled interval (it
// extrapolated before), and a study's stand-in searches only the
// sampled box.
func TestStandInIsNotAskedBeyondItsSamples(t *testing.T) {
	lin := mdo.FuncVars("linear", []mdo.Var{{Name: "a", Unit: "m", Min: 0, Max: 2}, {Name: "b", Min: -1, Max: 1}},
		[]mdo.Var{{Name: "y", Unit: "m", Min: -100, Max: 100}}, func(in, out []float64) error {
			out[0] = 2*in[0] + 3*in[1] - 1
			return nil
		})
	sd, err := surrogate.FitDiscipline(context.Background(), lin, surrogate.Fit{Seed: 1, Ranges: map[string][2]float64{"a": {0, 1}}})
	if err != nil {
		t.Fatal(err)
	}
	sys, err := mdo.NewSystem(sd)
	if err != nil {
		t.Fatal(err)
	}
	w := sys.NewWorkspace()
	for _, tc := range []struct {
		a, b float64
		want string // "" when the stand-in answers
	}{
		{0.5, 0.5, ""},
		{1, -1, ""},
		{1.5, 0, "a = 1.5 m is outside its validity range [0, 1]"},
		{0.5, 1.5, "b = 1.5 is outside its validity range [-1, 1]"},
	} {
		// the workspace refuses the value as it is set, or the analysis does
		err := errors.Join(w.Set("a", tc.a), w.Set("b", tc.b))
		if err == nil {
			err = w.Analyze(context.Background())
		}
		var re *mdo.RangeError
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("a = %g, b = %g: %v", tc.a, tc.b, err)
		case tc.want == "" && math.Abs(w.Get("y")-(2*tc.a+3*tc.b-1)) > 1e-9:
			t.Errorf("a = %g, b = %g: y = %.12g, want %g", tc.a, tc.b, w.Get("y"), 2*tc.a+3*tc.b-1)
		case tc.want != "" && (!errors.As(err, &re) || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("a = %g, b = %g: error %v, want a *mdo.RangeError saying %q", tc.a, tc.b, err, tc.want)
		}
	}

	study, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st, err := surrogate.StandIn(context.Background(), study, surrogate.Fit{Samples: 30, Seed: 5, Ranges: map[string][2]float64{"x": {0, 4}, "z1": {1, 3}}})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][2]float64{"x": {0, 4}, "z1": {1, 3}, "z2": {0, 10}}
	for _, d := range st.Design {
		if r := want[d.Name]; d.Lower != r[0] || d.Upper != r[1] {
			t.Errorf("stand-in study's bounds of %s [%g, %g], want the sampled [%g, %g]", d.Name, d.Lower, d.Upper, r[0], r[1])
		}
	}
}
