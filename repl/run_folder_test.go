package repl

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"

	"couplet/mdo/runfolder"
	"couplet/mdo/store"
)

// studyHead is the header of the study files written by these tests.
const studyHead = "//~ couplet-study 1 (couplet 0.1.0)\n"

// sellarCells are the cells of a short Sellar optimisation that
// publishes its result.
const sellarCells = `
//~ cell 1
import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)

study, err := mdo.SellarStudy(mdo.MDF)
if err != nil {
	panic(err)
}
study.Seed = 2
study.Workers = 1
if err := cell.Attach(study); err != nil {
	panic(err)
}
result, err := optimizers.NelderMead{MaxEvaluations: 30}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(result)
`

// writeStudy writes a study file of the given cells into a fresh folder.
func writeStudy(t *testing.T, name, cells string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name+".study")
	if err := os.WriteFile(p, []byte(studyHead+cells), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// runInto replays a study file into dir and returns the error and the
// reports.
func runInto(t *testing.T, ctx context.Context, file, dir string, change func(*RunOptions)) (string, error) {
	t.Helper()
	var stderr bytes.Buffer
	opts := RunOptions{File: file, OutDir: dir, Stderr: &stderr}
	if change != nil {
		change(&opts)
	}
	_, err := Run(ctx, opts)
	return stderr.String(), err
}

// wantBest checks that dir holds the output of a published result:
// summary.json with its best point, and the result's folder with its
// evaluations.csv, report.html and history.
func wantBest(t *testing.T, dir string) store.Summary {
	t.Helper()
	sum, err := store.ReadSummary(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	if sum.Best == nil || sum.Evaluations == 0 {
		t.Errorf("summary.json has no best point: %+v", sum)
	}
	sub := resultFolder(t, dir)
	for _, name := range []string{"evaluations.csv", "report.html", "history.svg"} {
		if fi, err := os.Stat(filepath.Join(sub, name)); err != nil || fi.Size() == 0 {
			t.Errorf("%s not written: %v", name, err)
		}
	}
	return sum
}

// A later cell that fails, or a run stopped after a result was
// published, still leaves that result's summary, CSV, plots and report.
func TestEarlierResultSurvivesALaterCell(t *testing.T) {
	failing := writeStudy(t, "fails_later", sellarCells+"\n//~ cell 2\npanic(\"a later cell fails\")\n")
	dir := filepath.Join(t.TempDir(), "out")
	stderr, err := runInto(t, context.Background(), failing, dir, nil)
	if err == nil || !strings.Contains(err.Error(), "a later cell fails") {
		t.Fatalf("err = %v, want the later cell's failure", err)
	}
	wantBest(t, dir)
	if !strings.Contains(stderr, "is written into") {
		t.Errorf("stderr does not say the earlier result was written: %q", stderr)
	}

	// stopped in a loop that only the run's end breaks: the test cancels
	// the run when the cell says it spins
	spinning := writeStudy(t, "spins_later", sellarCells+"\n//~ cell 2\nfmt.Println(\"spinning\")\nfor {\n}\n")
	dir = filepath.Join(t.TempDir(), "out")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	_, err = runInto(t, ctx, spinning, dir, func(o *RunOptions) { o.Stdout = &cancelOn{word: "spinning", cancel: cancel} })
	if err == nil {
		t.Fatal("a stopped run reports no error")
	}
	wantBest(t, dir)
}

// cancelOn cancels a context when the text written to it holds word.
type cancelOn struct {
	mu     sync.Mutex
	text   strings.Builder
	word   string
	cancel context.CancelFunc
}

func (c *cancelOn) Write(p []byte) (int, error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.text.Write(p)
	if strings.Contains(c.text.String(), c.word) {
		c.cancel()
	}
	return len(p), nil
}

// A two-objective study whose every evaluation fails has no Pareto front
// to draw: the report is written with the reason in the figure's place
// (and the run ends in an error that says every evaluation failed).
func TestReportOfAStudyWhoseEveryEvaluationFailed(t *testing.T) {
	file := writeStudy(t, "doomed", `
//~ cell 1
import (
	"errors"

	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)

sys, err := mdo.NewSystem(mdo.Func("closure", []string{"x"}, []string{"f", "g"}, func(in, out []float64) error {
	return errors.New("the design does not close")
}))
if err != nil {
	panic(err)
}
study := &mdo.Study{Name: "doomed", System: sys, Design: []mdo.DesignVar{mdo.Continuous("x", 0, 1)},
	Objectives: []mdo.Objective{mdo.Minimize("f"), mdo.Minimize("g")}, Seed: 4, Workers: 1}
if err := cell.Attach(study); err != nil {
	panic(err)
}
result, err := optimizers.LatinHypercube{Samples: 6}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(result)
`)
	dir := filepath.Join(t.TempDir(), "out")
	var all *AllFailedError
	if stderr, err := runInto(t, context.Background(), file, dir, nil); !errors.As(err, &all) {
		t.Fatalf("err = %v, want the study's every evaluation failed\n%s", err, stderr)
	}
	dir = resultFolder(t, dir)
	page, err := os.ReadFile(filepath.Join(dir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "(pareto) could not be drawn") {
		t.Errorf("report.html does not say why the Pareto front is left out")
	}
	if _, err := os.Stat(filepath.Join(dir, "pareto.svg")); err == nil {
		t.Error("pareto.svg written for a study without a feasible evaluation")
	}
}

// usageErr checks that err is a usage error (exit status 2) whose
// message holds every wanted text.
func usageErr(t *testing.T, what string, err error, wants ...string) {
	t.Helper()
	var ue *UsageError
	if !errors.As(err, &ue) {
		t.Fatalf("%s: err = %v, want a usage error", what, err)
	}
	for _, w := range wants {
		if !strings.Contains(err.Error(), w) {
			t.Errorf("%s: %q does not say %q", what, err, w)
		}
	}
}

// A folder holding another run is refused, saying the choices; --replace
// clears every file of the old run (the tool's and the script's own)
// first, so that a folder never mixes two runs, and leaves other files.
func TestOccupiedFolder(t *testing.T) {
	file := writeStudy(t, "small", sellarCells)
	dir := filepath.Join(t.TempDir(), "out")
	if stderr, err := runInto(t, context.Background(), file, dir, nil); err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	before, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = runInto(t, context.Background(), file, dir, nil)
	usageErr(t, "a second run", err, "holds another run", "--pick-up", "--replace", "summary.json")
	if after, _ := os.ReadFile(filepath.Join(dir, "summary.json")); !bytes.Equal(before, after) {
		t.Error("the refused run changed summary.json")
	}

	// files an older run of another study left: a front, a second store,
	// a file of its script's own; and a file of the user's
	for _, name := range []string{"pareto.svg", "pareto.png", "results-2.db", "keep.txt"} {
		if err := os.WriteFile(filepath.Join(dir, name), []byte("old"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := runfolder.WriteOwn(dir, "old_points.csv", []byte("a\n")); err != nil {
		t.Fatal(err)
	}
	if stderr, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.Replace = true }); err != nil {
		t.Fatalf("--replace: %v\n%s", err, stderr)
	}
	wantBest(t, dir)
	for _, name := range []string{"pareto.svg", "pareto.png", "results-2.db", "old_points.csv"} {
		if _, err := os.Lstat(filepath.Join(dir, name)); err == nil {
			t.Errorf("--replace left the old run's %s", name)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "keep.txt")); err != nil {
		t.Errorf("--replace removed a file that is not the run's: %v", err)
	}
	_, err = runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.Replace, o.PickUp = true, true })
	usageErr(t, "--pick-up with --replace", err, "choose one")
}

// --pick-up into a folder with nothing to pick up says so.
func TestPickUpWithNothingToPickUp(t *testing.T) {
	file := writeStudy(t, "small", sellarCells)
	for _, dir := range []string{filepath.Join(t.TempDir(), "new"), t.TempDir()} {
		_, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.PickUp = true })
		usageErr(t, "--pick-up into "+dir, err, "nothing to pick up", "results.db")
		if _, err := os.Stat(filepath.Join(dir, "summary.json")); err == nil {
			t.Errorf("the refused pick-up wrote summary.json")
		}
	}
}

