package surrogate_test

import (
	"context"
	"math"
	"reflect"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/optimizers/surrogate"
)

// Every field of Fit out of range, Samples too few or too many for the
// memory of the model, is refused before any sample is analysed, with an
// error naming Fit.Field, its value and what is allowed; every field has
// a row (Seed takes any value).
func TestFitSettingsTable(t *testing.T) {
	rows := []struct {
		field string
		fit   surrogate.Fit
		want  []string
	}{
		{"Samples", surrogate.Fit{Samples: 3}, []string{"Fit.Samples = 3", "need at least 4 for 2 sampled inputs"}},
		{"Samples", surrogate.Fit{Samples: -5}, []string{"Fit.Samples = -5", "need at least 4"}},
		{"Samples", surrogate.Fit{Samples: 100_000}, []string{"Fit.Samples = 100000", "allowed at most 8189 for 2 sampled inputs and 1 outputs with cubic radial-basis function", "160 GB, more than the limit of 1.07 GB"}},
		{"Samples", surrogate.Fit{Samples: 10_000, Model: surrogate.Kriging}, []string{"Fit.Samples = 10000", "allowed at most 6688 for 2 sampled inputs and 1 outputs with Kriging", "2.4 GB"}},
		{"Ranges", surrogate.Fit{Ranges: map[string][2]float64{"q": {0, 1}}}, []string{`Fit.Ranges names "q"`, "no input of it"}},
		{"Ranges", surrogate.Fit{Ranges: map[string][2]float64{"a": {math.NaN(), 1}}}, []string{"the sampled range of a is [NaN, 1]", "allowed a finite interval with lower ≤ upper"}},
		{"Ranges", surrogate.Fit{Ranges: map[string][2]float64{"a": {-1, 1}}}, []string{"Fit.Ranges gives a the interval [-1, 1]", "not inside its validity range [0, 1]"}},
		{"Model", surrogate.Fit{Model: surrogate.Kind(7)}, []string{"Fit.Model = Kind(7)", "allowed CubicRBF or Kriging"}},
	}
	anyValue := map[string]string{"Seed": "any seed draws a valid sample"}
	covered := map[string]bool{}
	for _, r := range rows {
		covered[r.field] = true
		t.Run(r.want[0], func(t *testing.T) {
			calls := 0
			d := mdo.FuncVars("plane", []mdo.Var{{Name: "a", Min: 0, Max: 1}, {Name: "b", Min: 0, Max: 1}}, []mdo.Var{{Name: "c"}},
				func(in, out []float64) error { calls++; out[0] = in[0] + in[1]; return nil })
			_, err := surrogate.FitDiscipline(context.Background(), d, r.fit)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range append([]string{"FitDiscipline(plane)"}, r.want...) {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
			if calls != 0 {
				t.Errorf("%d samples analysed before the refusal", calls)
			}
		})
	}
	typ := reflect.TypeOf(surrogate.Fit{})
	for i := 0; i < typ.NumField(); i++ {
		if f := typ.Field(i).Name; !covered[f] && anyValue[f] == "" {
			t.Errorf("Fit.%s: no value out of range in the table, nor a reason it takes any value", f)
		}
	}
	// a stand-in for a study refuses the same before its first analysis
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	_, err = surrogate.StandIn(context.Background(), st, surrogate.Fit{Model: surrogate.Kind(7)})
	if err == nil || !strings.Contains(err.Error(), "StandIn(sellar): Fit.Model = Kind(7), allowed CubicRBF or Kriging") {
		t.Errorf("error %v, want one naming Fit.Model = Kind(7)", err)
	}
}
