package cell_test

import (
	"context"
	"fmt"

	"couplet/mdo"
	"couplet/mdo/external"
	"couplet/mdo/plot"
	"couplet/mdo/report"
	"couplet/repl/cell"
)

// sellarResult is the result of evaluating one point of the Sellar study
// (the published optimum), as a script's optimiser would return it.
func sellarResult(ctx context.Context) *mdo.Result {
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		panic(err)
	}
	st.Workers = 1
	ev, err := st.NewEvaluator()
	if err != nil {
		panic(err)
	}
	if err := ev.Begin("one point", nil); err != nil {
		panic(err)
	}
	if _, err := ev.EvaluateOne(ctx, []float64{0, (1.97764 + 10) / 20, 0}); err != nil {
		panic(err)
	}
	r, err := ev.Finish(mdo.StopBudget)
	if err != nil {
		panic(err)
	}
	return r
}

// cell.Publish hands a result to the run, which writes its folder
// (summary.json, the CSV, the plots and the report); the session or
// runner hears of it as it is handed over.
func ExampleEnv_Publish() {
	env := cell.NewEnv(cell.Host{Published: func(r *mdo.Result) {
		fmt.Printf("the run got study %q, %d evaluation\n", r.Study, r.Evaluations)
	}})
	r := sellarResult(env.Context())
	if err := env.Publish(r); err != nil {
		panic(err)
	}
	fmt.Println(len(env.Published()), env.Publish(nil))
	// Output:
	// the run got study "sellar", 1 evaluation
	// 1 cell: Publish: the result is nil
}

// cell.SeedUsed tells which seed the script's study got: the one it
// declared, or the --seed of the command line.
func ExampleEnv_SeedUsed() {
	env := cell.NewEnv(cell.Host{})
	_, known := env.SeedUsed()
	fmt.Println(known)
	env.Seed(5)
	fmt.Println(env.SeedUsed())
	run := cell.NewEnv(cell.Host{Seed: 11, SeedSet: true})
	st, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		panic(err)
	}
	if err := run.Attach(st); err != nil {
		panic(err)
	}
	fmt.Println(run.SeedUsed())
	// Output:
	// false
	// 5 true
	// 11 true
}

// cell.OutDir is the run's output folder (--out DIR); a session started
// without one has none.
func ExampleEnv_OutDir() {
	fmt.Printf("%q %q\n", cell.NewEnv(cell.Host{OutDir: "out/mine"}).OutDir(), cell.NewEnv(cell.Host{}).OutDir())
	// Output: "out/mine" ""
}

// cell.Programs is the approval of external programs a script passes to
// external.New: the programs named with --allow-program, or every one
// under --trust-script.
func ExampleEnv_Programs() {
	sandboxed := cell.NewEnv(cell.Host{Programs: external.Allow("run with --allow-program PATH", "/opt/vlm/bin/vlm")})
	trusted := cell.NewEnv(cell.Host{Programs: external.AllowAll()})
	for _, path := range []string{"/opt/vlm/bin/vlm", "/opt/other/bin/tool"} {
		fmt.Println(path, sandboxed.Programs().Approves(path), trusted.Programs().Approves(path))
	}
	// Output:
	// /opt/vlm/bin/vlm true true
	// /opt/other/bin/tool false true
}

// cell.EveryOutput asks the run to write every output of the analyses to
// evaluations.csv, as --every-output does.
func ExampleEnv_EveryOutput() {
	asked := false
	env := cell.NewEnv(cell.Host{EveryOutput: func() { asked = true }})
	env.EveryOutput()
	fmt.Println(asked)
	// Output: true
}

// cell.Progress is the callback Attach installs in Study.Progress; off a
// terminal (no progress display) it does nothing.
func ExampleEnv_Progress() {
	shown := cell.NewEnv(cell.Host{Progress: func(label string) func(mdo.Progress) {
		return func(p mdo.Progress) {
			fmt.Printf("%s %s iteration %d best %g\n", label, p.Optimizer, p.Iteration, p.Best)
		}
	}})
	shown.Progress("sellar")(mdo.Progress{Optimizer: "Nelder-Mead", Iteration: 3, Best: 3.5})
	cell.NewEnv(cell.Host{}).Progress("sellar")(mdo.Progress{Iteration: 3})
	// Output: sellar Nelder-Mead iteration 3 best 3.5
}

// cell.AddFigures adds figures of the script's choosing (a design map, a
// carpet) to a result's folder, drawn when the folder is written.
func ExampleEnv_AddFigures() {
	env := cell.NewEnv(cell.Host{AddFigures: func(r *mdo.Result, sources []report.FigureSource) {
		fmt.Printf("%d source for the folder of %s\n", len(sources), r.Study)
	}})
	// a source of no figure, with a note for the report
	note := func(ctx context.Context, r *mdo.Result, st *mdo.Study) ([]*plot.Figure, []string) {
		return nil, []string{"no map: the study has three variables"}
	}
	r := sellarResult(env.Context())
	fmt.Println(env.AddFigures(r, note))
	fmt.Println(env.AddFigures(r, nil))
	// Output:
	// 1 source for the folder of sellar
	// <nil>
	// cell: AddFigures: source 1 is nil
}
