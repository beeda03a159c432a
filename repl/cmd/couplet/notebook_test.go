package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// The session outlives its interpreter process: a goroutine that panics
// and a recursion without end each end that process, the session says
// which cell and what ended it, writes the result published before and
// goes on in a fresh interpreter that keeps the cells, where @restore,
// @again and @save work.
func TestSessionSurvivesItsInterpreter(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out")
	bowl := filepath.Join(dir, "bowl.study")
	if err := os.WriteFile(bowl, []byte(publishingCell), 0o644); err != nil {
		t.Fatal(err)
	}
	tm := startTerm(t, "--out", out)
	tm.expect(`c1> `)
	// cell 1 publishes six points of the bowl, recorded in out/bowl
	tm.send("@replay " + bowl + "\r")
	tm.expect(`c2> `)
	tm.send("x := 6 * 7\r")
	tm.expect(`c3> `)
	tm.send("x + 1000\r")
	tm.expect(`\r\n1042\r\n`)
	tm.expect(`c4> `)
	tm.send("go func() { panic(\"the spar cracks\") }(); select {}\r")
	tm.expect(`cell 4, line 1: the interpreter process died: panic: the spar cracks`)
	tm.expect(`the results published are written into ` + regexpQuote(out) + `; the last, of study bowl published in cell 1`)
	tm.expect(`a fresh interpreter is running; it keeps the 4 cells`)
	tm.expect(`c5> `)
	checkEarlierResult(t, out)
	// the fresh interpreter has none of the variables until @restore
	tm.send("@restore\r")
	tm.expect(`restored 3 cells\r\n`)
	tm.expect(`c5> `)
	// cell 1 ran again into a folder of its own, leaving the dead
	// interpreter's result as it was written
	checkEarlierResult(t, out)
	if _, err := os.Stat(filepath.Join(out, "bowl-2", "results.db")); err != nil {
		t.Errorf("the restored cell 1 recorded its study in no folder of its own: %v", err)
	}
	tm.send("@again 3\r")
	tm.expect(`\r\n1042\r\n`)
	tm.expect(`c6> `)
	tm.send("var dive func(int) int\r")
	tm.expect(`c7> `)
	tm.send("dive = func(n int) int { return dive(n+1) + 1 }\r")
	tm.expect(`c8> `)
	tm.send("dive(0)\r")
	tm.expect(`cell 8: the interpreter process died: fatal error: stack overflow`)
	tm.expect(`a fresh interpreter is running; it keeps the 8 cells`)
	tm.expect(`c9> `)
	tm.send("@cells\r")
	tm.expect(`4 +failed .*go func\(\)`)
	tm.expect(`8 +failed .*dive\(0\)`)
	tm.expect(`c9> `)
	study := filepath.Join(dir, "kept.study")
	tm.send("@save " + study + "\r")
	tm.expect(`saved 6 cells to`)
	tm.expect(`c9> `)
	b, err := os.ReadFile(study)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"cell.Publish(result)", "x := 6 * 7", "x + 1000", "dive = func"} {
		if !strings.Contains(string(b), want) {
			t.Errorf("the saved study lacks %q:\n%s", want, b)
		}
	}
	for _, not := range []string{"the spar cracks", "dive(0)"} {
		if strings.Contains(string(b), not) {
			t.Errorf("the saved study holds the cell that ended the interpreter (%q):\n%s", not, b)
		}
	}
	tm.send("@restore\r")
	tm.expect(`restored 6 cells\r\n`)
	tm.send("@again 3\r")
	tm.expect(`\r\n1042\r\n`)
	tm.expect(`c10> `)
	tm.send("@quit\r")
	if code := tm.wait(); code != 0 {
		t.Errorf("exit status %d, want 0", code)
	}
}

// regexpQuote quotes a path for tm.expect.
func regexpQuote(s string) string {
	var b strings.Builder
	for _, r := range s {
		if strings.ContainsRune(`\.+*?()|[]{}^$`, r) {
			b.WriteByte('\\')
		}
		b.WriteRune(r)
	}
	return b.String()
}

// holdScript is an external program that starts a program of its own
// and waits: it writes its process number, its child's and its parent's
// (the interpreter process) into the file named by its argument.
const holdScript = `#!/bin/sh
sleep 600 &
echo "$$ $! $PPID" > "$1.tmp" && mv "$1.tmp" "$1"
wait
`

