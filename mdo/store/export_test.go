package store

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
)

// writeCSV writes evaluations that need not be in a store with the
// export's writer.
func writeCSV(w *bytes.Buffer, c Columns, evs []*mdo.Evaluation) error {
	return writeCSVOf(w, c, evs, CSVOptions{AllOutputs: true})
}

func TestCSVRoundTrip(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	ev := sellarEvaluator(t, s, 3, sellarScript)
	evs, err := ev.Evaluate(context.Background(), grid(25, 3))
	if err != nil {
		t.Fatal(err)
	}
	// and a failed evaluation with non-finite values
	failed := *evs[0]
	failed.ID = 99
	failed.Converged, failed.Feasible, failed.Err, failed.Violation = false, false, "discipline d1: \"quoted\", with comma", math.Inf(1)
	failed.Objectives = []float64{math.NaN()}
	failed.F = []float64{math.Inf(1)}
	failed.Constraints = []float64{math.NaN(), math.NaN()}
	failed.Margins = []float64{math.Inf(-1), math.Inf(-1)}
	failed.G = []float64{math.Inf(1), math.Inf(1)}
	failed.Outputs = nil // a failed analysis records no outputs
	evs = append(evs, &failed)
	cols := Columns{Design: ev.DesignSpecs(), Objectives: ev.ObjectiveNames(), Outputs: ev.OutputVars()}
	for _, c := range ev.Constraints() {
		cols.Constraints = append(cols.Constraints, c.Name)
	}
	var buf bytes.Buffer
	if err := writeCSV(&buf, cols, evs); err != nil {
		t.Fatal(err)
	}
	head := strings.SplitN(buf.String(), "\n", 2)[0]
	for _, w := range []string{"design:x [-]", "design:z1 [-]", "objective:f [-]", "constraint:g1 [-]", "margin:g2 [-]", "output:y1 [-]", "wall_seconds [s]"} {
		if !strings.Contains(head, w) {
			t.Errorf("CSV header %q lacks %q", head, w)
		}
	}
	gotCols, back, err := ReadCSV(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if len(back) != len(evs) {
		t.Fatalf("read back %d rows, wrote %d", len(back), len(evs))
	}
	for i := range evs {
		if f := sameEvaluation(back[i], evs[i]); f != "" {
			t.Errorf("row %d differs in %s after the CSV round trip", i, f)
		}
	}
	if len(gotCols.Design) != 3 || gotCols.Design[1].Name != "z1" || len(gotCols.Outputs) != len(cols.Outputs) {
		t.Errorf("columns read back = %+v", gotCols)
	}
	// the store's streaming export gives the same text for what it holds
	var fromStore bytes.Buffer
	if err := s.WriteCSV(&fromStore, CSVOptions{AllOutputs: true}); err != nil {
		t.Fatal(err)
	}
	var direct bytes.Buffer
	if err := writeCSV(&direct, s.Columns(), evs[:len(evs)-1]); err != nil {
		t.Fatal(err)
	}
	if fromStore.String() != direct.String() {
		t.Error("Store.WriteCSV differs from the export of the same evaluations")
	}
}

func TestReadCSVErrors(t *testing.T) {
	tests := []struct {
		name, text, want string
	}{
		{"empty", "", "header"},
		{"foreign header", "a,b,c,d,e,f,g,h\n", `column 1 is "a"`},
		{"bad role", "id,feasible,converged,violation [-],error,iterations,discipline_calls,wall_seconds [s],speed:v [m/s]\n", `unknown role "speed"`},
		{"no unit", "id,feasible,converged,violation [-],error,iterations,discipline_calls,wall_seconds [s],design:x\n", "role:name [unit]"},
		{"bad number", "id,feasible,converged,violation [-],error,iterations,discipline_calls,wall_seconds [s],design:x [m],x:x [-]\n0,true,true,0,,1,2,0.5,fast,0.5\n", `line 2: column "design:x [m]" = "fast"`},
	}
	for _, tc := range tests {
		_, _, err := ReadCSV(strings.NewReader(tc.text))
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v, want it to contain %q", tc.name, err, tc.want)
		}
	}
}

