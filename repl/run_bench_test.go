package repl

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"

	"couplet/mdo/store"
)

// BenchmarkBusinessJetGARun replays studies/business_jet.study with a GA
// of population 100 over 99 generations in place of its Nelder–Mead
// (about 9 400 analyses) into a fresh folder: the whole run, results.db,
// evaluations.csv, figures and report included. It reports the size of
// results.db per evaluation.
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
	var perEval float64
	for b.Loop() {
		dir := filepath.Join(b.TempDir(), "out")
		if _, err := Run(context.Background(), RunOptions{File: file, OutDir: dir}); err != nil {
			b.Fatal(err)
		}
		dbs, _ := filepath.Glob(filepath.Join(dir, "*", "results.db"))
		if len(dbs) != 1 {
			b.Fatalf("%d results.db files", len(dbs))
		}
		st, err := os.Stat(dbs[0])
		if err != nil {
			b.Fatal(err)
		}
		sum, err := store.ReadSummary(filepath.Join(dir, "summary.json"))
		if err != nil {
			b.Fatal(err)
		}
		perEval = float64(st.Size()) / float64(sum.Evaluations)
	}
	b.ReportMetric(perEval, "db-bytes/evaluation")
}
