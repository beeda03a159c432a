package repl

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/report"
	"couplet/mdo/store"
)

// newTest starts a session writing to buffers.
func newTest(t *testing.T, opts Options) (*Session, *bytes.Buffer, *bytes.Buffer) {
	t.Helper()
	var out, errb bytes.Buffer
	opts.Stdout, opts.Stderr = &out, &errb
	s, err := NewSession(opts)
	if err != nil {
		t.Fatal(err)
	}
	return s, &out, &errb
}

// serve feeds input to a session as typed lines.
func serve(t *testing.T, s *Session, input string) {
	t.Helper()
	if err := s.Serve(context.Background(), NewLineReader(strings.NewReader(input), nil)); err != nil {
		t.Fatal(err)
	}
}

func TestSessionShowsTrailingExpressions(t *testing.T) {
	tests := []struct {
		name, input, want string
	}{
		{"integer", "x := 20\nx + 22\n", "42\n"},
		{"float shortest form", "a := 0.1\na + 0.2\n", "0.30000000000000004\n"},
		{"constant arithmetic is exact", "0.1 + 0.2\n", "0.3\n"},
		{"string as is", "\"wing\" + \".area\"\n", "wing.area\n"},
		{"no value for statements", "y := 3\ny++\n", ""},
		{"print not echoed", "import \"fmt\"\nfmt.Println(\"lift\")\n", "lift\n"},
		{"multi-line cell", "func sq(a float64) float64 {\n\treturn a *\n\t\ta\n}\nsq(1.5)\n", "2.25\n"},
		{"imports with statements in one cell", "import \"math\"\nr := math.Sqrt(2)\nr * r > 1.99\n", "true\n"},
		{"framework type via String", "import \"couplet/mdo\"\nmdo.Minimize(\"mass.takeoff\")\n", "minimise mass.takeoff\n"},
		{"variable listing as a table", "import \"couplet/mdo\"\n[]mdo.Var{{Name: \"wing.area\", Unit: \"m2\", Default: 100, Min: 10, Max: 900, Description: \"reference area\"}}\n",
			"name       unit  default  range      description\nwing.area  m2    100      [10, 900]  reference area\n"},
		{"error value", "import \"errors\"\nerrors.New(\"no lift\")\n", "error: no lift\n"},
		{"slice", "[]float64{1, 2.5}\n", "[1 2.5]\n"},
		{"void call shows nothing", "func hush() {}\nhush()\n", ""},
		{"nil error of a call not shown", "func check() error { return nil }\ncheck()\n", ""},
		{"nil variable shown", "var e error\ne\n", "<nil>\n"},
		{"value after print on the same line", "import \"fmt\"\nfmt.Print(\"a\")\n7\n", "a7\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, errb := newTest(t, Options{})
			serve(t, s, tc.input)
			if errb.Len() > 0 {
				t.Fatalf("stderr: %s", errb)
			}
			if out.String() != tc.want {
				t.Errorf("output %q, want %q", out.String(), tc.want)
			}
		})
	}
}

func TestSessionDSMOfSellar(t *testing.T) {
	s, out, errb := newTest(t, Options{})
	serve(t, s, "import \"couplet/mdo\"\nsys, err := mdo.NewSystem(mdo.Sellar()...)\n@coupling sys\n")
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	// Sellar's two analyses feed each other (y1 and y2): one coupled
	// group of two, then the functions (Sellar, Batill & Renaud 1996).
	for _, w := range []string{"sellar1 -> sellar2: y1", "sellar2 -> sellar1: y2", "design structure matrix: 3 disciplines, 2 groups"} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("coupling output lacks %q:\n%s", w, out)
		}
	}
}