// A second run into a folder while one writes it is refused, naming the
// process that holds it.
func TestFolderInUse(t *testing.T) {
	file := writeStudy(t, "small", sellarCells)
	dir := t.TempDir()
	lock, err := runfolder.TakeLock(dir) // the run in progress
	if err != nil {
		t.Fatal(err)
	}
	_, err = runInto(t, context.Background(), file, dir, nil)
	usageErr(t, "a concurrent run", err, "in use by another run", "process "+strconv.Itoa(os.Getpid()))
	if err := lock.Release(); err != nil {
		t.Fatal(err)
	}
	if stderr, err := runInto(t, context.Background(), file, dir, nil); err != nil {
		t.Fatalf("after the first run ended: %v\n%s", err, stderr)
	}
}

// Nothing the tool or the script writes goes through a symbolic link: a
// link named like a script's file or a tool's file is replaced, its
// target unchanged; a script cannot write the tool's names.
func TestNoWriteThroughALink(t *testing.T) {
	target := filepath.Join(t.TempDir(), "precious.txt")
	const text = "not the tool's to change\n"
	if err := os.WriteFile(target, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	file := writeStudy(t, "writer", sellarCells+`
//~ cell 2
if err := cell.WriteFile("points.csv", []byte("x,f\n")); err != nil {
	panic(err)
}
for _, name := range []string{"summary.json", "results.db", "results.db-journal", "report.html", "evaluations.csv", "history.svg"} {
	if err := cell.WriteFile(name, []byte("forged")); err == nil {
		panic("the script wrote " + name)
	}
}
`)
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, "sellar"), 0o755); err != nil {
		t.Fatal(err)
	}
	linked := []string{"points.csv", filepath.Join("sellar", "report.html")}
	for _, name := range linked {
		if err := os.Symlink(target, filepath.Join(dir, name)); err != nil {
			t.Fatal(err)
		}
	}
	// a link named like a tool's file, in the folder of a result, makes
	// the folder an old run's
	_, err := runInto(t, context.Background(), file, dir, nil)
	usageErr(t, "a folder with sellar/report.html", err, "holds another run", "sellar/report.html")
	if stderr, err := runInto(t, context.Background(), file, dir, func(o *RunOptions) { o.Replace = true }); err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	if b, _ := os.ReadFile(target); string(b) != text {
		t.Errorf("a write went through a link: the target holds %q", b)
	}
	for _, name := range linked {
		fi, err := os.Lstat(filepath.Join(dir, name))
		if err != nil || fi.Mode()&os.ModeSymlink != 0 {
			t.Errorf("%s: %v, want a file of the run in place of the link", name, err)
		}
	}
	wantBest(t, dir)
}

// A session that makes its own outputs holds its folder like a run: a
// second session into it is refused, naming the process; a folder holding
// an earlier run is refused unless ReplaceOld clears it; Close frees it.
func TestSessionHoldsItsFolder(t *testing.T) {
	dir := t.TempDir()
	s, err := NewSession(Options{OutDir: dir})
	if err != nil {
		t.Fatal(err)
	}
	_, err = NewSession(Options{OutDir: dir})
	usageErr(t, "a second session", err, "in use by another run", "process "+strconv.Itoa(os.Getpid()))
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "summary.json"), []byte("{}"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = NewSession(Options{OutDir: dir})
	usageErr(t, "a session into an old run", err, "holds another run (summary.json)", "--replace")
	s, err = NewSession(Options{OutDir: dir, ReplaceOld: true})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if _, err := os.Stat(filepath.Join(dir, "summary.json")); err == nil {
		t.Error("ReplaceOld left the old run's summary.json")
	}
}
