package distribute

import (
	"context"
	"fmt"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/repl"
)

// turnsScript runs three optimisations of the Sellar problem (Sellar,
// Batill & Renaud 1996) one after another: a GA, then a loop of two
// Nelder-Mead searches that start from the GA's best point, so that the
// later ones depend on the earlier results. Each prints its best point's
// bits and its analyses (gaScript, then the loop).
var turnsScript = strings.NewReplacer(
	"import (\n", "import (\n\t\"fmt\"\n\t\"math\"\n\n",
	"cell.Publish(res)\n", `fmt.Printf("GA: f %x, %d analyses\n", math.Float64bits(res.Best.F[0]), res.Analyses)

//~ cell 2
var last *mdo.Result
for _, size := range []float64{0.2, 0.05} {
	s, err := mdo.SellarStudy(mdo.MDF)
	if err != nil {
		panic(err)
	}
	s.Workers = 2
	s.Fixed = res.DesignValues()
	r, err := optimizers.NelderMead{MaxEvaluations: 30, SimplexSize: size}.Minimize(cell.Context(), s)
	if err != nil {
		panic(err)
	}
	fmt.Printf("Nelder-Mead %g: f %x, %d analyses\n", size, math.Float64bits(r.Best.F[0]), r.Analyses)
	last = r
}
cell.Publish(last)
`).Replace(gaScript)

// TestEveryOptimisationIsSpread runs a script of three optimisations in
// turn here and over two workers: every one of them is spread (the
// coordinator takes a result for every analysis of the three) and the
// outcome is the same, bit for bit.
func TestEveryOptimisationIsSpread(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	here, err := repl.Run(ctx, repl.RunOptions{File: writeStudy(t, turnsScript), OutDir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	h := startHub(t)
	log := newLog()
	co := coordinate(t, h, turnsScript, 5*time.Second, log)
	for i := range 2 {
		startWorker(t, h, WorkerConfig{Name: fmt.Sprintf("w%d", i+1), Build: "test-build", Parallel: 2})
	}
	spread, err := repl.Run(mdo.WithDispatcher(ctx, co), repl.RunOptions{File: writeStudy(t, turnsScript), OutDir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	analyses := 0
	for i, c := range here.Cells {
		if spread.Cells[i].Output != c.Output {
			t.Errorf("cell %d printed here:\n%s\nspread:\n%s", i+1, c.Output, spread.Cells[i].Output)
		}
		for _, m := range regexp.MustCompile(`(\d+) analyses`).FindAllStringSubmatch(c.Output, -1) {
			n, _ := strconv.Atoi(m[1])
			analyses += n
		}
	}
	sameBest(t, here.Result, spread.Result)
	if taken, _ := co.Counts(); taken != analyses || analyses == 0 {
		t.Errorf("the coordinator took %d results from the workers; the three optimisations analysed %d points", taken, analyses)
	}
	if t.Failed() {
		t.Logf("the coordinator's log:\n%s", log)
	}
}

// TestTurnsOfEvaluators checks the coordinator's rule for whose batch is
// spread: an Evaluator that comes while a batch of the served one is out
// runs here, said once; one that comes after becomes the served one; the
// one before it, served no more, runs here, said once.
func TestTurnsOfEvaluators(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	h := startHub(t)
	log := newLog()
	co := coordinate(t, h, turnsScript, time.Second, log)
	evaluator := func(name string) *mdo.Evaluator {
		s, err := mdo.SellarStudy(mdo.MDF)
		if err != nil {
			t.Fatal(err)
		}
		s.Name = name
		e, err := s.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	first, second, third := evaluator("first"), evaluator("second"), evaluator("third")
	for _, step := range []struct {
		e       *mdo.Evaluator
		release bool // every batch out comes back before the next step
		ev      int
		here    bool
		says    string
	}{
		{e: first, ev: 1},
		{e: second, here: true, says: `the analyses of study "second" run on this process: another optimisation (study "first") is being spread at the same time`},
		{e: second, here: true},
		{e: first, release: true, ev: 1},
		{e: second, here: true}, // it ran here: it goes on here, as the workers' replays do
		{e: third, release: true, ev: 2},
		{e: first, here: true, says: `the analyses of study "first" run on this process: its turn ended when the analyses of study "third" began to be spread`},
		{e: first, here: true},
		{e: third, ev: 2},
	} {
		before := log.String()
		ev, _, _, here, err := co.serve(ctx, step.e)
		if err != nil {
			t.Fatal(err)
		}
		if here != step.here || (!here && ev != step.ev) {
			t.Errorf("batch of study %q: here %v, turn %d; want here %v, turn %d", step.e.Study().Name, here, ev, step.here, step.ev)
		}
		said := strings.TrimPrefix(log.String(), before)
		if (step.says == "") != (said == "") || !strings.Contains(said, step.says) {
			t.Errorf("batch of study %q: the log says %q, want %q", step.e.Study().Name, said, step.says)
		}
		if step.release {
			co.mu.Lock()
			co.inflight = 0
			co.mu.Unlock()
		}
	}
}