func TestSessionReportsFailuresAndGoesOn(t *testing.T) {
	tests := []struct {
		name, cell string
		kind       string
		cellNo     int
		line       int
		msg        string
	}{
		{"panic", "a := 1\nb := a + 1\npanic(\"stall\")", "panic", 1, 3, "stall"},
		{"runtime panic in a loop", "m := map[string]int(nil)\nfor i := 0; i < 2; i++ {\n\tm[\"k\"] = i\n}", "panic", 1, 3, "nil map"},
		{"index out of range", "xs := []float64{1}\nk := 3\n_ = xs[k]", "panic", 1, 3, "index out of range"},
		{"compile error", "a := 1\nb := a.Span", "compile", 1, 2, "Span"},
		{"type mismatch", "x := 1\nvar s string = x", "compile", 1, 2, ""},
		{"syntax error", "x := 1\ny := (2 +\nz := 3", "syntax", 1, 3, ""},
		{"undefined name", "q := 1\nr := undefinedThing + q", "compile", 1, 2, "undefined"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, _ := newTest(t, Options{})
			c := s.Exec(context.Background(), tc.cell)
			var ce *CellError
			if !errors.As(c.Err, &ce) {
				t.Fatalf("error %v (%T), want a *CellError", c.Err, c.Err)
			}
			if ce.Kind != tc.kind || ce.Cell != tc.cellNo || ce.Line != tc.line || !strings.Contains(ce.Error(), tc.msg) {
				t.Errorf("got %q (kind %s, cell %d, line %d), want kind %s cell %d line %d containing %q", ce, ce.Kind, ce.Cell, ce.Line, tc.kind, tc.cellNo, tc.line, tc.msg)
			}
			// The session goes on.
			c2 := s.Exec(context.Background(), "1 + 1")
			if c2.Err != nil || !strings.HasSuffix(out.String(), "2\n") || c2.Number != 2 {
				t.Errorf("after the failure: cell %d err %v output %q", c2.Number, c2.Err, out)
			}
		})
	}
}

func TestSaveReplayGivesSameOutputs(t *testing.T) {
	s, out1, _ := newTest(t, Options{})
	input := `import (
	"fmt"
	"couplet/mdo"
)
sys, err := mdo.NewSystem(mdo.Sellar()...)
sol, err := sys.Analyze(context.Background(), map[string]float64{"x": 1, "z1": 5, "z2": 2})
`
	_ = input
	cells := []string{
		"import (\n\t\"fmt\"\n\t\"context\"\n\t\"couplet/mdo\"\n)\nsys, err := mdo.NewSystem(mdo.Sellar()...)\nerr == nil",
		"sol, err := sys.Analyze(context.Background(), map[string]float64{\"x\": 1, \"z1\": 5, \"z2\": 2})\nif err != nil {\n\tpanic(err)\n}\nfmt.Printf(\"f = %.6f\\n\", sol.Get(\"f\"))",
		"undefinedName + 1", // fails: not saved
		"func double(v float64) float64 { return 2 * v }\ndouble(sol.Get(\"y1\"))",
		"sol.Table(\"y\")",
	}
	for _, c := range cells {
		s.Exec(context.Background(), c)
	}
	path := filepath.Join(t.TempDir(), "round")
	s.Command(context.Background(), "@save "+path)
	saved, err := ReadStudy(path + ".study")
	if err != nil {
		t.Fatal(err)
	}
	if len(saved.Cells) != 4 || !strings.HasPrefix(saved.Header, HeaderPrefix) {
		t.Fatalf("saved %d cells, header %q; want 4 cells and a header", len(saved.Cells), saved.Header)
	}
	var want []string
	for _, c := range s.Cells() {
		if c.Err == nil {
			want = append(want, c.Output)
		}
	}
	_ = out1
	r, _, errb := newTest(t, Options{})
	if err := r.Replay(context.Background(), saved, false); err != nil {
		t.Fatalf("replay: %v (%s)", err, errb)
	}
	got := r.Cells()
	if len(got) != len(want) {
		t.Fatalf("replay ran %d cells, want %d", len(got), len(want))
	}
	for i := range want {
		if got[i].Output != want[i] {
			t.Errorf("cell %d: replay output %q, session output %q", i+1, got[i].Output, want[i])
		}
	}
	// The Sellar analysis at the usual start point x = 1, z = (5, 2)
	// converges to y1 = 25.58830, y2 = 12.05848, f = 28.58830 (Sellar,
	// Batill & Renaud 1996; the standard MDA check value, from memory).
	if !strings.Contains(want[1], "f = 28.588") {
		t.Errorf("Sellar f at the start point: got %q, want f = 28.588…", want[1])
	}
}

