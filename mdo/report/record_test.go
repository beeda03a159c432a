package report

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
	"couplet/mdo/store"
)

// A result's folder is a record of the engineering work: summary.json
// and report.html name the study, seed, optimiser and its settings, the
// coupling solver and its settings, the evaluations (analysed, picked
// up, failed, repeats), the feasibility, the constraints with their
// bounds and margins, and the caution. (Before, summary.json had no
// caution, no optimiser nor solver settings and no constraint bounds,
// and the report no settings.)
func TestRunFolderIsAnEngineeringRecord(t *testing.T) {
	dir := t.TempDir()
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		t.Fatal(err)
	}
	st.Name, st.Seed, st.Workers = "record", 17, 1
	set := mdo.DefaultSolver()
	set.Method, set.Tolerance, set.MaxIterations = mdo.GaussSeidel, 1e-9, 77
	if err := st.System.SetSolver(set); err != nil {
		t.Fatal(err)
	}
	s, err := store.Create(filepath.Join(dir, StoreFile), store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	st.Recorder = s
	ev, err := st.NewEvaluator()
	if err != nil {
		t.Fatal(err)
	}
	if err := ev.Begin("grid", map[string]string{"Samples": "3", "Spread": "even"}); err != nil {
		t.Fatal(err)
	}
	pts := [][]float64{{0.1, 0.7, 0.2}, {0.05, 0.6, 0.05}, {0.1, 0.7, 0.2}}
	if _, err := ev.Evaluate(context.Background(), pts); err != nil {
		t.Fatal(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	if _, err := WriteRun(context.Background(), out, Run{Result: r, Study: st, Store: s, Script: script, ToolVersion: "t"}); err != nil {
		t.Fatal(err)
	}
	rec, err := ReadRecord(filepath.Join(out, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	if rec.Caution != Caution {
		t.Errorf("summary.json caution %q, want %q", rec.Caution, Caution)
	}
	if rec.Study != "record" || rec.Seed != 17 || rec.Optimizer != "grid" || rec.Evaluations != 2 || rec.Analyses != 2 || rec.Repeats != 1 || rec.Failed != 0 || rec.Best == nil {
		t.Errorf("summary.json: study %q seed %d optimiser %q evaluations %d analyses %d repeats %d failed %d best %v",
			rec.Study, rec.Seed, rec.Optimizer, rec.Evaluations, rec.Analyses, rec.Repeats, rec.Failed, rec.Best)
	}
	if rec.OptimizerSettings["Samples"] != "3" || rec.OptimizerSettings["Spread"] != "even" {
		t.Errorf("summary.json optimiser settings %v", rec.OptimizerSettings)
	}
	if len(rec.CouplingSolvers) != 1 || rec.CouplingSolvers[0].Method != mdo.GaussSeidel.String() || rec.CouplingSolvers[0].Tolerance != 1e-9 ||
		rec.CouplingSolvers[0].MaxIterations != 77 || !rec.CouplingSolvers[0].Fallback || strings.Join(rec.CouplingSolvers[0].Disciplines, " ") != "sellar1 sellar2" {
		t.Errorf("summary.json coupling solvers %+v (note %q)", rec.CouplingSolvers, rec.SolverNote)
	}
	if len(rec.ConstraintDefinitions) != 2 || rec.ConstraintDefinitions[0].Relation != "g1 >= 3.16" || rec.ConstraintDefinitions[1].Relation != "g2 <= 24" {
		t.Errorf("summary.json constraint definitions %+v", rec.ConstraintDefinitions)
	}
	if _, ok := rec.Best.Margins["g1"]; !ok {
		t.Errorf("summary.json best point has no margin of g1: %+v", rec.Best)
	}
	page, err := os.ReadFile(filepath.Join(out, ReportFile))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{
		"<th>study</th><td>record</td>", "<th>seed</th><td>17</td>", "<th>optimiser</th><td>grid</td>",
		"2 evaluations (2 analysed, 0 picked up, 0 failed), 1 repeats",
		`<td>Samples</td><td>3</td>`, `<td>Spread</td><td>even</td>`,
		"<td>sellar1, sellar2</td><td>" + mdo.GaussSeidel.String() + `</td><td class="num">1e-09</td><td class="num">77</td>`,
		"g1 &gt;= 3.16", "margin", "feasible", "airworthiness",
	} {
		if !strings.Contains(string(page), w) {
			t.Errorf("report.html lacks %q", w)
		}
	}
}

// A run whose study's system is not at hand (written from its case
// store after the interpreter died) says so in place of its solvers; an
// IDF study and a system without a coupled group say why there is none.
func TestCouplingSolversNotes(t *testing.T) {
	idf, err := mdo.SellarStudy(mdo.IDF)
	if err != nil {
		t.Fatal(err)
	}
	single := &mdo.Study{System: mustSystem(t)}
	for _, tc := range []struct {
		name string
		st   *mdo.Study
		want string
	}{
		{"no study", nil, "not recorded"},
		{"IDF", idf, "IDF"},
		{"uncoupled", single, "no coupled group"},
	} {
		got, note := CouplingSolvers(tc.st)
		if got != nil || !strings.Contains(note, tc.want) {
			t.Errorf("%s: %v, %q; want no solver and a note with %q", tc.name, got, note, tc.want)
		}
	}
}

// mustSystem is a system of one discipline (no coupled group).
func mustSystem(t *testing.T) *mdo.System {
	t.Helper()
	d := mdo.Func("double", []string{"x"}, []string{"y"}, func(in, out []float64) error {
		out[0] = 2 * in[0]
		return nil
	})
	sys, err := mdo.NewSystem(d)
	if err != nil {
		t.Fatal(err)
	}
	return sys
}
