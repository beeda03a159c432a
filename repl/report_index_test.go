package repl

import (
	"context"
	"path/filepath"
	"reflect"
	"slices"
	"testing"

	"couplet/mdo/report"
)

// sellarRun is a session's input that runs a small design of
// experiments on the Sellar problem under the study name given, as
// variable res, and publishes it.
func sellarRun(name string) string {
	return `import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)
st, err := mdo.SellarStudy(mdo.MDF)
st.Name = "` + name + `"
cell.Attach(st)
res, err := optimizers.RandomDesign{Samples: 6}.Minimize(cell.Context(), st)
cell.Publish(res)
`
}

// indexFolders lists the result folders the output folder's summary.json
// lists, in order, and its principal.
func indexFolders(t *testing.T, dir string) ([]string, string) {
	t.Helper()
	idx, err := report.ReadIndex(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, r := range idx.Results {
		out = append(out, r.Folder)
	}
	return out, idx.Principal
}

// The index of the output folder keeps every result written into it by
// the session: a @report in the fresh interpreter that follows a death
// keeps those of the interpreter that died, and the results written
// from the case stores after a death (WriteStored) keep those reported
// before. Before, each rewrote the index with its own results alone.
func TestIndexKeepsTheSessionsEarlierResults(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	// the first interpreter reports one result
	first := NewRunOutputs(dir)
	s1, _, errb := newTest(t, Options{OutDir: dir, Outputs: first})
	serve(t, s1, sellarRun("wing")+"@report res\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	s1.Close()
	// the fresh interpreter, as the notebook starts it after a death
	second := NewRunOutputs(dir)
	if err := second.TakeExisting(); err != nil {
		t.Fatal(err)
	}
	s2, _, errb := newTest(t, Options{OutDir: dir, Outputs: second})
	defer s2.Close()
	serve(t, s2, sellarRun("tail")+"@report res\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	if got, principal := indexFolders(t, dir); !slices.Equal(got, []string{"wing", "tail"}) || principal != "tail" {
		t.Fatalf("after the fresh interpreter's @report: %v, principal %q; want [wing tail], tail", got, principal)
	}
	// it publishes a third result, then dies: the notebook writes the
	// published results from their stores
	serve(t, s2, sellarRun("fin"))
	var stores []string
	for _, r := range s2.Env().Published() {
		stores = append(stores, second.StorePath(r))
	}
	if _, err := WriteStored(context.Background(), dir, s2.Script(), stores, nil, false); err != nil {
		t.Fatal(err)
	}
	if got, principal := indexFolders(t, dir); !slices.Equal(got, []string{"wing", "tail", "fin"}) || principal != "fin" {
		t.Errorf("after the results written from their stores: %v, principal %q; want [wing tail fin], fin", got, principal)
	}
	// the record written from a store keeps the optimiser's settings and
	// the coupling solvers, which results.db recorded as the run began
	// (before, it said they died with the interpreter: "not recorded"),
	// the same as the one the session wrote names
	var solvers [][]report.CouplingSolver
	for _, folder := range []string{"fin", "tail"} {
		rec, err := report.ReadRecord(filepath.Join(dir, folder, report.SummaryFile))
		if err != nil {
			t.Fatal(err)
		}
		if rec.OptimizerSettings["Samples"] != "6" || rec.Caution != report.Caution {
			t.Errorf("%s: optimiser settings %v, caution %q", folder, rec.OptimizerSettings, rec.Caution)
		}
		if len(rec.CouplingSolvers) != 1 || rec.SolverNote != "" {
			t.Errorf("%s: coupling solvers %+v, note %q; want the system's one coupled group", folder, rec.CouplingSolvers, rec.SolverNote)
		}
		solvers = append(solvers, rec.CouplingSolvers)
	}
	if !reflect.DeepEqual(solvers[0], solvers[1]) {
		t.Errorf("the coupling solvers written from the store %+v, the session's %+v", solvers[0], solvers[1])
	}
}