func TestStudyFileFormat(t *testing.T) {
	tests := []struct {
		name, text string
		cells      []string
		lines      []int
	}{
		{"no marker is one cell", "x := 1\ny := 2\n", []string{"x := 1\ny := 2"}, []int{1}},
		{"header and markers", Header() + "\n\n//~ cell 1\na := 1\n\n//~ cell 2\n\nb := 2\nb\n", []string{"a := 1", "b := 2\nb"}, []int{4, 8}},
		{"marker numbers ignored", "//~ cell 7\nx\n//~ cell\ny\n", []string{"x", "y"}, []int{2, 4}},
		{"not a marker", "//~ cells are fun\nz\n", []string{"//~ cells are fun\nz"}, []int{1}},
		{"empty cells dropped", "//~ cell 1\n\n//~ cell 2\nq\n", []string{"q"}, []int{4}},
		{"windows line ends", "//~ cell 1\r\nx := 1\r\n", []string{"x := 1"}, []int{2}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f, err := ParseStudy(tc.text)
			if err != nil {
				t.Fatal(err)
			}
			if len(f.Cells) != len(tc.cells) {
				t.Fatalf("cells %q, want %q", f.Sources(), tc.cells)
			}
			for i := range tc.cells {
				if f.Cells[i].Source != tc.cells[i] || f.Cells[i].Line != tc.lines[i] {
					t.Errorf("cell %d = %q at line %d, want %q at line %d", i, f.Cells[i].Source, f.Cells[i].Line, tc.cells[i], tc.lines[i])
				}
			}
			// Formatting and parsing again gives the same cells.
			g, err := ParseStudy(FormatStudy(f.Sources()))
			if err != nil {
				t.Fatal(err)
			}
			if strings.Join(g.Sources(), "\x00") != strings.Join(f.Sources(), "\x00") {
				t.Errorf("round trip changed the cells: %q → %q", f.Sources(), g.Sources())
			}
		})
	}
	if _, err := ParseStudy(Header() + "\n\n"); err == nil {
		t.Error("a study file without code parsed without error")
	}
	if _, err := ParseStudy(HeaderPrefix + " 2 (couplet 9.0.0)\nx := 1\n"); err == nil || !strings.Contains(err.Error(), "newer couplet") {
		t.Errorf("a study file of a newer format: error %v", err)
	}
}

func TestSandboxRefusesBeforeRunning(t *testing.T) {
	dir := t.TempDir()
	victim := filepath.Join(dir, "keep.txt")
	if err := os.WriteFile(victim, []byte("data"), 0o644); err != nil {
		t.Fatal(err)
	}
	script := "//~ cell 1\nimport \"fmt\"\nfmt.Println(\"first cell ran\")\n//~ cell 2\nimport \"os\"\nos.Remove(" + quote(victim) + ")\n"
	study := filepath.Join(dir, "evil.study")
	if err := os.WriteFile(study, []byte(script), 0o644); err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	_, err := Run(context.Background(), RunOptions{File: study, OutDir: filepath.Join(dir, "out"), Stdout: &out})
	var re *RefusedImportError
	if !errors.As(err, &re) {
		t.Fatalf("run error %v, want a refusal", err)
	}
	if re.Path != "os" || re.Cell != 2 || re.Line != 1 || !strings.Contains(err.Error(), TrustFlag) || !strings.Contains(err.Error(), "evil.study:5") {
		t.Errorf("refusal %q: want import \"os\" in cell 2, line 1 (file line 5), naming %s", err, TrustFlag)
	}
	if out.Len() > 0 {
		t.Errorf("cells ran before the refusal: %q", out.String())
	}
	if _, err := os.Stat(victim); err != nil {
		t.Errorf("the file the script would delete is gone: %v", err)
	}
	// Modules beyond even the trusted set say so.
	for _, p := range []string{"os/exec", "net", "syscall", "unsafe", "io/ioutil", "net/http"} {
		s, _, _ := newTest(t, Options{})
		c := s.Exec(context.Background(), "import \""+p+"\"\n1")
		if !errors.As(c.Err, &re) || re.Path != p {
			t.Errorf("import %q: error %v, want a refusal", p, c.Err)
		}
	}
	// With the sandbox lifted the same script runs and removes the file.
	if _, err := Run(context.Background(), RunOptions{File: study, OutDir: filepath.Join(dir, "out"), Policy: Policy{Trusted: true}}); err != nil {
		t.Fatalf("trusted run: %v", err)
	}
	if _, err := os.Stat(victim); !os.IsNotExist(err) {
		t.Errorf("trusted script did not remove the file: %v", err)
	}
}