// holdCell is a cell that runs holdScript as an external discipline and
// waits for it.
func holdCell(t *testing.T, dir string) (src, pidFile string) {
	t.Helper()
	prog := filepath.Join(dir, "hold.sh")
	if err := os.WriteFile(prog, []byte(holdScript), 0o755); err != nil {
		t.Fatal(err)
	}
	pidFile = filepath.Join(dir, "pids")
	return `d, err := external.New(external.Program{Name: "hold", Outputs: []mdo.Var{{Name: "a"}}, Command: []string{"/bin/sh", ` +
		strconv.Quote(prog) + `, ` + strconv.Quote(pidFile) + `}, Timeout: time.Hour, WorkDir: ` + strconv.Quote(dir) + `}, cell.Programs())
if err == nil {
	err = d.Compute(nil, make([]float64, 1))
}`, pidFile
}

// heldPids waits for the file holdScript writes and returns the process
// numbers in it: the program, its child and the interpreter process.
func heldPids(t *testing.T, pidFile string, exited <-chan struct{}) (prog, kid, interp int) {
	t.Helper()
	deadline := time.Now().Add(time.Minute)
	for {
		b, err := os.ReadFile(pidFile)
		if err == nil {
			f := strings.Fields(string(b))
			if len(f) != 3 {
				t.Fatalf("the program wrote %q, want three process numbers", b)
			}
			n := make([]int, 3)
			for i := range f {
				if n[i], err = strconv.Atoi(f[i]); err != nil {
					t.Fatal(err)
				}
			}
			return n[0], n[1], n[2]
		}
		select {
		case <-exited:
			t.Fatal("the command ended before the program it runs wrote its process numbers")
		default:
		}
		if time.Now().After(deadline) {
			t.Fatal("the external program did not start")
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// running reports whether process pid runs (one that ended and waits to
// be collected does not).
func running(pid int) bool {
	b, err := os.ReadFile(filepath.Join("/proc", strconv.Itoa(pid), "stat"))
	if err != nil {
		return false
	}
	_, state, _, _, ok := parseStat(b)
	return ok && state != 'Z' && state != 'X'
}

// A program an external discipline started, and the program that one
// started, end with the interpreter process that is killed while it
// waits for them; the session goes on.
func TestProgramsEndWithTheirInterpreter(t *testing.T) {
	dir := t.TempDir()
	src, pidFile := holdCell(t, dir)
	tm := startTerm(t, "--trust-script")
	tm.expect(`c1> `)
	tm.send("import (\"couplet/mdo/external\"; \"time\")\r")
	tm.expect(`c2> `)
	for _, l := range strings.Split(src, "\n") {
		tm.send(l + "\r")
	}
	prog, kid, interp := heldPids(t, pidFile, tm.done)
	if interp == tm.cmd.Process.Pid {
		t.Fatal("the session runs the cells in its own process")
	}
	if !running(prog) || !running(kid) {
		t.Fatal("the programs are not running")
	}
	if err := syscall.Kill(interp, syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	// cell 2 made the discipline, cell 3 runs it
	tm.expect(`cell 3: the interpreter process died: killed by signal killed`)
	tm.expect(`a fresh interpreter is running`)
	for _, p := range []int{prog, kid} {
		if running(p) {
			t.Errorf("process %d, started by the killed interpreter process, still runs", p)
		}
	}
	tm.expect(`c4> `)
	tm.send("6 * 7\r")
	tm.expect(`\r\n42\r\n`)
	tm.send("@quit\r")
	if code := tm.wait(); code != 0 {
		t.Errorf("exit status %d, want 0", code)
	}
}

// The same holds for `couplet run`: the programs end with its
// interpreter process, and the run exits 1 naming the cell.
func TestRunProgramsEndWithTheirInterpreter(t *testing.T) {
	dir := t.TempDir()
	src, pidFile := holdCell(t, dir)
	study := filepath.Join(dir, "hold.study")
	if err := os.WriteFile(study, []byte("//~ cell 1\nimport (\n\t\"couplet/mdo/external\"\n\t\"time\"\n)\n\n"+src+"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(binary, "run", study, "--out", filepath.Join(dir, "out"), "--trust-script")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan struct{})
	var werr error
	go func() { werr = cmd.Wait(); close(exited) }()
	t.Cleanup(func() { _ = cmd.Process.Kill(); <-exited })
	prog, kid, interp := heldPids(t, pidFile, exited)
	if err := syscall.Kill(interp, syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	select {
	case <-exited:
	case <-time.After(time.Minute):
		t.Fatal("the run did not end")
	}
	var ee *exec.ExitError
	if !errors.As(werr, &ee) || ee.ExitCode() != 1 || !strings.Contains(stderr.String(), "cell 1: the interpreter process died: killed by signal killed") {
		t.Errorf("run: %v, stderr %q; want exit 1 naming cell 1 and the kill", werr, stderr.String())
	}
	for _, p := range []int{prog, kid} {
		if running(p) {
			t.Errorf("process %d, started by the killed interpreter process, still runs", p)
		}
	}
}

// TestParseStat reads the fields endLeftovers needs, a command name
// with spaces and parentheses included (proc(5), /proc/pid/stat).
func TestParseStat(t *testing.T) {
	tests := []struct {
		line           string
		pid, pgid, sid int
		state          byte
		ok             bool
	}{
		{"123 (sh) S 1 123 120 0 -1", 123, 123, 120, 'S', true},
		{"77 (a (b) c) Z 5 70 60 0", 77, 70, 60, 'Z', true},
		{"77 sh S 5 70 60", 0, 0, 0, 0, false},
		{"x (sh) S 5 70 60", 0, 0, 0, 0, false},
		{"77 (sh) S 5", 0, 0, 0, 0, false},
	}
	for _, tc := range tests {
		pid, state, pgid, sid, ok := parseStat([]byte(tc.line))
		if ok != tc.ok || pid != tc.pid || state != tc.state || pgid != tc.pgid || sid != tc.sid {
			t.Errorf("parseStat(%q) = %d %q %d %d %v", tc.line, pid, state, pgid, sid, ok)
		}
	}
}

// The records of the cells survive the trip between the processes.
func TestCellRecordRoundTrip(t *testing.T) {
	r := cellRecord{Number: 4, Source: "x := 1\ny := x", Err: "cell 4, line 2: panic: stall", Interrupted: true, Elapsed: 3 * time.Millisecond}
	b, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var back cellRecord
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	c := back.cell()
	if back != r || c.Number != 4 || c.Err == nil || c.Err.Error() != r.Err || !c.Interrupted || c.Source != r.Source {
		t.Errorf("%+v came back as %+v (cell %+v)", r, back, c)
	}
}

// A session that reads its input from a pipe and writes into buffers
// (the interpreter process's output comes back through the notebook)
// survives its interpreter too: what cells print before and after the
// death arrives in order, and the death is reported between them.
func TestPipedSessionSurvivesItsInterpreter(t *testing.T) {
	input := "import \"strings\"\nfmt.Println(strings.ToUpper(\"before\"), 6 * 7)\n" +
		"go func() {\n\tpanic(\"the rib buckles\")\n}(); select {}\n" +
		"fmt.Println(strings.ToUpper(\"after\"), 6 * 7)\n@restore\nfmt.Println(strings.ToUpper(\"after\"), 6 * 7)\n@cells\n"
	var out, errb bytes.Buffer
	if code := run(nil, strings.NewReader(input), &out, &errb); code != 0 {
		t.Fatalf("exit %d; stderr %q", code, errb.String())
	}
	// @restore shows each cell it runs again after its prompt
	if want := "BEFORE 42\nc1> import \"strings\"\nc2> fmt.Println(strings.ToUpper(\"before\"), 6 * 7)\nBEFORE 42\nrestored 2 cells\nAFTER 42\n"; !strings.HasPrefix(out.String(), want) {
		t.Errorf("output %q, want it to start with %q", out.String(), want)
	}
	for _, want := range []string{
		"cell 3, line 2: the interpreter process died: panic: the rib buckles",
		"a fresh interpreter is running; it keeps the 3 cells",
		// the fresh interpreter has not imported strings before @restore
		"cell 4, line 1: undefined: strings",
	} {
		if !strings.Contains(errb.String(), want) {
			t.Errorf("stderr lacks %q:\n%s", want, errb.String())
		}
	}
	for _, want := range []string{"2     ok", "3     failed", "4     failed", "5     ok"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("@cells lacks %q:\n%s", want, out.String())
		}
	}
}

// Memory past --memory-cap ends the session's interpreter process, not
// the session.
func TestSessionMemoryCap(t *testing.T) {
	if raceDetector {
		t.Skip("the race detector's shadow memory counts against the memory cap")
	}
	input := "x := 6 * 7\nvar hoard [][]byte\nfor {\n\thoard = append(hoard, make([]byte, 1<<20))\n}\n@restore\nx\n"
	var out, errb bytes.Buffer
	if code := run([]string{"--memory-cap", "256MiB"}, strings.NewReader(input), &out, &errb); code != 0 {
		t.Fatalf("exit %d; stderr %q", code, errb.String())
	}
	for _, want := range []string{"cell 3: the interpreter process died: fatal error: ", "out of memory", "(its memory cap is 256MiB; --memory-cap changes it)", "a fresh interpreter is running"} {
		if !strings.Contains(errb.String(), want) {
			t.Errorf("stderr lacks %q:\n%s", want, errb.String())
		}
	}
	if !strings.HasSuffix(out.String(), "restored 2 cells\n42\n") {
		t.Errorf("output %q, want the restored cells and x = 42", out.String())
	}
}
