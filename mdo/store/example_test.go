package store_test

import (
	"context"
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
