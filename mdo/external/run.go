package external

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"
)

// stderrTail is how much of the end of the program's standard error a
// *ProgramError keeps.
const stderrTail = 2000

// ProgramError reports a run of the program that failed: it exited with
// a non-zero status, ran out of time, could not start, or wrote answers
// that could not be read (Err is then a *BadOutputError).
type ProgramError struct {
	Discipline string
	Program    string
	// Attempts is how many runs were made.
	Attempts int
	// ExitStatus is the exit status (-1 when the program did not exit by
	// itself); TimedOut reports a run killed at the time limit.
	ExitStatus int
	TimedOut   bool
	Timeout    time.Duration
	// Stderr is the tail of the program's standard error; Folder is the
	// kept working folder of the last run.
	Stderr string
	Folder string
	Err    error
}

// Error implements error.
func (e *ProgramError) Error() string {
	var what string
	switch {
	case e.TimedOut:
		what = fmt.Sprintf("time-out: killed after %v (Timeout)", e.Timeout)
	case errors.As(e.Err, new(*BadOutputError)):
		what = e.Err.Error()
	case e.ExitStatus > 0:
		what = fmt.Sprintf("exit status %d", e.ExitStatus)
	default:
		what = e.Err.Error()
	}
	s := fmt.Sprintf("external program %s failed after %d run(s): %s", e.Program, e.Attempts, what)
	if e.Folder != "" {
		s += "; working folder kept: " + e.Folder
	}
	if t := strings.TrimSpace(e.Stderr); t != "" {
		s += "; its standard error ends: " + t
	}
	return s
}

// Unwrap returns the underlying error.
func (e *ProgramError) Unwrap() error { return e.Err }

// runOnce runs the program once in a fresh working folder.
func (d *Discipline) runOnce(input string) ([]float64, error) {
	d.cache.runs.Add(1)
	base := d.p.WorkDir
	if base == "" {
		base = os.TempDir()
	}
	fail := func(dir string, err error) *ProgramError {
		return &ProgramError{Discipline: d.p.Name, Program: d.path, ExitStatus: -1, Timeout: d.p.Timeout, Folder: dir, Err: err}
	}
	if err := os.MkdirAll(base, 0o755); err != nil {
		return nil, fail("", fmt.Errorf("the working folders' base: %w", err))
	}
	dir, err := os.MkdirTemp(base, safeName(d.p.Name)+"-")
	if err != nil {
		return nil, fail("", fmt.Errorf("making the working folder: %w", err))
	}
	if err := os.WriteFile(filepath.Join(dir, d.p.InputFile), []byte(input), 0o644); err != nil {
		return nil, fail(dir, fmt.Errorf("writing the input file: %w", err))
	}
	ctx, cancel := context.WithTimeout(context.Background(), d.p.Timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, d.path, d.p.Command[1:]...)
	cmd.Dir = dir
	var stdout, stderr bytes.Buffer
	cmd.Stdout = &stdout
	cmd.Stderr = &tailWriter{buf: &stderr, max: stderrTail}
	if d.p.Stdin {
		cmd.Stdin = strings.NewReader(input)
	}
	ownGroup(cmd)
	cmd.WaitDelay = 2 * time.Second
	runErr := cmd.Run()
	if runErr != nil {
		pe := fail(dir, runErr)
		pe.Stderr = stderr.String()
		if ctx.Err() != nil {
			pe.TimedOut = true
		} else if ee, ok := runErr.(*exec.ExitError); ok {
			pe.ExitStatus = ee.ExitCode()
		}
		return nil, pe
	}
	text := stdout.Bytes()
	if d.p.OutputFile != "" {
		text, err = os.ReadFile(filepath.Join(dir, d.p.OutputFile))
		if err != nil {
			pe := fail(dir, &BadOutputError{Output: d.p.Outputs[0].Name, Reason: "the output file was not written: " + err.Error()})
			pe.ExitStatus, pe.Stderr = 0, stderr.String()
			return nil, pe
		}
	}
	vals := make([]float64, len(d.p.Outputs))
	if d.jsonOut {
		err = readJSON(text, d.readers, d.p.Outputs, vals)
	} else {
		err = readText(text, d.readers, d.p.Outputs, vals)
	}
	if err != nil {
		pe := fail(dir, err)
		pe.ExitStatus, pe.Stderr = 0, stderr.String()
		return nil, pe
	}
	if err := os.RemoveAll(dir); err != nil {
		return nil, fail(dir, fmt.Errorf("removing the working folder: %w", err))
	}
	return vals, nil
}

// safeName turns a discipline name into a folder-name prefix.
func safeName(name string) string {
	return strings.Map(func(r rune) rune {
		if r == '/' || r == '\\' || r == os.PathSeparator || r < ' ' {
			return '_'
		}
		return r
	}, name)
}

// tailWriter keeps the last max bytes written to it.
type tailWriter struct {
	buf *bytes.Buffer
	max int
}

// Write implements io.Writer.
func (w *tailWriter) Write(p []byte) (int, error) {
	w.buf.Write(p)
	if over := w.buf.Len() - w.max; over > 0 {
		rest := append([]byte(nil), w.buf.Bytes()[over:]...)
		w.buf.Reset()
		w.buf.Write(rest)
	}
	return len(p), nil
}
