package optimizers

import (
	"context"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"
)

// badFitSettings lists a value out of range of every LeastSquares
// setting, with words of what is allowed.
var badFitSettings = []badSetting{
	{field: "MaxIterations", value: -1, allowed: "must be >= 1"},
	{field: "MaxEvaluations", value: -100, allowed: "must be >= 1"},
	{field: "FTol", value: -1.0, allowed: "must lie in (0, 1]"},
	{field: "FTol", value: math.NaN(), allowed: "must lie in (0, 1]"},
	{field: "XTol", value: 2.0, allowed: "must lie in (0, 1]"},
	{field: "GTol", value: math.Inf(1), allowed: "must lie in (0, 1]"},
	{field: "Step", value: 1.5, allowed: "must lie in (0, 1]"},
	{field: "RankTol", value: -1e-8, allowed: "must lie in (0, 1]"},
}

// Every LeastSquares setting out of range is refused before Predict is
// called, with an error naming LeastSquares.Field, its value and what is
// allowed; every field has a row.
func TestLeastSquaresSettingsValidation(t *testing.T) {
	covered := map[string]bool{}
	for _, b := range badFitSettings {
		covered[b.field] = true
		t.Run(b.field+"="+fmt.Sprint(b.value), func(t *testing.T) {
			var o LeastSquares
			reflect.ValueOf(&o).Elem().FieldByName(b.field).Set(reflect.ValueOf(b.value))
			calls := 0
			pr := FitProblem{Names: []string{"a"}, Start: []float64{1}, Observed: []float64{1, 2},
				Predict: func(_ context.Context, p, out []float64) error { calls++; out[0], out[1] = p[0], 2*p[0]; return nil }}
			_, err := o.Fit(context.Background(), pr)
			if err == nil {
				t.Fatalf("%+v: no error", o)
			}
			for _, w := range []string{"LeastSquares." + b.field, fmt.Sprint(b.value), b.allowed} {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
			if calls != 0 {
				t.Errorf("Predict called %d times before the refusal", calls)
			}
		})
	}
	for _, f := range settingFields(reflect.TypeOf(LeastSquares{}), "") {
		if !covered[f] {
			t.Errorf("LeastSquares.%s: no value out of range in badFitSettings", f)
		}
	}
}

// Every bad field of a Calibration is refused before any analysis, with
// an error naming Calibration.Field, its value and what is allowed; every
// field has a row (Name takes any value).
func TestCalibrationSettingsValidation(t *testing.T) {
	type row struct {
		field string
		edit  func(*Calibration)
		want  []string
	}
	rows := []row{
		{"System", func(c *Calibration) { c.System = nil }, []string{"Calibration.System = nil", "needs a System"}},
		{"Data", func(c *Calibration) { c.Data = nil }, []string{"Calibration.Data = nil", "needs Data"}},
		{"Fixed", func(c *Calibration) { c.Fixed["wing.areaa"] = 120 }, []string{"Calibration.Fixed[wing.areaa] = 120", "must name a parameter", "similar: wing.area"}},
		{"Fixed", func(c *Calibration) { c.Fixed["mission.range"] = math.NaN() }, []string{"Calibration.Fixed[mission.range] = NaN", "validity range"}},
		{"Fixed", func(c *Calibration) { c.Fixed["aero.k_cruise"] = 0.05 }, []string{"Calibration.Fixed[aero.k_cruise] = 0.05", "must name a parameter", "computed by discipline airframe_aero"}},
		{"Factors", func(c *Calibration) { c.Factors = nil }, []string{"Calibration.Factors = []", "no factors to fit", "list parameters"}},
		{"Factors", func(c *Calibration) { c.Factors = []string{"aero.factor_lift_slop"} }, []string{"Calibration.Factors[0]", `"aero.factor_lift_slop"`, "must name a parameter", "similar: aero.factor_lift_slope"}},
		{"Factors", func(c *Calibration) { c.Factors = []string{"aero.k_cruise"} }, []string{"Calibration.Factors[0]", "aero.k_cruise", "computed by discipline airframe_aero", "only parameters"}},
		{"Factors", func(c *Calibration) { c.Factors = []string{"cruise.mach"} }, []string{"Calibration.Factors[0]", "cruise.mach", "also a condition", "the data do not set"}},
		{"Factors", func(c *Calibration) { c.Factors = append(c.Factors, c.Factors[0]) }, []string{"Calibration.Factors[3]", "aero.factor_lift_slope", "listed twice (also Factors[0])", "list each factor once"}},
		{"Quantities", func(c *Calibration) { c.Quantities = []string{} }, []string{"Calibration.Quantities = []", "leave it nil to fit them all"}},
		{"Quantities", func(c *Calibration) { c.Quantities = []string{"aero.ld_cruise"} }, []string{"Calibration.Quantities[0]", "aero.ld_cruise", "not measured", "its measured columns"}},
	}
	for _, b := range badFitSettings {
		b := b
		rows = append(rows, row{"Fit." + b.field, func(c *Calibration) {
			reflect.ValueOf(&c.Fit).Elem().FieldByName(b.field).Set(reflect.ValueOf(b.value))
		}, []string{"Calibration.Fit." + b.field, fmt.Sprint(b.value), b.allowed}})
	}
	anyValue := map[string]string{"Name": "a label for the result and notes"}
	covered := map[string]bool{}
	for _, r := range rows {
		covered[r.field] = true
		t.Run(r.field+"/"+r.want[0], func(t *testing.T) {
			c := swiftletCalibration(t)
			r.edit(&c)
			res, err := c.Run(context.Background())
			if err == nil {
				t.Fatal("no error")
			}
			if res != nil {
				t.Errorf("a result with the refusal: the fit ran")
			}
			for _, w := range r.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
		})
	}
	for _, f := range settingFields(reflect.TypeOf(Calibration{}), "") {
		if _, ok := anyValue[f]; !covered[f] && !ok {
			t.Errorf("Calibration.%s: no bad value in the table, nor a reason it takes any value", f)
		}
	}
}