// quote returns a Go string literal.
func quote(s string) string { return "`" + s + "`" }

func TestInterruptStopsRunawayLoop(t *testing.T) {
	tests := []struct {
		name   string
		cell   string
		second bool // press Ctrl-C twice
	}{
		{"for {} after grace", "n := 0\nfor {\n\tn++\n}", false},
		{"for {} second interrupt", "for {\n}", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, _ := newTest(t, Options{Grace: 100 * time.Millisecond})
			done := make(chan *Cell)
			go func() { done <- s.Exec(context.Background(), tc.cell) }()
			deadline := time.Now().Add(5 * time.Second)
			for !s.Interrupt() {
				if time.Now().After(deadline) {
					t.Fatal("cell never started")
				}
				time.Sleep(5 * time.Millisecond)
			}
			if tc.second {
				s.Interrupt()
			}
			var c *Cell
			select {
			case c = <-done:
			case <-time.After(10 * time.Second):
				t.Fatal("the loop was not stopped")
			}
			var ce *CellError
			if !errors.As(c.Err, &ce) || ce.Kind != "stopped" || !strings.Contains(ce.Error(), "interrupted") {
				t.Fatalf("cell error %v, want stopped by interrupt", c.Err)
			}
			if r := s.Exec(context.Background(), "6 * 7"); r.Err != nil || !strings.HasSuffix(out.String(), "42\n") {
				t.Errorf("session did not go on: %v %q", r.Err, out)
			}
		})
	}
}

func TestCellContextCancelsCooperativeWork(t *testing.T) {
	s, out, errb := newTest(t, Options{Grace: 5 * time.Second})
	cellSrc := "import \"couplet/repl/cell\"\nctx := cell.Context()\nn := 0\nfor ctx.Err() == nil {\n\tn++\n}\n\"came back\""
	done := make(chan *Cell)
	go func() { done <- s.Exec(context.Background(), cellSrc) }()
	for !s.Interrupt() {
		time.Sleep(5 * time.Millisecond)
	}
	c := <-done
	if c.Err != nil || !c.Interrupted {
		t.Fatalf("cell err %v interrupted %v, want a cell that came back by itself", c.Err, c.Interrupted)
	}
	if !strings.Contains(out.String(), "came back") || !strings.Contains(errb.String(), "cancelled") {
		t.Errorf("output %q stderr %q", out, errb)
	}
}

func TestUnknownCommandAndHelp(t *testing.T) {
	s, out, errb := newTest(t, Options{})
	serve(t, s, "@nosuch\n@help\n")
	if !strings.Contains(errb.String(), "unknown command @nosuch") {
		t.Errorf("stderr %q", errb)
	}
	for _, w := range []string{"not for\ncertification, flight or airworthiness decisions", "licensed engineering practice", "@save", "@replay", "@coupling", "@fresh", "@cells", "@again"} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("help lacks %q", w)
		}
	}
}

func TestFreshAndAgain(t *testing.T) {
	s, out, errb := newTest(t, Options{})
	serve(t, s, "k := 1\nk++\nk\n@again 3\n@fresh\nk\n")
	if !strings.Contains(out.String(), "2\n2\n") {
		t.Errorf("again: output %q", out)
	}
	if !strings.Contains(errb.String(), "cell 1, line 1") {
		t.Errorf("after @fresh k should be undefined in cell 1: stderr %q", errb)
	}
	if n := s.NextNumber(); n != 2 {
		t.Errorf("next cell number after fresh and one cell = %d, want 2", n)
	}
}

