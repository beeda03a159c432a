package store_test

import (
	"context"
	"database/sql"
	"fmt"
	"os"
	"path/filepath"

	"couplet/mdo"
	"couplet/mdo/store"
)

// runGrid evaluates n points of the Sellar study through a recorder.
func runGrid(rec mdo.Recorder, earlier []*mdo.Evaluation, n int) (*mdo.Result, error) {
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		return nil, err
	}
	st.Seed, st.Script, st.Recorder = 1, "// the study script\n", rec
	ev, err := st.NewEvaluator()
	if err != nil {
		return nil, err
	}
	ev.PickUp(earlier)
	if err := ev.Begin("grid", nil); err != nil {
		return nil, err
	}
	for i := 0; i < n; i++ {
		u := float64(i) / 10
		if _, err := ev.EvaluateOne(context.Background(), []float64{u, 0.5, u / 2}); err != nil {
			return nil, err
		}
	}
	return ev.Finish(mdo.StopBudget)
}

// A run records every evaluation into results.db, then exports them.
func ExampleCreate() {
	dir, _ := os.MkdirTemp("", "couplet-example")
	defer os.RemoveAll(dir)
	s, err := store.Create(filepath.Join(dir, "results.db"), store.Options{ToolVersion: "couplet dev"})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	r, err := runGrid(s, nil, 10)
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := store.WriteSummary(filepath.Join(dir, "summary.json"), store.NewSummary(r, store.SummaryOptions{Script: "// the study script\n"})); err != nil {
		fmt.Println(err)
		return
	}
	csv, _ := os.Create(filepath.Join(dir, "evaluations.csv"))
	defer csv.Close()
	if err := s.WriteCSV(csv, store.CSVOptions{}); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("rows:", s.Rows())
	// Output:
	// rows: 10
}

// A killed run is continued: the same script and seed are checked, the
// recorded evaluations picked up, and only the missing ones analysed.
func ExamplePickUp() {
	dir, _ := os.MkdirTemp("", "couplet-example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "results.db")
	first, _ := store.Create(path, store.Options{})
	if _, err := runGrid(first, nil, 6); err != nil { // stands for a run killed after 6 points
		fmt.Println(err)
		return
	}
	first.Close()

	s, err := store.PickUp(path, store.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	if err := s.Check("// the study script\n", 1); err != nil {
		fmt.Println(err)
		return
	}
	prev, err := s.Evaluations()
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := runGrid(s, prev, 10)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("picked up:", r.PickedUp, "analysed:", r.Analyses, "rows:", s.Rows())
	// Output:
	// picked up: 6 analysed: 4 rows: 10
}

// withRecord is a store that writes the run's record as the run begins,
// as the session does: the caution and the coupling solvers.
type withRecord struct {
	*store.Store
	rec store.RunRecord
}

func (w withRecord) Begin(info mdo.RunInfo) error {
	if err := w.Store.Begin(info); err != nil {
		return err
	}
	return w.SetRunRecord(w.rec)
}

// results.db keeps the run's record beside its evaluations: how it
// ended, its caution, its coupling solvers and its optimiser's
// settings, read back by StoredRecord or with SQL through the views
// run_summary, optimizer_settings and constraint_definitions and the
// table coupling_solvers.
func ExampleStore_SetRunRecord() {
	dir, _ := os.MkdirTemp("", "couplet-example")
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "results.db")
	s, err := store.Create(path, store.Options{ToolVersion: "couplet dev"})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	rec := store.RunRecord{Caution: "Conceptual estimates only.", CouplingSolvers: []store.CouplingSolver{
		{Disciplines: []string{"sellar1", "sellar2"}, Method: "gauss-seidel", Tolerance: 1e-10, MaxIterations: 200, Relaxation: 1, Fallback: true}}}
	if _, err := runGrid(withRecord{s, rec}, nil, 10); err != nil {
		fmt.Println(err)
		return
	}
	back, err := s.StoredRecord()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("caution:", back.Caution)
	// the Sellar problem's constraints as declared (Sellar, Batill and
	// Renaud, 1996), from End
	fmt.Println("constraints:", back.Constraints[0], "and", back.Constraints[1])

	// the same with SQL (the sqlite3 shell, Python's sqlite3 module)
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer db.Close()
	var stop, method string
	var evaluations, iterations int
	if err := db.QueryRow(`SELECT stop, evaluations FROM run_summary`).Scan(&stop, &evaluations); err != nil {
		fmt.Println(err)
		return
	}
	if err := db.QueryRow(`SELECT method, max_iterations FROM coupling_solvers WHERE n = 1`).Scan(&method, &iterations); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("stop:", stop, "evaluations:", evaluations)
	fmt.Println("coupling solver:", method, "of at most", iterations, "iterations")
	// Output:
	// caution: Conceptual estimates only.
	// constraints: g1 >= 3.16 and g2 <= 24
	// stop: budget evaluations: 10
	// coupling solver: gauss-seidel of at most 200 iterations
}
