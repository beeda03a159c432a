package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"os/signal"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"time"

	"couplet/repl"
)

// supervisor is the parent side of `couplet run`: it holds the output
// folder's lock, runs the script in an interpreter process of its own
// (this program again, marked by childEnv), forwards Ctrl-C to it,
// enforces the time limit on it and, when it dies, writes the folder of
// the result published before the death and says what ended it.
type supervisor struct {
	opts   repl.RunOptions
	args   []string // the arguments of `couplet run`, passed on
	cap    uint64   // memory cap of the interpreter process, bytes
	stdout io.Writer
	stderr io.Writer

	mu        sync.Mutex
	cell      repl.RunEvent   // the cell running
	published []repl.RunEvent // the results published, in order
	writing   bool            // the interpreter process writes the folder
	exited    bool            // it sent its exit status
	code      int
	ended     string // how the supervisor ended it ("" if it did not)
}

// grace is the time a cancelled interpreter process has to come back
// before it is ended.
func (sv *supervisor) grace() time.Duration {
	if sv.opts.Grace > 0 {
		return sv.opts.Grace
	}
	return 2 * time.Second
}

// run runs the interpreter process to its end and returns the exit
// status of `couplet run`.
func (sv *supervisor) run() int {
	start := time.Now()
	lock, err := repl.Guard(sv.opts)
	if err != nil {
		fmt.Fprintln(sv.stderr, "couplet run:", err)
		return 2
	}
	defer lock.Release()
	exe, err := os.Executable()
	if err != nil {
		fmt.Fprintln(sv.stderr, "couplet run: finding this program to start its interpreter process:", err)
		return 1
	}
	evR, evW, err := os.Pipe()
	if err != nil {
		fmt.Fprintln(sv.stderr, "couplet run:", err)
		return 1
	}
	errR, errW, err := os.Pipe()
	if err != nil {
		fmt.Fprintln(sv.stderr, "couplet run:", err)
		return 1
	}
	cmd := exec.Command(exe, append([]string{"run"}, sv.args...)...)
	cmd.Env = append(os.Environ(), childEnv+"="+strconv.Itoa(os.Getpid()), capEnv+"="+strconv.FormatUint(sv.cap, 10))
	cmd.Stdout = sv.stdout
	cmd.Stderr = errW
	cmd.ExtraFiles = []*os.File{evW}
	cmd.SysProcAttr = interpreterAttr()
	sigs := make(chan os.Signal, 4)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	defer signal.Stop(sigs)
	if err := cmd.Start(); err != nil {
		evR.Close()
		errR.Close()
		evW.Close()
		errW.Close()
		fmt.Fprintln(sv.stderr, "couplet run: starting the interpreter process:", err)
		return 1
	}
	evW.Close()
	errW.Close()
	var readers sync.WaitGroup
	readers.Add(2)
	go func() { defer readers.Done(); sv.readEvents(evR) }()
	crash := &crashWatch{w: sv.stderr}
	go func() { defer readers.Done(); crash.copy(errR) }()

	done := make(chan struct{})
	go sv.enforce(cmd.Process, start, sigs, done)
	werr := cmd.Wait()
	close(done)
	// the pipes close with the process (unless a program the script
	// started holds them: it is not waited for long)
	waited := make(chan struct{})
	go func() { readers.Wait(); close(waited) }()
	select {
	case <-waited:
	case <-time.After(sv.grace()):
	}
	evR.Close()
	errR.Close()

	endLeftovers(cmd.Process.Pid)
	sv.mu.Lock()
	exited, code := sv.exited, sv.code
	sv.mu.Unlock()
	if exited {
		crash.flush()
		return code
	}
	return sv.died(werr, crash)
}

// enforce passes Ctrl-C (and SIGTERM) on to the interpreter process and,
// with a time limit, ends it if it has not stopped in time: the process
// cancels its own cells when the limit is reached and has the grace to
// come back; one still in a cell after that is sent SIGTERM, and SIGKILL
// after another grace. The writing of the folder is not cut short.
func (sv *supervisor) enforce(p *os.Process, start time.Time, sigs <-chan os.Signal, done <-chan struct{}) {
	var limit <-chan time.Time
	if sv.opts.Timeout > 0 {
		t := time.NewTimer(time.Until(start.Add(sv.opts.Timeout + 2*sv.grace())))
		defer t.Stop()
		limit = t.C
	}
	var kill <-chan time.Time
	for {
		select {
		case <-done:
			return
		case s := <-sigs:
			_ = p.Signal(s)
		case <-limit:
			limit = nil
			sv.mu.Lock()
			writing := sv.writing
			if !writing {
				sv.ended = fmt.Sprintf("the time limit of %v was reached and the script did not stop within %v", sv.opts.Timeout, 2*sv.grace())
			}
			sv.mu.Unlock()
			if writing {
				continue
			}
			_ = p.Signal(syscall.SIGTERM)
			t := time.NewTimer(sv.grace())
			defer t.Stop()
			kill = t.C
		case <-kill:
			kill = nil
			_ = p.Kill()
		}
	}
}

