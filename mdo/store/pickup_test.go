package store

import (
	"bufio"
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"couplet/mdo"
)

// The crash test re-executes the test binary as a helper process that
// runs a study recording to a store; the parent kills it with SIGKILL
// after some batches are committed and picks the run up.
const (
	helperEnv   = "COUPLET_STORE_CRASH_HELPER"
	helperBatch = 5 // evaluations per store commit in the helper
)

// searchBatches and searchLambda size the helper's optimiser.
const (
	searchBatches = 40
	searchLambda  = 6
)

// randomSearch is a small deterministic optimiser: a (1+λ) search in the
// unit box whose step adapts to success, drawing from a PCG seeded by the
// study's seed. The points it asks for depend on the answers, so picking up
// only reproduces the uninterrupted run if picked-up evaluations are exact.
func randomSearch(ctx context.Context, ev *mdo.Evaluator, pause time.Duration) (*mdo.Result, error) {
	rng := rand.New(rand.NewPCG(ev.Seed(), 0x5eed))
	if err := ev.Begin("test-random-search", map[string]string{"lambda": strconv.Itoa(searchLambda)}); err != nil {
		return nil, err
	}
	center := ev.Start()
	sigma := 0.3
	for it := 0; it < searchBatches; it++ {
		xs := make([][]float64, searchLambda)
		for i := range xs {
			xs[i] = make([]float64, len(center))
			for k := range center {
				xs[i][k] = math.Max(0, math.Min(1, center[k]+sigma*rng.NormFloat64()))
			}
		}
		before := ev.Best()
		if _, err := ev.Evaluate(ctx, xs); err != nil {
			return nil, err
		}
		if b := ev.Best(); b != before {
			center = append([]float64(nil), b.X...)
			sigma = math.Min(0.5, sigma*1.5)
		} else {
			sigma *= 0.7
		}
		ev.Iteration(it)
		if pause > 0 {
			time.Sleep(pause)
		}
	}
	return ev.Finish(mdo.StopBudget)
}

// TestCrashHelper is the helper process; it does nothing in a normal run.
func TestCrashHelper(t *testing.T) {
	path := os.Getenv(helperEnv)
	if path == "" {
		t.Skip("helper process for TestPickUpAfterSIGKILL")
	}
	s, err := Create(path, Options{ToolVersion: "crash-helper", BatchSize: helperBatch, FlushInterval: time.Hour,
		OnCommit: func(rows int) { fmt.Printf("committed %d\n", rows) }})
	if err != nil {
		fmt.Println("error", err)
		os.Exit(3)
	}
	ev := sellarEvaluator(t, s, 2026, sellarScript)
	if _, err := randomSearch(context.Background(), ev, 50*time.Millisecond); err != nil {
		fmt.Println("error", err)
		os.Exit(3)
	}
	s.Close()
	fmt.Println("finished")
	os.Exit(0)
}

func TestPickUpAfterSIGKILL(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a helper process")
	}
	dir := t.TempDir()
	// the uninterrupted run
	full, err := Create(filepath.Join(dir, "full.db"), Options{BatchSize: helperBatch})
	if err != nil {
		t.Fatal(err)
	}
	want, err := randomSearch(context.Background(), sellarEvaluator(t, full, 2026, sellarScript), 0)
	if err != nil {
		t.Fatal(err)
	}
	full.Close()

	// the run that is killed part-way
	path := filepath.Join(dir, "killed.db")
	cmd := exec.Command(os.Args[0], "-test.run=^TestCrashHelper$", "-test.v")
	cmd.Env = append(os.Environ(), helperEnv+"="+path)
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	sc := bufio.NewScanner(out)
	commits, killedAt := 0, 0
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "error") || line == "finished" {
			cmd.Process.Kill()
			cmd.Wait()
			t.Fatalf("helper ended before it was killed: %s", line)
		}
		if n, ok := strings.CutPrefix(line, "committed "); ok {
			commits++
			killedAt, _ = strconv.Atoi(n)
			if commits == 6 {
				if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
					t.Fatal(err)
				}
				break
			}
		}
	}
	go func() {
		for sc.Scan() {
		}
	}()
	err = cmd.Wait()
	if ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); !ok || !ws.Signaled() || ws.Signal() != syscall.SIGKILL {
		t.Fatalf("helper was not killed by SIGKILL: %v", err)
	}

	// pick up: refuse nothing, pick up everything committed
	s, err := PickUp(path, Options{BatchSize: helperBatch})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	prev, err := s.PickedUp(sellarScript, 2026)
	if err != nil {
		t.Fatal(err)
	}
	if len(prev) < killedAt || len(prev) >= want.Analyses {
		t.Fatalf("store after SIGKILL holds %d rows; %d were reported committed and the full run has %d", len(prev), killedAt, want.Analyses)
	}
	t.Logf("killed after %d committed rows; store holds %d; the uninterrupted run analysed %d", killedAt, len(prev), want.Analyses)
	ev := sellarEvaluator(t, s, 2026, sellarScript)
	ev.PickUp(prev)
	got, err := randomSearch(context.Background(), ev, 0)
	if err != nil {
		t.Fatal(err)
	}
	if got.Best == nil || want.Best == nil {
		t.Fatal("no best point")
	}
	if f := sameEvaluation(got.Best, want.Best); f != "" && f != "Wall" {
		t.Errorf("picked-up best #%d differs from the uninterrupted best #%d in %s: %v vs %v", got.Best.ID, want.Best.ID, f, got.Best.Design, want.Best.Design)
	}
	if got.Evaluations > want.Evaluations {
		t.Errorf("picked-up run answered %d points, the uninterrupted run %d", got.Evaluations, want.Evaluations)
	}
	if got.PickedUp != len(prev) || got.Analyses != want.Analyses-len(prev) {
		t.Errorf("picked-up run: %d picked up and %d analysed; want %d picked up and %d analysed", got.PickedUp, got.Analyses, len(prev), want.Analyses-len(prev))
	}
	if s.Rows() != want.Analyses {
		t.Errorf("picked-up store holds %d rows, the uninterrupted one %d", s.Rows(), want.Analyses)
	}
	// the picked-up store's rows equal the uninterrupted store's, apart from wall times
	a, err := s.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	ref, err := Open(filepath.Join(dir, "full.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer ref.Close()
	b, err := ref.Evaluations()
	if err != nil {
		t.Fatal(err)
	}
	if len(a) != len(b) {
		t.Fatalf("picked-up store has %d evaluations, uninterrupted %d", len(a), len(b))
	}
	for i := range a {
		a[i].Wall, b[i].Wall = 0, 0
		if f := sameEvaluation(a[i], b[i]); f != "" {
			t.Fatalf("evaluation %d differs in %s between the picked-up and the uninterrupted store", i, f)
		}
	}
}