// runSellar runs a fixed grid over a study and returns the result.
func runSellar(t *testing.T, st *mdo.Study, n int) *mdo.Result {
	t.Helper()
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", nil); err != nil {
		t.Fatal(err)
	}
	if _, err := ev.Evaluate(context.Background(), grid(n, 3)); err != nil {
		t.Fatal(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestSummary(t *testing.T) {
	dir := t.TempDir()
	var texts []string
	for run := 0; run < 2; run++ {
		st, err := mdo.SellarStudy(mdo.MDF)
		if err != nil {
			t.Fatal(err)
		}
		st.Seed = 11
		r := runSellar(t, st, 60)
		p := filepath.Join(dir, "summary.json")
		if err := WriteSummary(p, NewSummary(r, SummaryOptions{Script: sellarScript, ToolVersion: "t"})); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		var raw map[string]any
		if err := json.Unmarshal(b, &raw); err != nil {
			t.Fatal(err)
		}
		delete(raw, "timestamps")
		again, _ := json.Marshal(raw)
		texts = append(texts, string(again))

		s, err := ReadSummary(p)
		if err != nil {
			t.Fatal(err)
		}
		if s.Study != "sellar" || s.Seed != 11 || s.Evaluations != 60 || s.Best == nil || s.Front != nil {
			t.Fatalf("summary = %+v", s)
		}
		if float64(s.Best.Objective) != r.Objective() || s.Best.Feasible != r.Feasible() {
			t.Errorf("best objective %v feasible %v, result %v %v", s.Best.Objective, s.Best.Feasible, r.Objective(), r.Feasible())
		}
		for name, v := range r.DesignValues() {
			if float64(s.Best.Design[name]) != v {
				t.Errorf("design %s = %v, result %v", name, s.Best.Design[name], v)
			}
		}
		if len(s.Best.Constraints) != 2 || float64(s.Best.Constraints["g2"]) != r.Best.Constraints[1] {
			t.Errorf("constraints = %v", s.Best.Constraints)
		}
		if s.Timestamps.Started == "" || s.Timestamps.Finished == "" {
			t.Errorf("timestamps missing: %+v", s.Timestamps)
		}
		if s.ScriptSHA256 != ScriptHash(sellarScript) {
			t.Errorf("script hash %s", s.ScriptSHA256)
		}
	}
	if texts[0] != texts[1] {
		t.Errorf("two runs give different summaries apart from timestamps:\n%s\n%s", texts[0], texts[1])
	}

	// two objectives: a front instead of a best point
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Objectives = []mdo.Objective{mdo.Minimize("f"), mdo.Maximize("y2")}
	r := runSellar(t, st, 60)
	s := NewSummary(r, SummaryOptions{})
	if s.Best != nil || len(s.Front) == 0 || len(s.Front) != len(r.Front) {
		t.Fatalf("two-objective summary: best %v, front %d points (result front %d)", s.Best, len(s.Front), len(r.Front))
	}
	if _, ok := s.Front[0].Objectives["y2"]; !ok {
		t.Errorf("front point lacks objective y2: %+v", s.Front[0])
	}
	// the optimiser's words on its stop: absent when it has none (the
	// summaries above), kept when it has some
	if strings.Contains(texts[0], "stop_detail") {
		t.Errorf("a summary without a stop detail has the key: %s", texts[0])
	}
	r.StopDetail = "no feasible point found in 60 evaluations"
	js, err := json.Marshal(NewSummary(r, SummaryOptions{}))
	if err != nil || !strings.Contains(string(js), `"stop_detail":"no feasible point found in 60 evaluations"`) {
		t.Errorf("summary with a stop detail: %s, %v", js, err)
	}
	// NaN encodes as null
	b, err := json.Marshal(Number(math.NaN()))
	if err != nil || string(b) != "null" {
		t.Errorf("NaN encodes as %s, %v; want null", b, err)
	}
}

func TestResultFromStore(t *testing.T) {
	path := filepath.Join(t.TempDir(), "r.db")
	s, err := Create(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Recorder, st.Seed = s, 9
	st.Constraints[0] = st.Constraints[0].WithScale(2)
	want := runSellar(t, st, 40)
	s.Close()
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	got, err := r.Result()
	if err != nil {
		t.Fatal(err)
	}
	if got.Best == nil || got.Best.ID != want.Best.ID || got.Objective() != want.Objective() {
		t.Fatalf("rebuilt best %+v, want #%d", got.Best, want.Best.ID)
	}
	if got.EvalCounters != want.EvalCounters || got.Stop != want.Stop || got.Seed != 9 || got.Optimizer != "grid" {
		t.Errorf("rebuilt counters %+v stop %q seed %d, want %+v %q 9", got.EvalCounters, got.Stop, got.Seed, want.EvalCounters, want.Stop)
	}
	if len(got.Constraints) != 2 {
		t.Fatalf("rebuilt %d constraints", len(got.Constraints))
	}
	for k := range want.Constraints {
		g, w := got.Constraints[k], want.Constraints[k]
		if g.String() != w.String() || g.Scale != w.Scale || g.Tolerance != w.Tolerance {
			t.Errorf("constraint %d rebuilt as %v (scale %g), want %v (scale %g)", k, g, g.Scale, w, w.Scale)
		}
	}
	if len(got.History) != len(want.History) {
		t.Errorf("rebuilt history has %d steps, want %d", len(got.History), len(want.History))
	}
	if a, b := got.Active(1e-3), want.Active(1e-3); len(a) != len(b) {
		t.Errorf("active constraints %v, want %v", a, b)
	}
}

func TestCSVHeaderUnits(t *testing.T) {
	info := syntheticRun()
	info.Outputs = append(info.Outputs, mdo.Var{Name: "mass.takeoff", Unit: "kg"}, mdo.Var{Name: "perf.c0", Unit: "m"})
	cols := Columns{Design: info.Design, Objectives: info.Objectives, Constraints: info.Constraints, Outputs: info.Outputs}
	var buf bytes.Buffer
	if err := writeCSV(&buf, cols, nil); err != nil {
		t.Fatal(err)
	}
	head := strings.TrimSpace(buf.String())
	for _, w := range []string{"design:wing.x0 [m]", "objective:mass.takeoff [kg]", "constraint:perf.c0 [m]", "margin:perf.c0 [m]", "constraint:perf.c1 [-]", "output:out.v3 [kg]", "x:wing.x5 [-]", "f:mass.takeoff [-]", "g:perf.c3 [-]"} {
		if !strings.Contains(head, w) {
			t.Errorf("CSV header lacks %q:\n%s", w, head)
		}
	}
	back, evs, err := ReadCSV(strings.NewReader(buf.String()))
	if err != nil || len(evs) != 0 || back.Design[0].Unit != "m" || back.Outputs[len(back.Outputs)-1].Unit != "m" {
		t.Errorf("read back %+v, %d rows, %v", back, len(evs), err)
	}
}

// By default the export leaves the outputs out and keeps the units of the
// objectives and constraints; it reads back without outputs.
func TestCSVWithoutOutputs(t *testing.T) {
	s, err := Create(filepath.Join(t.TempDir(), "r.db"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	info := syntheticRun()
	info.Outputs[0].Name, info.Outputs[0].Unit = "mass.takeoff", "kg" // the objective's unit comes from the outputs
	if err := s.Begin(info); err != nil {
		t.Fatal(err)
	}
	var evs []*mdo.Evaluation
	for i := 0; i < 4; i++ {
		e := &mdo.Evaluation{}
		syntheticEval(e, i)
		evs = append(evs, e)
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	var small, all bytes.Buffer
	if err := s.WriteCSV(&small, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	if err := s.WriteCSV(&all, CSVOptions{AllOutputs: true}); err != nil {
		t.Fatal(err)
	}
	head, _, _ := strings.Cut(small.String(), "\n")
	if strings.Contains(head, "output:") || !strings.Contains(head, "objective:mass.takeoff [kg]") || !strings.Contains(head, "margin:perf.c0") {
		t.Errorf("default CSV header %q: want no output columns, the objective with its unit, the margins", head)
	}
	if h, _, _ := strings.Cut(all.String(), "\n"); strings.Count(h, "output:") != len(info.Outputs) {
		t.Errorf("CSV with every output has %d output columns, want %d", strings.Count(h, "output:"), len(info.Outputs))
	}
	cols, back, err := ReadCSV(&small)
	if err != nil {
		t.Fatal(err)
	}
	if len(back) != len(evs) || len(cols.Outputs) != 0 {
		t.Fatalf("read back %d rows and %d outputs, want %d and none", len(back), len(cols.Outputs), len(evs))
	}
	for i, e := range back {
		want := *evs[i]
		want.Outputs = nil
		if f := sameEvaluation(e, &want); f != "" {
			t.Errorf("row %d differs in %s", i, f)
		}
	}
}

// TestWriteCSVOfIsWriteCSV checks that the CSV of evaluations loaded once
// (Evaluations, then WriteCSVOf) is byte for byte the CSV read from the
// file (WriteCSV), with and without the output columns.
func TestWriteCSVOfIsWriteCSV(t *testing.T) {
	s, err := Create(filepath.Join(t.TempDir(), "r.db"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Begin(syntheticRun()); err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 5; i++ {
		e := &mdo.Evaluation{}
		syntheticEval(e, i)
		if err := s.Record(e); err != nil {
			t.Fatal(err)
		}
	}
	evs, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	for _, opt := range []CSVOptions{{}, {AllOutputs: true}} {
		var read, of bytes.Buffer
		if err := s.WriteCSV(&read, opt); err != nil {
			t.Fatal(err)
		}
		if err := s.WriteCSVOf(&of, evs, opt); err != nil {
			t.Fatal(err)
		}
		if read.Len() == 0 || !bytes.Equal(read.Bytes(), of.Bytes()) {
			t.Errorf("%+v: WriteCSVOf differs from WriteCSV:\n%s\n---\n%s", opt, of.String(), read.String())
		}
	}
}
