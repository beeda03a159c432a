package store

import (
	"bytes"
	"context"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
)

// A scripted constraint and objective take a unit (WithUnit): the CSV
// header, the variables table and the result read back show it, instead
// of [-].
func TestScriptedUnitsRecorded(t *testing.T) {
	path := filepath.Join(t.TempDir(), "results.db")
	s, err := Create(path, Options{ToolVersion: "test-1"})
	if err != nil {
		t.Fatal(err)
	}
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Recorder = s
	st.Objectives = []mdo.Objective{mdo.MinimizeFunc("twice_f", func(v mdo.Values) float64 { return 2 * v.Get("f") }).WithUnit("kg")}
	st.Constraints = append(st.Constraints, mdo.AtMost("y_sum", 100).WithFunc(func(v mdo.Values) float64 { return v.Get("y1") + v.Get("y2") }).WithUnit("m"))
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), [][]float64{ev.Start()}); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Finish(mdo.StopBudget); err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := s.WriteCSV(&b, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	head := strings.SplitN(b.String(), "\n", 2)[0]
	for _, w := range []string{"objective:twice_f [kg]", "constraint:y_sum [m]", "margin:y_sum [m]"} {
		if !strings.Contains(head, w) {
			t.Errorf("CSV header %q lacks %q", head, w)
		}
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	res, err := r.Result()
	if err != nil {
		t.Fatal(err)
	}
	if res.Unit("twice_f") != "kg" || res.Unit("y_sum") != "m" {
		t.Errorf("the stored result gives units %q and %q, want kg and m", res.Unit("twice_f"), res.Unit("y_sum"))
	}
	b.Reset()
	if err := r.WriteCSV(&b, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	if head := strings.SplitN(b.String(), "\n", 2)[0]; !strings.Contains(head, "constraint:y_sum [m]") {
		t.Errorf("the reopened store's CSV header %q lacks the unit", head)
	}
}
