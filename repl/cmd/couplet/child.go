package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"strconv"
	"sync"
	"syscall"

	"couplet/repl"
)

// The environment of the interpreter process: couplet run starts the
// same program again with these set, and the child runs the script.
const (
	// childEnv marks the interpreter process; its value is the parent's
	// process number.
	childEnv = "COUPLET_INTERPRETER_OF"
	// capEnv is the interpreter process's memory cap in bytes.
	capEnv = "COUPLET_INTERPRETER_MEMORY"
)

// The descriptors the interpreter process shares with its parent beside
// its standard ones (cmd.ExtraFiles of the parent, in this order).
const (
	// eventsFD is where it writes its events, one JSON message a line.
	eventsFD = 3
	// stderrFD is a session's error output (its standard error is kept
	// for the Go runtime's report of a crash).
	stderrFD = 4
	// requestsFD is where a session's interpreter process reads the
	// cells and commands to run, one JSON request a line.
	requestsFD = 5
)

// message is one line of the interpreter process's events: a run event,
// or its exit status (Kind "exit") as its last line. The interpreter
// process of a session sends more (see notebook_child.go): "ready" when
// it can take requests, "accepted" as it takes one, "started" and
// "ended" with the record of each cell, and "done" when a request is
// done.
type message struct {
	repl.RunEvent
	Code int `json:"code,omitempty"`
	// Record is the cell that started or ended.
	Record *cellRecord `json:"record,omitempty"`
	// Out and ErrOut count the bytes written to the session's output and
	// error output so far (the parent relays them when they are pipes).
	Out    int64 `json:"out,omitempty"`
	ErrOut int64 `json:"errout,omitempty"`
	// Quit is set when the command done asks to end the session.
	Quit bool `json:"quit,omitempty"`
	// Next is the number the next cell will get.
	Next int `json:"next,omitempty"`
}

// interpreterProcess reports whether this process is the interpreter
// process of a supervising couplet run, and readies it if so: it forgets
// the marker (so that programs a trusted script starts are not taken for
// interpreters), leaves at once if its parent has gone already, and puts
// on the memory cap. It returns the writer of its events.
func interpreterProcess() (*events, bool) {
	parent := os.Getenv(childEnv)
	if parent == "" {
		return nil, false
	}
	capText := os.Getenv(capEnv)
	os.Unsetenv(childEnv)
	os.Unsetenv(capEnv)
	// the parent ends this process when it dies (Pdeathsig); one that
	// died before that was set up is seen here
	if strconv.Itoa(os.Getppid()) != parent {
		os.Exit(1)
	}
	if c, err := strconv.ParseUint(capText, 10, 64); err == nil && c > 0 {
		limitMemory(c)
	}
	// the programs the script starts do not inherit the descriptors
	// shared with the parent (which would keep them open after a death)
	for fd := eventsFD; fd <= requestsFD; fd++ {
		syscall.CloseOnExec(fd)
	}
	return &events{w: os.NewFile(eventsFD, "couplet-events")}, true
}

// limitMemory caps the interpreter process's memory at c bytes.
//
// The hard cap is RLIMIT_DATA: since Linux 4.7 it bounds the process's
// private writable mappings, which is where the Go heap, goroutine stacks
// and SQLite's pages live, while the address space Go reserves but does
// not use (PROT_NONE) is not counted, so a small cap does not stop the
// program from starting as RLIMIT_AS would. An allocation past the cap
// makes the runtime stop the process with "fatal error: runtime: out of
// memory" (it cannot be recovered, hence the process of its own). The soft
// limit (debug.SetMemoryLimit, 90 % of the cap) makes the collector work
// harder near the cap, so that garbage alone does not reach it, and a
// goroutine's stack may take a quarter of the cap and 256 MiB at most
// (the runtime's own bound is 1 GB, which a runaway recursion of the
// interpreter takes seconds and twice that memory to reach), so that
// unbounded recursion ends soon as a stack overflow.
func limitMemory(c uint64) {
	lim := syscall.Rlimit{Cur: c, Max: c}
	if err := syscall.Setrlimit(syscall.RLIMIT_DATA, &lim); err != nil {
		fmt.Fprintf(os.Stderr, "couplet run: the memory cap of %d bytes could not be set: %v\n", c, err)
	}
	debug.SetMemoryLimit(int64(c / 10 * 9))
	debug.SetMaxStack(int(min(c/4, 256<<20)))
}

// events writes the interpreter process's messages to its parent.
type events struct {
	mu sync.Mutex
	w  io.Writer
}

// send writes one message; a parent that stopped reading is ignored.
func (e *events) send(m message) {
	b, err := json.Marshal(m)
	if err != nil {
		return
	}
	e.mu.Lock()
	defer e.mu.Unlock()
	_, _ = e.w.Write(append(b, '\n'))
}

// watch is the RunOptions.Watch of the interpreter process.
func (e *events) watch(ev repl.RunEvent) { e.send(message{RunEvent: ev}) }

// exit tells the parent the exit status the run ended with; it is the
// last message.
func (e *events) exit(code int) int {
	e.send(message{RunEvent: repl.RunEvent{Kind: "exit"}, Code: code})
	return code
}