func TestServeInterruptAtPrompt(t *testing.T) {
	s, _, errb := newTest(t, Options{})
	in := &scripted{lines: []any{"x := 1 +", ErrInterrupt, ErrInterrupt, ErrInterrupt, "never reached"}}
	if err := s.Serve(context.Background(), in); err != nil {
		t.Fatal(err)
	}
	if in.next != 4 {
		t.Errorf("session read %d inputs, want 4 (discard, hint, leave)", in.next)
	}
	if !strings.Contains(errb.String(), "(input discarded)") || !strings.Contains(errb.String(), "press Ctrl-C again") {
		t.Errorf("stderr %q", errb)
	}
	if len(s.Cells()) != 0 {
		t.Errorf("cells ran: %d", len(s.Cells()))
	}
}

// scripted is a LineReader replaying lines and errors.
type scripted struct {
	lines []any
	next  int
}

func (r *scripted) ReadLine(string) (string, error) {
	if r.next >= len(r.lines) {
		return "", errors.New("read past the end")
	}
	v := r.lines[r.next]
	r.next++
	if err, ok := v.(error); ok {
		return "", err
	}
	return v.(string), nil
}

func TestComplete(t *testing.T) {
	s, _, _ := newTest(t, Options{})
	s.Exec(context.Background(), "import \"couplet/mdo\"\nwingArea := 21.5\nwingSpan := 15.0")
	s.Exec(context.Background(), "func wingLoading(m float64) float64 { return m / wingArea }\ntype wingSpec struct{}")
	tests := []struct {
		text string
		want []string
	}{
		{"x := mdo.Minim", []string{"mdo.Minimize", "mdo.MinimizeFunc"}},
		{"wing", []string{"wingArea", "wingLoading", "wingSpan", "wingSpec"}},
		{"@sa", []string{"@save"}},
		{"strings.HasP", []string{"strings.HasPrefix"}},
		{"cell.Pub", []string{"cell.Publish"}},
		{"os.Remo", nil}, // not exposed in the sandbox
	}
	for _, tc := range tests {
		got := s.Complete(tc.text)
		if strings.Join(got, ",") != strings.Join(tc.want, ",") {
			t.Errorf("Complete(%q) = %v, want %v", tc.text, got, tc.want)
		}
	}
}

// interruptingRecorder interrupts the session when it records its at-th
// evaluation and counts what it records after.
type interruptingRecorder struct {
	s       *Session
	at      int
	records int
	after   int
}

func (r *interruptingRecorder) Begin(mdo.RunInfo) error { return nil }
func (r *interruptingRecorder) End(*mdo.Result) error   { return nil }

func (r *interruptingRecorder) Record(*mdo.Evaluation) error {
	r.records++
	switch {
	case r.records == r.at:
		if !r.s.Interrupt() {
			return errors.New("no cell running at the interrupt")
		}
	case r.records > r.at:
		r.after++
	}
	return nil
}

func TestInterruptedOptimisationReturnsItsBest(t *testing.T) {
	f, err := ReadStudy(filepath.Join("testdata", "slow_optimisation.study"))
	if err != nil {
		t.Fatal(err)
	}
	// The interrupt comes with the 4th recorded evaluation, from the
	// optimiser's own goroutine: Nelder–Mead evaluates one point at a time
	// with one worker, so nothing is evaluated after it.
	rec := &interruptingRecorder{at: 4}
	s, out, errb := newTest(t, Options{Recorder: func(*mdo.Study) (mdo.Recorder, error) { return rec, nil }})
	rec.s = s
	if c := s.Exec(context.Background(), f.Cells[0].Source); c.Err != nil {
		t.Fatal(c.Err)
	}
	c := s.Exec(context.Background(), f.Cells[1].Source)
	if c.Err != nil || !c.Interrupted {
		t.Fatalf("cell err %v interrupted %v (stderr %s)", c.Err, c.Interrupted, errb)
	}
	if !strings.HasSuffix(out.String(), "cancelled\n") {
		t.Errorf("the optimiser's stop reason: output %q, want cancelled", out)
	}
	pub := s.Env().Published()
	if len(pub) != 1 || pub[0].Best == nil {
		t.Fatalf("published %v, want one result with its best point", pub)
	}
	if rec.after != 0 || pub[0].Evaluations != rec.at {
		t.Errorf("%d evaluations (%d recorded after the interrupt), want %d", pub[0].Evaluations, rec.after, rec.at)
	}
}

