package repl

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"couplet/mdo/store"
)

// BenchmarkBusinessJetGARun replays studies/business_jet.study with a GA
// of population 100 over 99 generations in place of its Nelder–Mead
// (about 9 400 analyses) into a fresh folder: the whole run, results.db,
// evaluations.csv, figures and report included. It reports the sizes of
// results.db and evaluations.csv per evaluation, the evaluations, the
// discipline calls of their analyses and the time of the writing of the
// folder (from the "writing" event of RunOptions.Watch, after the last
// cell, to the return of Run, the stores closed), with the CPU time of
// the process over the writing and over the whole run (user and system,
// every goroutine: less disturbed than wall time by other work on the
// machine).
func BenchmarkBusinessJetGARun(b *testing.B) {
	src, err := os.ReadFile(filepath.Join("..", "studies", "business_jet.study"))
	if err != nil {
		b.Fatal(err)
	}
	const nm = "optimizers.NelderMead{MaxEvaluations: 1200}"
	if !bytes.Contains(src, []byte(nm)) {
		b.Fatalf("business_jet.study no longer runs %s", nm)
	}
	ga := bytes.Replace(src, []byte(nm), []byte("optimizers.GA{Evolution: optimizers.Evolution{Population: 100, Generations: 99}}"), 1)
	file := filepath.Join(b.TempDir(), "business_jet_ga.study")
	if err := os.WriteFile(file, ga, 0o644); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	var dbPerEval, csvPerEval, evaluations, calls float64
	var writing, writingCPU, runCPU time.Duration
	runs := 0
	for b.Loop() {
		dir := filepath.Join(b.TempDir(), "out")
		var began time.Time
		var cpuBegan time.Duration
		watch := func(ev RunEvent) {
			if ev.Kind == "writing" {
				began, cpuBegan = time.Now(), processCPU()
			}
		}
		cpu0 := processCPU()
		rec, err := Run(context.Background(), RunOptions{File: file, OutDir: dir, Watch: watch})
		ended, cpuEnded := time.Now(), processCPU()
		if err != nil {
			b.Fatal(err)
		}
		if began.IsZero() {
			b.Fatal("Run did not say when it began writing the folder")
		}
		writing += ended.Sub(began)
		writingCPU += cpuEnded - cpuBegan
		runCPU += cpuEnded - cpu0
		runs++
		if rec.Result == nil {
			b.Fatal("the study handed over no result")
		}
		calls = float64(rec.Result.DisciplineCalls)
		sum, err := store.ReadSummary(filepath.Join(dir, "summary.json"))
		if err != nil {
			b.Fatal(err)
		}
		if sum.Evaluations <= 0 {
			b.Fatalf("summary.json counts %d evaluations", sum.Evaluations)
		}
		evaluations = float64(sum.Evaluations)
		dbPerEval = float64(runFileSize(b, dir, "results.db")) / evaluations
		csvPerEval = float64(runFileSize(b, dir, "evaluations.csv")) / evaluations
	}
	b.ReportMetric(dbPerEval, "db-bytes/evaluation")
	b.ReportMetric(csvPerEval, "csv-bytes/evaluation")
	b.ReportMetric(evaluations, "evaluations")
	b.ReportMetric(calls, "discipline-calls")
	b.ReportMetric(float64(writing.Microseconds())/1000/float64(runs), "writing-ms/op")
	b.ReportMetric(float64(writingCPU.Microseconds())/1000/float64(runs), "writing-cpu-ms/op")
	b.ReportMetric(float64(runCPU.Microseconds())/1000/float64(runs), "cpu-ms/op")
}

// processCPU returns the process's user plus system CPU time.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// runFileSize returns the size of the one file called name in a result
// folder of the script's folder dir.
func runFileSize(b *testing.B, dir, name string) int64 {
	b.Helper()
	files, _ := filepath.Glob(filepath.Join(dir, "*", name))
	if len(files) != 1 {
		b.Fatalf("%d %s files in the result folders of %s", len(files), name, dir)
	}
	st, err := os.Stat(files[0])
	if err != nil {
		b.Fatal(err)
	}
	return st.Size()
}
