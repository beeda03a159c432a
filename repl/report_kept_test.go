package repl

import (
	"bytes"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"couplet/mdo"
)

// keptRun is a session's input that runs Nelder–Mead on the Sellar
// problem (every output to the CSV) as variable res.
const keptRun = `import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)
cell.EveryOutput()
st, err := mdo.SellarStudy(mdo.MDF)
st.Seed = 4
cell.Attach(st)
res, err := optimizers.NelderMead{MaxEvaluations: 120}.Minimize(cell.Context(), st)
`

// stamp matches the times a report carries (its start, its writing).
var stamp = regexp.MustCompile(`\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d(\.\d+)?Z`)

// sameFolders compares the files of two result folders byte for byte,
// the timestamps of report.html masked.
func sameFolders(t *testing.T, a, b string) {
	t.Helper()
	entries, err := os.ReadDir(a)
	if err != nil {
		t.Fatal(err)
	}
	names := 0
	for _, e := range entries {
		if e.Name() == StoreFile {
			continue
		}
		names++
		x, err := os.ReadFile(filepath.Join(a, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		y, err := os.ReadFile(filepath.Join(b, e.Name()))
		if err != nil {
			t.Errorf("%s: %v", e.Name(), err)
			continue
		}
		if e.Name() == "report.html" {
			x, y = stamp.ReplaceAll(x, []byte("TIME")), stamp.ReplaceAll(y, []byte("TIME"))
		}
		if !bytes.Equal(x, y) {
			t.Errorf("%s differs: %d bytes from memory, %d read back", e.Name(), len(x), len(y))
		}
	}
	if more, _ := os.ReadDir(b); len(more) != names {
		t.Errorf("%s holds %d files beside its results.db, %s %d", a, names, b, len(more))
	}
	if names < 5 {
		t.Errorf("only %d files compared", names)
	}
}

// @report writes a result's folder from the evaluations the session
// kept in memory (KeepWithin), reading results.db for nothing; when they
// were let go it reads them back from results.db and says nothing is
// lost. The two folders are the same, byte for byte (timestamps
// masked). (Before, @report always read results.db back: there was no
// KeepWithin.)
func TestReportFromMemoryOrReadBack(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	outs := NewRunOutputs(dir)
	outs.KeepWithin = 1 << 30
	s, out, errb := newTest(t, Options{OutDir: dir, Outputs: outs})
	defer s.Close()
	serve(t, s, keptRun+"@report res\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	if outs.readBack != 0 || strings.Contains(out.String(), "read back") {
		t.Fatalf("the first report read %d results.db back (output %q), want it written from memory", outs.readBack, out)
	}
	v, err := s.Eval(t.Context(), "test", "res")
	if err != nil {
		t.Fatal(err)
	}
	r := v.(*mdo.Result)
	// the budget shrinks: the run's kept evaluations are let go
	outs.KeepWithin = 1
	if err := outs.runEnded(outs.storeOf(r)); err != nil {
		t.Fatal(err)
	}
	out.Reset()
	serve(t, s, "@report res\n")
	if outs.readBack != 1 || !strings.Contains(out.String(), "read back from "+filepath.Join(dir, "sellar", StoreFile)) || !strings.Contains(out.String(), "nothing is lost") {
		t.Fatalf("the second report: %d read back, output %q; want it read back from results.db, saying nothing is lost", outs.readBack, out)
	}
	sameFolders(t, filepath.Join(dir, "sellar"), filepath.Join(dir, "sellar-2"))
}

// Within KeepWithin a session keeps each run's evaluations; a run that
// ends past it lets the oldest go, and a run begun with the budget full
// keeps none; their reports read results.db back.
func TestKeepWithinLetsTheOldestGo(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	outs := NewRunOutputs(dir)
	// room for one run of 120 Sellar evaluations (3 design variables, one
	// objective, two constraints, four outputs), not two
	perRow := keptRowBytes(mdo.RunInfo{Design: make([]mdo.DesignSpec, 3), Objectives: []string{"f"}, Constraints: []string{"g1", "g2"}, Outputs: make([]mdo.Var, 4)})
	outs.KeepWithin = 150 * perRow
	s, out, errb := newTest(t, Options{OutDir: dir, Outputs: outs})
	defer s.Close()
	serve(t, s, keptRun+"first := res\nres, err = optimizers.NelderMead{MaxEvaluations: 120}.Minimize(cell.Context(), st)\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	serve(t, s, "@report res\n")
	if outs.readBack != 0 {
		t.Errorf("the last run's report read results.db back (%q), want it from memory", out)
	}
	serve(t, s, "@report first\n")
	if outs.readBack != 1 || !strings.Contains(out.String(), "nothing is lost") {
		t.Errorf("the first run's report: %d read back, output %q; want it read back, the oldest let go", outs.readBack, out)
	}
}