func TestReportOnDemand(t *testing.T) {
	dir := t.TempDir()
	s, out, errb := newTest(t, Options{OutDir: dir})
	defer s.Close()
	serve(t, s, `import (
	"couplet/mdo"
	"couplet/optimizers"
	"couplet/repl/cell"
)
st, err := mdo.SellarStudy(mdo.MDF)
cell.Attach(st)
res, err := optimizers.RandomDesign{Samples: 6}.Minimize(cell.Context(), st)
@report res
@report res
`)
	if errb.Len() > 0 {
		t.Fatalf("stderr: %s", errb)
	}
	// @report twice leaves two reports: the second never overwrites the
	// first, it takes a new folder of the study's name
	first, second := filepath.Join(dir, "sellar", "report.html"), filepath.Join(dir, "sellar-2", "report.html")
	if !strings.Contains(out.String(), "wrote "+first+"\n") || !strings.Contains(out.String(), "wrote "+second+"\n") {
		t.Errorf("output %q, want it to name %s and %s", out, first, second)
	}
	for _, name := range []string{"sellar/report.html", "sellar/summary.json", "sellar/results.db", "sellar/evaluations.csv",
		"sellar-2/report.html", "sellar-2/summary.json", "sellar-2/evaluations.csv", "summary.json", "index.html"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("@report left no %s: %v", name, err)
		}
	}
	if idx, err := report.ReadIndex(dir); err != nil || len(idx.Results) != 2 || idx.Principal != "sellar-2" {
		t.Errorf("the index lists %+v (%v), want the two reports, sellar-2 the principal", idx.Results, err)
	}
	// Without an output folder the command says how to get one.
	s2, _, errb2 := newTest(t, Options{})
	serve(t, s2, "x := 1\n@report x\n")
	if !strings.Contains(errb2.String(), "--out DIR") {
		t.Errorf("stderr %q", errb2)
	}
}

// scriptRecorder keeps the script each run records.
type scriptRecorder struct{ scripts []string }

func (r *scriptRecorder) Begin(info mdo.RunInfo) error {
	r.scripts = append(r.scripts, info.Script)
	return nil
}
func (r *scriptRecorder) Record(*mdo.Evaluation) error { return nil }
func (r *scriptRecorder) End(*mdo.Result) error        { return nil }

// The script a study records in the session (its identity for a pick-up)
// holds every successful cell so far and the running one that attaches
// the study, not only the finished cells.
func TestSessionRecordsTheRunningCell(t *testing.T) {
	rec := &scriptRecorder{}
	s, _, errb := newTest(t, Options{Recorder: func(*mdo.Study) (mdo.Recorder, error) { return rec, nil }})
	cells := []string{
		"samples := 4",
		"bad := undefinedName",
		"st, err := mdo.SellarStudy(mdo.MDF)\ncell.Attach(st)\nres, err := optimizers.RandomDesign{Samples: samples}.Minimize(cell.Context(), st)",
	}
	for _, c := range cells {
		s.Exec(context.Background(), c)
	}
	want := FormatStudy([]string{cells[0], cells[2]})
	if len(rec.scripts) != 1 || rec.scripts[0] != want {
		t.Errorf("recorded scripts %q, want [%q] (stderr %s)", rec.scripts, want, errb)
	}
}

