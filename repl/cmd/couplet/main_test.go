package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/creack/pty"
)

// asCommand is the environment variable under which the test binary is
// the couplet command itself: the tests run it as their child process, so
// that no second build of the command is needed.
const asCommand = "COUPLET_TEST_BINARY_IS_THE_COMMAND"

// binary is the program the tests start as the couplet command.
var binary string

func TestMain(m *testing.M) {
	if os.Getenv(asCommand) == "1" {
		main()
	}
	binary = os.Args[0]
	// every child process started by the tests is the command
	if err := os.Setenv(asCommand, "1"); err != nil {
		panic(err)
	}
	os.Exit(m.Run())
}

// term is the command running on a pseudo-terminal.
type term struct {
	t    *testing.T
	cmd  *exec.Cmd
	f    *os.File
	mu   sync.Mutex
	buf  bytes.Buffer
	done chan struct{}
	seen int // offset up to which output has been matched
}

// startTerm starts the command on a pseudo-terminal.
func startTerm(t *testing.T, args ...string) *term {
	t.Helper()
	cmd := exec.Command(binary, args...)
	cmd.Env = append(os.Environ(), "HOME="+t.TempDir(), "TERM=xterm")
	f, err := pty.StartWithSize(cmd, &pty.Winsize{Rows: 40, Cols: 200})
	if err != nil {
		t.Fatal(err)
	}
	tm := &term{t: t, cmd: cmd, f: f, done: make(chan struct{})}
	go func() {
		b := make([]byte, 4096)
		for {
			n, err := f.Read(b)
			tm.mu.Lock()
			tm.buf.Write(b[:n])
			tm.mu.Unlock()
			if err != nil {
				close(tm.done)
				return
			}
		}
	}()
	t.Cleanup(func() {
		_ = cmd.Process.Kill()
		_ = cmd.Wait()
		f.Close()
	})
	return tm
}

// expect waits for the output, after what was matched before, to match re.
func (tm *term) expect(re string) string {
	tm.t.Helper()
	rx := regexp.MustCompile(re)
	deadline := time.Now().Add(time.Minute)
	for time.Now().Before(deadline) {
		tm.mu.Lock()
		out := tm.buf.String()
		tm.mu.Unlock()
		if loc := rx.FindStringIndex(out[tm.seen:]); loc != nil {
			m := out[tm.seen : tm.seen+loc[1]]
			tm.seen += loc[1]
			return m
		}
		time.Sleep(10 * time.Millisecond)
	}
	tm.mu.Lock()
	defer tm.mu.Unlock()
	tm.t.Fatalf("timed out waiting for %q; output after the last match:\n%s", re, tm.buf.String()[tm.seen:])
	return ""
}

// send types text.
func (tm *term) send(s string) {
	tm.t.Helper()
	if _, err := tm.f.Write([]byte(s)); err != nil {
		tm.t.Fatal(err)
	}
}

// wait waits for the command to exit and returns its exit status.
func (tm *term) wait() int {
	tm.t.Helper()
	ch := make(chan error, 1)
	go func() { ch <- tm.cmd.Wait() }()
	select {
	case err := <-ch:
		var ee *exec.ExitError
		if errors.As(err, &ee) {
			return ee.ExitCode()
		}
		if err != nil {
			tm.t.Fatal(err)
		}
		return 0
	case <-time.After(time.Minute):
		tm.t.Fatal("the command did not exit")
	}
	return -1
}

