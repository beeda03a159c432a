package cell_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot/vg"

	"couplet/mdo"
	"couplet/mdo/plot"
	"couplet/repl/cell"
)

// A script declares its seed with cell.Seed; `couplet run --seed N`
// overrides it.
func ExampleEnv_Seed() {
	plain := cell.NewEnv(cell.Host{})
	overridden := cell.NewEnv(cell.Host{Seed: 42, SeedSet: true})
	fmt.Println(plain.Seed(7), overridden.Seed(7))
	// Output: 7 42
}

// cell.Attach readies a study for the run: seed override, progress,
// recorder and the script text for provenance.
func ExampleEnv_Attach() {
	env := cell.NewEnv(cell.Host{Seed: 9, SeedSet: true, Script: func() string { return "// the study" }})
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		panic(err)
	}
	if err := env.Attach(st); err != nil {
		panic(err)
	}
	fmt.Println(st.Seed, st.Script)
	// Output: 9 // the study
}

// cell.Context is cancelled when the user presses Ctrl-C or the run's
// time limit passes; pass it to optimisers.
func ExampleEnv_Context() {
	ctx, cancel := context.WithCancel(context.Background())
	env := cell.NewEnv(cell.Host{Context: func() context.Context { return ctx }})
	cancel()
	fmt.Println(env.Context().Err())
	// Output: context canceled
}

// cell.WriteFile writes into the study's output folder and refuses paths.
func ExampleEnv_WriteFile() {
	dir, err := os.MkdirTemp("", "cell-example")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	env := cell.NewEnv(cell.Host{OutDir: dir})
	fmt.Println(env.WriteFile("points.csv", []byte("area,span\n115,18.6\n")))
	_, err = os.Stat(filepath.Join(dir, "points.csv"))
	fmt.Println(err)
	fmt.Println(env.WriteFile("../escape.txt", nil))
	// Output:
	// <nil>
	// <nil>
	// cell: file name "../escape.txt" is not allowed: use a plain name such as "points.csv"
}

// cell.SaveFigure writes a figure the script drew into the output folder
// as NAME.svg and NAME.png.
func ExampleEnv_SaveFigure() {
	dir, err := os.MkdirTemp("", "cell-example")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	env := cell.NewEnv(cell.Host{OutDir: dir})
	p := plot.NewPlot("a line", "x", "y")
	f := plot.NewFigure("my_line", "a line", vg.Points(200), vg.Points(150), p.Draw)
	fmt.Println(env.SaveFigure(f))
	_, err = os.Stat(filepath.Join(dir, "my_line.png"))
	fmt.Println(err)
	fmt.Println(env.WriteFile("my_line.svg", nil))
	// Output:
	// <nil>
	// <nil>
	// cell: WriteFile("my_line.svg"): runfolder: file name "my_line.svg" is the tool's (results*.db and its journals, summary.json, report.html, index.html, comparison.html, evaluations.csv, any .svg or .png): choose another name; save a figure with cell.SaveFigure
}

// cell.Compare shows two results side by side and writes the comparison
// page into a sub-folder of the output folder.
func ExampleEnv_Compare() {
	dir, err := os.MkdirTemp("", "cell-example")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	env := cell.NewEnv(cell.Host{OutDir: dir})
	grid := func(design []mdo.DesignVar, points [][]float64) *mdo.Result {
		st, _ := mdo.SellarStudy(mdo.MDF)
		st.Design, st.Workers = design, 1
		ev, _ := st.NewEvaluator()
		_ = ev.Begin("grid", nil)
		_, _ = ev.Evaluate(env.Context(), points)
		r, _ := ev.Finish(mdo.StopBudget)
		return r
	}
	all := grid([]mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)}, [][]float64{{0, 0.6, 0}})
	two := grid([]mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10)}, [][]float64{{0, 0.6}})
	c, err := env.Compare("both", all, two)
	if err != nil {
		panic(err)
	}
	fmt.Println(len(c.Results), c.Results[1].Label)
	_, err = os.Stat(filepath.Join(dir, "both", "comparison.html"))
	fmt.Println(err)
	// the same name again replaces that comparison; a result's folder
	// is never written over
	_, err = env.Compare("both", all, two)
	fmt.Println(err)
	if err := os.MkdirAll(filepath.Join(dir, "sellar"), 0o755); err != nil {
		panic(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "sellar", "results.db"), nil, 0o644); err != nil {
		panic(err)
	}
	_, err = env.Compare("sellar", all, two)
	fmt.Println(err != nil && strings.Contains(err.Error(), "which a comparison never replaces"))
	// Output:
	// 2 sellar (2)
	// <nil>
	// <nil>
	// true
}