// A headless run records the whole study file, cells after the one that
// attaches the study included.
func TestRunRecordsTheWholeFile(t *testing.T) {
	text := FormatStudy([]string{
		"st, err := mdo.SellarStudy(mdo.MDF)\ncell.Attach(st)",
		"res, err := optimizers.RandomDesign{Samples: 3}.Minimize(cell.Context(), st)\ncell.Publish(res)",
		"// a cell after the run is part of the study too\nres.Evaluations",
	})
	path := filepath.Join(t.TempDir(), "three.study")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	if _, err := Run(context.Background(), RunOptions{File: path, OutDir: out}); err != nil {
		t.Fatal(err)
	}
	st, err := store.Open(filepath.Join(resultFolder(t, out), "results.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if meta, ok := st.Run(); !ok || meta.Script != text {
		t.Errorf("results.db records the script %q, want the whole file %q", meta.Script, text)
	}
}

// countingWriter counts what is written to it and keeps nothing.
type countingWriter struct{ n int64 }

func (w *countingWriter) Write(p []byte) (int, error) {
	w.n += int64(len(p))
	return len(p), nil
}

// printingCell prints kib lines of 1 KiB each (1023 bytes and a newline).
func printingCell(kib int) string {
	return fmt.Sprintf("import (\n\t\"fmt\"\n\t\"strings\"\n)\nline := strings.Repeat(\"x\", 1023)\nfor i := 0; i < %d; i++ {\n\tfmt.Println(line)\n}\n\"done\"", kib)
}

// What a cell prints is streamed to Stdout as it is printed; the cell
// keeps only its first outputKept bytes (and a note of the rest), so a
// cell printing much more holds no more than that.
func TestCellOutputIsStreamedAndBounded(t *testing.T) {
	const kib = 8 << 10 // 8 MiB
	var w countingWriter
	s, err := NewSession(Options{Stdout: &w})
	if err != nil {
		t.Fatal(err)
	}
	c := s.Exec(context.Background(), printingCell(kib))
	if c.Err != nil {
		t.Fatal(c.Err)
	}
	printed := int64(kib<<10) + int64(len("done\n"))
	if w.n != printed {
		t.Errorf("%d bytes reached Stdout, want all %d printed", w.n, printed)
	}
	note := fmt.Sprintf("\n… (%d more bytes printed, not kept)\n", printed-outputKept)
	if len(c.Output) != outputKept+len(note) || !strings.HasSuffix(c.Output, note) {
		t.Errorf("the cell kept %d bytes ending %q, want the first %d and the note %q", len(c.Output), c.Output[max(0, len(c.Output)-80):], outputKept, note)
	}
	// A small output is kept whole, its value after it.
	if c := s.Exec(context.Background(), printingCell(2)); c.Output != strings.Repeat(strings.Repeat("x", 1023)+"\n", 2)+"done\n" {
		t.Errorf("a 2 KiB output kept as %d bytes", len(c.Output))
	}
}

// BenchmarkCellOutput prints growing outputs: the bytes a cell keeps
// (kept-B) stay at outputKept however much it prints, and the bytes
// allocated per printed byte do not grow with the output.
func BenchmarkCellOutput(b *testing.B) {
	for _, mib := range []int{1, 4, 16} {
		b.Run(fmt.Sprintf("MiB=%d", mib), func(b *testing.B) {
			s, err := NewSession(Options{Stdout: io.Discard})
			if err != nil {
				b.Fatal(err)
			}
			src := printingCell(mib << 10)
			b.ReportAllocs()
			b.ResetTimer()
			kept := 0
			for i := 0; i < b.N; i++ {
				c := s.Exec(context.Background(), src)
				if c.Err != nil {
					b.Fatal(c.Err)
				}
				kept = len(c.Output)
			}
			b.ReportMetric(float64(kept), "kept-B")
		})
	}
}

// A cell that panics with an error keeps that error in its chain, so the
// runner can tell a refused pick-up from other failures.
func TestPanicKeepsTheError(t *testing.T) {
	s, _, _ := newTest(t, Options{})
	c := s.Exec(context.Background(), "import \"errors\"\nimport \"fmt\"\nerr := fmt.Errorf(\"stalled: %w\", errors.ErrUnsupported)\npanic(err)")
	var ce *CellError
	if !errors.As(c.Err, &ce) || ce.Kind != "panic" || ce.Msg != "stalled: unsupported operation" {
		t.Fatalf("cell error %v, want a panic with the error's text", c.Err)
	}
	if !errors.Is(c.Err, errors.ErrUnsupported) {
		t.Errorf("the error the cell panicked with is not in the chain of %v", c.Err)
	}
}