func TestTerminalSession(t *testing.T) {
	tm := startTerm(t)
	tm.expect(`not for certification, flight or airworthiness decisions`)
	tm.expect(`c1> `)
	// A multi-line cell keeps reading until it is complete.
	tm.send("func lift(q, s, cl float64) float64 {\r")
	tm.expect(`\| `)
	tm.send("\treturn q * s *\r")
	tm.expect(`\| `)
	tm.send("\t\tcl\r")
	tm.expect(`\| `)
	tm.send("}\r")
	tm.expect(`c2> `)
	// The trailing expression is shown: q·S·CL = 1000·20·0.5 = 10000.
	tm.send("lift(1000, 20, 0.5)\r")
	tm.expect(`\r\n10000\r\n`)
	tm.expect(`c3> `)
	// A panic reports its cell and line; the session goes on.
	tm.send("x := 1\r")
	tm.expect(`c4> `)
	tm.send("if x > 0 { panic(\"stall\") }\r")
	tm.expect(`cell 4, line 1: panic: stall`)
	tm.expect(`c5> `)
	// A compile error too.
	tm.send("y := x.Chord\r")
	tm.expect(`cell 5, line 1: .*Chord`)
	tm.expect(`c6> `)
	// Tab completes package members.
	tm.send("import \"strings\"\r")
	tm.expect(`c7> `)
	tm.send("strings.HasPre\t")
	tm.expect(`strings.HasPrefix`)
	tm.send("(\"wing\", \"wi\")\r")
	tm.expect(`true\r\n`)
	tm.expect(`c8> `)
	// Ctrl-C twice stops a runaway loop at once (one waits for a grace
	// period, see repl's TestInterruptStopsRunawayLoop) and the session
	// goes on. The cell first prints a value it computes (1042), which the
	// echo of the typed text cannot hold, so the Ctrl-C is sent only once
	// the cell runs and the line editor has given the terminal back.
	tm.send("import \"fmt\"\r")
	tm.expect(`c9> `)
	tm.send("fmt.Println(6*7 + 1000); for {\r")
	tm.expect(`\| `)
	tm.send("}\r")
	tm.expect(`\n1042\r\n`)
	tm.send("\x03")
	tm.expect(`cancelling the cell`)
	tm.send("\x03")
	tm.expect(`cell 9, line 1: stopped: interrupted`)
	tm.expect(`c10> `)
	tm.send("6 * 7\r")
	tm.expect(`\n42\r\n`)
	tm.expect(`c11> `)
	// Ctrl-C twice at an empty prompt leaves cleanly. The second is sent
	// after the prompt is drawn again: the line editor draws it once it
	// reads keys again.
	tm.send("\x03")
	tm.expect(`press Ctrl-C again`)
	tm.expect(`c11> `)
	tm.send("\x03")
	if code := tm.wait(); code != 0 {
		t.Errorf("exit status %d, want 0", code)
	}
}

func TestTerminalInterruptsOptimisation(t *testing.T) {
	tm := startTerm(t)
	tm.expect(`c1> `)
	tm.send("@replay ../../testdata/slow_optimisation.study\r")
	// The progress line shows while the optimiser runs; interrupt once it
	// counts two evaluations or more, so that the best point returned has
	// been improved on at least once (after a single evaluation the result
	// rightly holds one).
	tm.expect(`Nelder-Mead iteration \d+  best [^\r\n]*\(([2-9]|[1-9]\d+)/-`)
	tm.send("\x03")
	// The optimiser returns its best point so far and the cell ends.
	tm.expect(`cancelled`)
	tm.expect(`c3> `)
	tm.send("result.Best != nil && result.Evaluations > 1\r")
	tm.expect(`true\r\n`)
	tm.send("@quit\r")
	if code := tm.wait(); code != 0 {
		t.Errorf("exit status %d, want 0", code)
	}
}

func TestTerminalSaveAndReplay(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "mine.study")
	tm := startTerm(t)
	tm.expect(`c1> `)
	tm.send("import \"math\"\r")
	tm.expect(`c2> `)
	// Dynamic pressure q = ½ρV² at sea level, ρ = 1.225 kg/m³ (ISA), V = 100 m/s: 6125 Pa.
	tm.send("q := 0.5 * 1.225 * math.Pow(100, 2)\r")
	tm.expect(`c3> `)
	tm.send("q\r")
	tm.expect(`6125\r\n`)
	// Tab at the start of a line indents it rather than completing.
	tm.send("func half(x float64) float64 {\r")
	tm.expect(`\| `)
	tm.send("\treturn x / 2\r")
	tm.expect(`\| `)
	tm.send("}\r")
	tm.expect(`c5> `)
	tm.send("@save " + path + "\r")
	tm.expect(`saved 4 cells`)
	if b, err := os.ReadFile(path); err != nil || !strings.Contains(string(b), "{\n\treturn x / 2\n}") {
		t.Errorf("saved study %q (%v) lacks the indented function", b, err)
	}
	tm.send("@fresh\r")
	tm.expect(`fresh session`)
	tm.send("@replay " + path + "\r")
	tm.expect(`6125\r\n`)
	tm.send("@quit\r")
	tm.wait()
}