// readEvents follows the interpreter process's messages.
func (sv *supervisor) readEvents(r io.Reader) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64<<10), 1<<20)
	for sc.Scan() {
		var m message
		if json.Unmarshal(sc.Bytes(), &m) != nil {
			continue
		}
		sv.mu.Lock()
		switch m.Kind {
		case "cell":
			sv.cell = m.RunEvent
		case "published":
			m.Cell, m.Line = sv.cell.Cell, sv.cell.Line
			sv.published = append(sv.published, m.RunEvent)
		case "writing":
			sv.writing = true
		case "exit":
			sv.exited, sv.code = true, m.Code
		}
		sv.mu.Unlock()
	}
}

// died reports the abnormal end of the interpreter process, writes the
// folder of the result published before it, and returns 1.
func (sv *supervisor) died(werr error, crash *crashWatch) int {
	sv.mu.Lock()
	cl, pub, ended := sv.cell, sv.published, sv.ended
	sv.mu.Unlock()
	cause := ended
	if cause == "" {
		cause = deathCause(werr, crash, sv.cap)
	}
	where := sv.opts.File
	if cl.Cell > 0 {
		where = fmt.Sprintf("%s:%d: cell %d", sv.opts.File, cl.Line, cl.Cell)
	}
	fmt.Fprintf(sv.stderr, "couplet run: %s: the interpreter process died: %s\n", where, cause)
	var stores []string
	for _, p := range pub {
		if p.Store == "" {
			fmt.Fprintf(sv.stderr, "couplet run: the result of study %s published in cell %d was recorded in no case store, so it cannot be written\n", p.Study, p.Cell)
			continue
		}
		stores = append(stores, p.Store)
	}
	if len(stores) == 0 {
		return 1
	}
	text, err := os.ReadFile(sv.opts.File)
	dir := ""
	if err == nil {
		dir, err = repl.WriteStored(context.Background(), sv.opts.OutDir, string(text), stores, sv.opts.Figures, sv.opts.EveryOutput)
	}
	if err != nil {
		fmt.Fprintf(sv.stderr, "couplet run: writing the results published before the death: %v\n", err)
		return 1
	}
	last := pub[len(pub)-1]
	fmt.Fprintf(sv.stderr, "couplet run: the results published before the death are written into %s; the last, of study %s published in cell %d, into %s\n", sv.opts.OutDir, last.Study, last.Cell, dir)
	return 1
}

// deathCause says what ended an interpreter process that died, from its
// wait error and the Go runtime's report kept from its standard error;
// capBytes is its memory cap.
func deathCause(werr error, crash *crashWatch, capBytes uint64) string {
	cause := crash.cause()
	var ee *exec.ExitError
	switch {
	case cause != "":
	case errors.As(werr, &ee):
		if ws, ok := ee.Sys().(syscall.WaitStatus); ok && ws.Signaled() {
			cause = "killed by signal " + ws.Signal().String()
			if ws.Signal() == syscall.SIGKILL {
				cause += " (the system may have run out of memory)"
			}
		} else {
			cause = fmt.Sprintf("exit status %d without a word", ee.ExitCode())
		}
	case werr != nil:
		cause = werr.Error()
	default:
		cause = "it ended without saying how the run ended"
	}
	if strings.HasPrefix(cause, "fatal error: ") && strings.Contains(cause, "out of memory") {
		cause += fmt.Sprintf(" (its memory cap is %s; --memory-cap changes it)", formatSize(capBytes))
	}
	return cause
}

// crashWatch passes the interpreter process's standard error on, until
// the Go runtime starts to report a crash there: that report is kept
// (its first 64 KiB) and its first line names the cause. If the process
// ends normally after all, flush passes the kept text on.
type crashWatch struct {
	w       io.Writer
	mu      sync.Mutex
	crashed bool
	kept    bytes.Buffer
}

// crashStart reports whether a line of standard error starts the Go
// runtime's report of a crash.
func crashStart(line string) bool {
	for _, p := range []string{"panic: ", "fatal error: ", "runtime: ", "SIGSEGV", "SIGBUS", "unexpected fault address", "unexpected signal"} {
		if strings.HasPrefix(line, p) {
			return true
		}
	}
	return false
}

// copy reads r to its end.
func (c *crashWatch) copy(r io.Reader) {
	br := bufio.NewReaderSize(r, 64<<10)
	for {
		line, err := br.ReadSlice('\n')
		if len(line) > 0 {
			c.mu.Lock()
			if !c.crashed && crashStart(string(line)) {
				c.crashed = true
			}
			if c.crashed {
				if c.kept.Len() < 64<<10 {
					c.kept.Write(line)
				}
			} else {
				_, _ = c.w.Write(line)
			}
			c.mu.Unlock()
		}
		if err != nil && !errors.Is(err, bufio.ErrBufferFull) {
			return
		}
	}
}

// cause is the line of the runtime's report that says what ended the
// process: its "fatal error:" or "panic:" line, else its first.
func (c *crashWatch) cause() string {
	c.mu.Lock()
	defer c.mu.Unlock()
	lines := strings.Split(c.kept.String(), "\n")
	for _, l := range lines {
		if strings.HasPrefix(l, "fatal error: ") || strings.HasPrefix(l, "panic: ") {
			return strings.TrimSpace(l)
		}
	}
	return strings.TrimSpace(lines[0])
}

// flush passes on what was kept.
func (c *crashWatch) flush() {
	c.mu.Lock()
	defer c.mu.Unlock()
	_, _ = c.w.Write(c.kept.Bytes())
	c.kept.Reset()
}
