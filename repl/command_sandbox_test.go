package repl

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// A command's expression goes through the sandbox check of a cell: an
// import the sandbox refuses is refused before anything runs, naming the
// command. Before, @coupling handed its text to the interpreter
// unvetted, which imports Go source found from the working folder.
func TestCommandExpressionsAreSandboxed(t *testing.T) {
	tests := []struct {
		name, line, want string
	}{
		{"trusted-only package", `@coupling import "os"; sys`, `@coupling: import "os" refused by the sandbox`},
		{"package from the working folder", `@coupling import "vendored/evil"; evil.System()`, `@coupling: import "vendored/evil" refused by the sandbox`},
		{"report", `@report import "os/exec"; res`, `@report: import "os/exec" refused by the sandbox`},
		{"statements belong in a cell", `@coupling sys = nil`, "takes an expression"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, out, errb := newTest(t, Options{OutDir: t.TempDir()})
			defer s.Close()
			serve(t, s, "import \"couplet/mdo\"\nsys, err := mdo.NewSystem(mdo.Sellar()...)\n"+tc.line+"\n@coupling sys\n")
			if !strings.Contains(errb.String(), tc.want) {
				t.Errorf("stderr %q, want %q", errb, tc.want)
			}
			// the refused command ran nothing; the session goes on
			if n := strings.Count(out.String(), "y1"); n == 0 {
				t.Errorf("the next @coupling showed no matrix: %q", out)
			}
		})
	}
	// an allowed import in a command works
	s, out, errb := newTest(t, Options{})
	serve(t, s, "@coupling import \"couplet/mdo\"; func() *mdo.System { sys, _ := mdo.NewSystem(mdo.Sellar()...); return sys }()\n")
	if errb.Len() > 0 || !strings.Contains(out.String(), "y1") {
		t.Errorf("an allowed import in @coupling: stdout %q stderr %q", out, errb)
	}
}

// serveInterrupted serves input to a new session that is interrupted
// (twice, at once) when its output first holds word; it fails the test
// if the session does not come back.
func serveInterrupted(t *testing.T, opts Options, word, input string) (*interruptOn, *bytes.Buffer) {
	t.Helper()
	w := &interruptOn{word: word}
	var errb bytes.Buffer
	opts.Stdout, opts.Stderr = w, &errb
	s, err := NewSession(opts)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	w.s = s
	done := make(chan struct{})
	go func() {
		defer close(done)
		serve(t, s, input)
	}()
	select {
	case <-done:
	case <-time.After(2 * time.Minute): // a guard against a hang, not a measure
		t.Fatal("the endless loop was not stopped by Interrupt")
	}
	return w, &errb
}

// interruptOn interrupts a session (twice: at once) the first time what
// it is written holds word.
type interruptOn struct {
	buf  bytes.Buffer
	word string
	s    *Session
	done bool
}

func (w *interruptOn) Write(p []byte) (int, error) {
	w.buf.Write(p)
	if !w.done && strings.Contains(w.buf.String(), w.word) {
		w.done = true
		w.s.Interrupt()
		w.s.Interrupt()
	}
	return len(p), nil
}

// A command's expression that never ends is stopped by Interrupt, as a
// cell is, and the session goes on. Before, Interrupt did nothing while a
// command ran.
func TestCommandExpressionsCanBeInterrupted(t *testing.T) {
	for _, cmd := range []string{"@coupling", "@report"} {
		t.Run(cmd, func(t *testing.T) {
			dir := t.TempDir()
			w, errb := serveInterrupted(t, Options{OutDir: dir}, "spinning",
				"import (\n\"fmt\"\n\"couplet/mdo\"\n)\n"+cmd+` func() *mdo.System { fmt.Println("spinning"); for { } }()`+"\n6 * 7\n")
			if !strings.Contains(errb.String(), "stopped: interrupted (Ctrl-C)") {
				t.Errorf("stderr %q, want the command stopped by the interrupt", errb.String())
			}
			if !strings.HasSuffix(w.buf.String(), "42\n") {
				t.Errorf("the session did not go on: %q (stderr %q)", w.buf.String(), errb.String())
			}
			if _, err := os.Stat(filepath.Join(dir, "report.html")); !errors.Is(err, os.ErrNotExist) {
				t.Errorf("a stopped command wrote a report: %v", err)
			}
		})
	}
}
