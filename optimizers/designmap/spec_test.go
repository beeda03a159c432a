package designmap

import (
	"context"
	"math"
	"reflect"
	"strings"
	"testing"

	"couplet/mdo"
)

// Every field of Spec and CarpetSpec out of range is refused before any
// analysis with an error naming the field, its value and what is allowed;
// every field has a row.
func TestSpecTable(t *testing.T) {
	rows := []struct {
		field string
		spec  Spec
		want  []string
	}{
		{"X", Spec{X: "x9", Y: "x2"}, []string{`X = "x9"`, "must be two different design variables", "[x1 x2 x3]"}},
		{"Y", Spec{X: "x1", Y: "x1"}, []string{`Y = "x1"`, "must be two different design variables"}},
		{"Quantity", Spec{X: "x1", Y: "x2", Quantity: "g"}, []string{`"g"`}},
		{"At", Spec{X: "x1", Y: "x2", At: map[string]float64{"x4": 0.5}}, []string{`Spec.At names "x4"`, "no design variable", "[x1 x2 x3]"}},
		{"At", Spec{X: "x1", Y: "x2", At: map[string]float64{"x3": 2}}, []string{`Spec.At["x3"] = 2`, "allowed [0, 1]"}},
		{"At", Spec{X: "x1", Y: "x2", At: map[string]float64{"x3": math.NaN()}}, []string{`Spec.At["x3"] = NaN`, "allowed [0, 1]"}},
		{"Points", Spec{X: "x1", Y: "x2", Points: 1}, []string{"Spec.Points = 1", "allowed 2 to 201"}},
		{"Points", Spec{X: "x1", Y: "x2", Points: 100_000}, []string{"Spec.Points = 100000", "allowed 2 to 201"}},
	}
	covered := map[string]bool{}
	for _, r := range rows {
		covered[r.field] = true
		t.Run(r.want[0], func(t *testing.T) {
			s := toyStudy(t)
			rec := &countingRecorder{}
			s.Recorder = rec
			_, err := Sample(context.Background(), s, r.spec)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range r.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
			if rec.records != 0 {
				t.Errorf("%d analyses before the refusal", rec.records)
			}
		})
	}
	// a good spec is analysed and recorded, so the count above can tell
	s := toyStudy(t)
	rec := &countingRecorder{}
	s.Recorder = rec
	if _, err := Sample(context.Background(), s, Spec{X: "x1", Y: "x2", Points: 3}); err != nil || rec.records != 9 {
		t.Errorf("a 3 × 3 map: %d analyses recorded, error %v; want 9 and none", rec.records, err)
	}
	// the carpet takes the map's fields, and its own Lines
	for _, lines := range []int{1, 16, 1 << 20} {
		_, err := Carpet(context.Background(), toyStudy(t), CarpetSpec{X: "x1", Y: "x2", Lines: lines})
		if err == nil || !strings.Contains(err.Error(), "CarpetSpec.Lines = ") || !strings.Contains(err.Error(), "allowed 2 to 15") {
			t.Errorf("Lines = %d: error %v, want one naming CarpetSpec.Lines and 2 to 15", lines, err)
		}
	}
	covered["Lines"] = true
	for _, typ := range []reflect.Type{reflect.TypeOf(Spec{}), reflect.TypeOf(CarpetSpec{})} {
		for i := 0; i < typ.NumField(); i++ {
			if f := typ.Field(i).Name; !covered[f] {
				t.Errorf("%s.%s: no value out of range in the table", typ.Name(), f)
			}
		}
	}
}

// countingRecorder counts the evaluations recorded.
type countingRecorder struct{ records int }

func (c *countingRecorder) Begin(mdo.RunInfo) error      { return nil }
func (c *countingRecorder) Record(*mdo.Evaluation) error { c.records++; return nil }
func (c *countingRecorder) End(*mdo.Result) error        { return nil }
