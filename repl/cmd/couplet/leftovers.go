package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strconv"
	"syscall"
	"time"
)

// interpreterAttr is how an interpreter process is started: it leads a
// session of its own, so that Ctrl-C on the terminal reaches this
// process alone (which passes it on once), and so that every program its
// cells start stays in that session, however many process groups of
// their own they make (mdo/external gives each program one), and can be
// ended with it (endLeftovers); and it is killed when this process dies.
func interpreterAttr() *syscall.SysProcAttr {
	return &syscall.SysProcAttr{Setsid: true, Pdeathsig: syscall.SIGKILL}
}

// leftoverWait bounds how long endLeftovers waits for the killed
// programs to be gone.
const leftoverWait = 5 * time.Second

// endLeftovers ends the programs left running in the session that the
// ended interpreter process sid led: each is killed with its process
// group. It returns once none is left, or after leftoverWait; a killed
// program whose parent has not collected it yet no longer runs.
func endLeftovers(sid int) {
	deadline := time.Now().Add(leftoverWait)
	for {
		left := sessionMembers(sid)
		if len(left) == 0 || time.Now().After(deadline) {
			return
		}
		for _, p := range left {
			_ = syscall.Kill(-p.pgid, syscall.SIGKILL)
			_ = syscall.Kill(p.pid, syscall.SIGKILL)
		}
		// the kernel ends them at once, but not within the call
		time.Sleep(5 * time.Millisecond)
	}
}

// member is a running process of a session.
type member struct{ pid, pgid int }

// sessionMembers lists the running processes of session sid (not those
// that ended and wait to be collected), from /proc.
func sessionMembers(sid int) []member {
	dirs, err := filepath.Glob("/proc/[0-9]*/stat")
	if err != nil {
		return nil
	}
	var out []member
	for _, d := range dirs {
		b, err := os.ReadFile(d)
		if err != nil {
			continue // it ended meanwhile
		}
		pid, state, pgid, s, ok := parseStat(b)
		if ok && s == sid && state != 'Z' && state != 'X' && pid != os.Getpid() {
			out = append(out, member{pid: pid, pgid: pgid})
		}
	}
	return out
}

// parseStat reads the process number, state, process group and session
// of a /proc/PID/stat line: "pid (comm) state ppid pgrp session …",
// where comm may hold spaces and parentheses.
func parseStat(b []byte) (pid int, state byte, pgid, sid int, ok bool) {
	open := bytes.IndexByte(b, '(')
	end := bytes.LastIndexByte(b, ')')
	if open < 1 || end < open {
		return 0, 0, 0, 0, false
	}
	pid, err := strconv.Atoi(string(bytes.TrimSpace(b[:open])))
	if err != nil {
		return 0, 0, 0, 0, false
	}
	f := bytes.Fields(b[end+1:])
	if len(f) < 4 || len(f[0]) != 1 {
		return 0, 0, 0, 0, false
	}
	pgid, err1 := strconv.Atoi(string(f[2]))
	sid, err2 := strconv.Atoi(string(f[3]))
	if err1 != nil || err2 != nil {
		return 0, 0, 0, 0, false
	}
	return pid, f[0][0], pgid, sid, true
}
