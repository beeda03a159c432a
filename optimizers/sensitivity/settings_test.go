package sensitivity

import (
	"context"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"
)

// Every setting of Morris and Sobol out of range, small or too large for
// the memory, is refused before the model runs with an error naming
// Method.Field, its value and what is allowed; every field has a row.
func TestSettingsTable(t *testing.T) {
	rows := []struct {
		method, field string
		value         any
		allowed       string
	}{
		{"Morris", "Trajectories", -1, "allowed 2 or more"},
		{"Morris", "Trajectories", 10_000_000, "allowed at most 5000000 for 1 variables"},
		{"Morris", "Levels", 3, "allowed an even number of 2 or more"},
		{"Morris", "Levels", -4, "allowed an even number of 2 or more"},
		{"Sobol", "N", 1, "allowed 2 or more"},
		{"Sobol", "N", 10_000_000, "allowed at most 3333333 for 1 variables"},
		{"Sobol", "Resamples", 5, "allowed 10 or more"},
		{"Sobol", "Resamples", 200_000, "allowed at most 100000"},
		{"Sobol", "Confidence", 1.0, "allowed strictly between 0 and 1"},
		{"Sobol", "Confidence", math.NaN(), "allowed strictly between 0 and 1"},
	}
	covered := map[string]bool{}
	for _, r := range rows {
		covered[r.method+"."+r.field] = true
		t.Run(r.method+"."+r.field+"="+fmt.Sprint(r.value), func(t *testing.T) {
			runs := 0
			model, err := FuncModel(func(x []float64) float64 { runs++; return x[0] }, []float64{0}, []float64{1})
			if err != nil {
				t.Fatal(err)
			}
			ctx := context.Background()
			switch r.method {
			case "Morris":
				var m Morris
				reflect.ValueOf(&m).Elem().FieldByName(r.field).Set(reflect.ValueOf(r.value))
				_, err = m.Screen(ctx, model, []string{"a"}, 1)
			case "Sobol":
				var o Sobol
				reflect.ValueOf(&o).Elem().FieldByName(r.field).Set(reflect.ValueOf(r.value))
				_, err = o.Indices(ctx, model, []string{"a"}, 1)
			}
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range []string{r.method + "." + r.field + " = " + fmt.Sprint(r.value), r.allowed} {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
			if runs != 0 {
				t.Errorf("the model ran %d times before the refusal", runs)
			}
		})
	}
	for _, typ := range []reflect.Type{reflect.TypeOf(Morris{}), reflect.TypeOf(Sobol{})} {
		for i := 0; i < typ.NumField(); i++ {
			if name := typ.Name() + "." + typ.Field(i).Name; !covered[name] {
				t.Errorf("%s: no value out of range in the table", name)
			}
		}
	}
}