// runCmd runs the command in-process and returns its exit status and output.
func runCmd(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

func TestRunExitStatus(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	good := write("good.study", "//~ cell 1\nx := 2\n//~ cell 2\nx * 3\n")
	bad := write("bad.study", "//~ cell 1\nx := 2\n//~ cell 2\ny := x + 1\npanic(\"stall\")\n")
	// A loop that comes back when its context ends, as an optimiser does.
	loop := write("loop.study", "n := 0\nfor cell.Context().Err() == nil {\n\tn++\n}\n")
	evil := write("evil.study", "import \"os/exec\"\nexec.Command(\"true\").Run()\n")
	bom := write("bom.study", "\uFEFF//~ couplet-study 1 (couplet 0.1.0)\n\n//~ cell 1\nx := 2\n")
	garbled := write("garbled.study", "//~ couplet-study one (couplet 0.1.0)\n\n//~ cell 1\nx := 2\n")
	newer := write("newer.study", "//~ couplet-study 7 (couplet 9.0.0)\n\n//~ cell 1\nx := 2\n")
	// Every analysis of this study fails, for one reason.
	allFail := write("stalling.study", "import \"errors\"\n\n"+oneVariableScript("stalling", `return errors.New("the wing stalls")`))
	tests := []struct {
		name string
		args []string
		code int
		msg  string
	}{
		{"ok", []string{"run", good, "--out", filepath.Join(dir, "o1")}, 0, "wrote"},
		{"flags before file", []string{"run", "--out", filepath.Join(dir, "o2"), good}, 0, "wrote"},
		{"failing cell", []string{"run", bad, "--out", filepath.Join(dir, "o3")}, 1, "bad.study:5: cell 2, line 2: panic: stall"},
		{"time limit", []string{"run", loop, "--out", filepath.Join(dir, "o4"), "--timeout", "200ms"}, 1, "loop.study: the time limit of 200ms was reached"},
		{"refused import", []string{"run", evil, "--out", filepath.Join(dir, "o5")}, 1, "refused by the sandbox"},
		{"no out", []string{"run", good}, 2, "--out DIR"},
		{"no file", []string{"run", "--out", dir}, 2, "--out DIR"},
		{"missing file", []string{"run", filepath.Join(dir, "none.study"), "--out", dir}, 2, "reading the study file"},
		{"bad seed", []string{"run", good, "--out", dir, "--seed", "-3"}, 2, "--seed"},
		{"seed with a leading zero", []string{"run", good, "--out", dir, "--seed", "0042"}, 2, `--seed "0042"`},
		{"seed of two numbers", []string{"run", good, "--out", dir, "--seed", "5 6"}, 2, `--seed "5 6"`},
		{"seed with a sign", []string{"run", good, "--out", dir, "--seed", "+5"}, 2, `--seed "+5"`},
		{"seed too large", []string{"run", good, "--out", dir, "--seed", "18446744073709551616"}, 2, "--seed"},
		{"largest seed", []string{"run", good, "--out", filepath.Join(dir, "o6"), "--seed", "18446744073709551615"}, 0, "wrote"},
		{"byte-order mark", []string{"run", bom, "--out", filepath.Join(dir, "o7")}, 0, "wrote"},
		{"garbled header", []string{"run", garbled, "--out", filepath.Join(dir, "o8")}, 2, `header line "//~ couplet-study one (couplet 0.1.0)"`},
		{"newer format", []string{"run", newer, "--out", filepath.Join(dir, "o9")}, 2, "format 7"},
		{"every evaluation failed", []string{"run", allFail, "--out", filepath.Join(dir, "o10")}, 1, "every one of its 6 evaluations failed; the commonest reasons:\n  6 × mdo: discipline stalling: the wing stalls"},
		{"bad flag", []string{"run", good, "--out", dir, "--bogus"}, 2, "bogus"},
		{"unknown command", []string{"fly"}, 2, "unknown command"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, _, errs := runCmd(tc.args...)
			if code != tc.code || !strings.Contains(errs, tc.msg) {
				t.Errorf("exit %d, stderr %q; want exit %d with %q", code, errs, tc.code, tc.msg)
			}
		})
	}
	// The time limit still left the folder written.
	if _, err := os.Stat(filepath.Join(dir, "o4", "summary.json")); err != nil {
		t.Errorf("the run stopped by its time limit wrote no summary: %v", err)
	}
	// The good run wrote a summary without a result (the script publishes none).
	b, err := os.ReadFile(filepath.Join(dir, "o1", "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sum map[string]any
	if err := json.Unmarshal(b, &sum); err != nil {
		t.Fatal(err)
	}
	if sum["study"] != "good" || sum["cells"] != 2.0 {
		t.Errorf("summary %s", b)
	}
}

// Every way of asking for help prints the whole usage, every flag
// included, on standard output and exits 0.
func TestHelp(t *testing.T) {
	code, want, errs := runCmd("help")
	if code != 0 || errs != "" {
		t.Fatalf("couplet help: exit %d, stderr %q", code, errs)
	}
	for _, w := range []string{"couplet run FILE.study --out DIR", "--out DIR", "--seed N", "--timeout D", "--trust-script", "--quiet", "--pick-up", "--replace", "exit status", "airworthiness"} {
		if !strings.Contains(want, w) {
			t.Errorf("the usage lacks %q:\n%s", w, want)
		}
	}
	for _, args := range [][]string{{"--help"}, {"-h"}, {"-help"}, {"run", "--help"}, {"run", "x.study", "--out", "d", "--help"}, {"imports", "--help"}} {
		code, out, errs := runCmd(args...)
		if code != 0 || out != want || errs != "" {
			t.Errorf("couplet %s: exit %d, stderr %q, output the same as couplet help: %v", strings.Join(args, " "), code, errs, out == want)
		}
	}
}

func TestRunSIGINTReturnsBest(t *testing.T) {
	out := t.TempDir()
	cmd := exec.Command(binary, "run", filepath.Join("..", "..", "testdata", "slow_optimisation.study"), "--out", out)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan struct{})
	var werr error
	go func() { werr = cmd.Wait(); close(exited) }()
	// The interrupt comes once the optimiser has recorded two evaluations.
	waitRows(t, cmd, exited, filepath.Join(out, "slow_bowl", "results.db"), 2) // the result folder of study slow_bowl
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	<-exited
	if werr != nil {
		t.Fatalf("run after SIGINT: %v\n%s", werr, stderr.String())
	}
	b, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sum struct {
		Stop        string
		Evaluations int
		Best        *struct{ Objective *float64 }
	}
	if err := json.Unmarshal(b, &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Stop != "cancelled" || sum.Best == nil || sum.Best.Objective == nil || sum.Evaluations < 2 {
		t.Errorf("summary after SIGINT: %s", b)
	}
}

// BenchmarkStartToPrompt measures the time from starting the command on a
// terminal to its first prompt.
func BenchmarkStartToPrompt(b *testing.B) {
	home := b.TempDir()
	for i := 0; i < b.N; i++ {
		cmd := exec.Command(binary)
		cmd.Env = append(os.Environ(), "HOME="+home, "TERM=xterm")
		f, err := pty.Start(cmd)
		if err != nil {
			b.Fatal(err)
		}
		var got bytes.Buffer
		buf := make([]byte, 4096)
		for !strings.Contains(got.String(), "c1> ") {
			n, err := f.Read(buf)
			got.Write(buf[:n])
			if err != nil {
				if err == io.EOF {
					break
				}
				b.Fatal(err)
			}
		}
		b.StopTimer()
		_ = cmd.Process.Kill()
		_ = cmd.Wait()
		f.Close()
		b.StartTimer()
	}
}

func TestRunShowsProgressOnTerminalOnly(t *testing.T) {
	slow := filepath.Join("..", "..", "testdata", "slow_optimisation.study")
	// On a terminal: iteration, best objective and feasibility; Ctrl-C
	// once the line shows.
	tm := startTerm(t, "run", slow, "--out", t.TempDir())
	tm.expect(`slow_bowl Nelder-Mead iteration \d+  best [0-9.e+-]+  feasible`)
	tm.send("\x03")
	if code := tm.wait(); code != 0 {
		t.Errorf("exit status %d, want 0 (the optimiser returned its best at the interrupt)", code)
	}
	// Not on a terminal: quiet (an attached study that runs to its end).
	code, out, errs := runCmd("run", filepath.Join("..", "..", "testdata", "resumable.study"), "--trust-script", "--out", t.TempDir())
	if code != 0 || regexp.MustCompile(`iteration \d+  best`).MatchString(out+errs) {
		t.Errorf("exit %d; output %q %q should hold no progress", code, out, errs)
	}
}

func TestOtherCommands(t *testing.T) {
	tests := []struct {
		name    string
		args    []string
		stdin   string
		code    int
		want    []string
		notWant []string
	}{
		{"version", []string{"version"}, "", 0, []string{"couplet 0.1.0"}, nil},
		{"imports in the sandbox", []string{"imports"}, "", 0, []string{"couplet/mdo", "couplet/optimizers", "couplet/disciplines", "couplet/repl/cell", "math"}, []string{"os\n", "os/exec"}},
		{"imports trusted", []string{"imports", "--trust-script"}, "", 0, []string{"os\n", "os/exec", "math"}, nil},
		{"help", []string{"help"}, "", 0, []string{"couplet run FILE.study --out DIR", "airworthiness"}, nil},
		{"piped session", nil, "x := 2\nx * 21\n@quit\nx\n", 0, []string{"42\n"}, []string{"c1> "}},
		{"unexpected argument", []string{"--out", "d", "extra"}, "", 2, nil, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := run(tc.args, strings.NewReader(tc.stdin), &out, &errb)
			if code != tc.code {
				t.Errorf("exit %d, want %d (stderr %q)", code, tc.code, errb.String())
			}
			for _, w := range tc.want {
				if !strings.Contains(out.String(), w) {
					t.Errorf("output lacks %q:\n%s", w, out.String())
				}
			}
			for _, w := range tc.notWant {
				if strings.Contains(out.String(), w) {
					t.Errorf("output has %q:\n%s", w, out.String())
				}
			}
		})
	}
}

// Scripts of a research engineer replayed in a terminal session, as a
// user would (@replay FILE): each shows what its headless run prints,
// and the session goes on. The tests synchronise on the scripts' own
// output and the prompts.
func TestTerminalReplaysUserScripts(t *testing.T) {
	for _, tc := range []struct {
		script string
		says   []string // in order
		prompt string   // the prompt once it has replayed
	}{
		{"noise_discipline", []string{`study "quiet_regional_jet" by Sextant`, `noise\.takeoff <= 84 +[\d.]+ +[\d.]+ +ok`, `post-optimality sensitivity of mass\.fuel`}, `c3> `},
		{"sweep_series", []string{`sweep 15°: fuel`, `sweep 30°: fuel`, `least fuel at sweep_\d+`, `comparison of 4 results`}, `c4> `},
	} {
		t.Run(tc.script, func(t *testing.T) {
			file, err := filepath.Abs(filepath.Join("..", "..", "testdata", "scripts", tc.script+".study"))
			if err != nil {
				t.Fatal(err)
			}
			tm := startTerm(t, "--out", t.TempDir())
			tm.expect(`c1> `)
			tm.send("@replay " + file + "\r")
			for _, s := range tc.says {
				tm.expect(s)
			}
			tm.expect(tc.prompt)
			tm.send("6 * 7\r")
			tm.expect(`\n42\r\n`)
			tm.send("@quit\r")
			if code := tm.wait(); code != 0 {
				t.Errorf("exit status %d, want 0", code)
			}
		})
	}
}
