package main

import (
	"bufio"
	"bytes"
	"database/sql"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"couplet/repl/distribute"
)

// spreadStudy is the GA the spreading tests run.
var spreadStudy = filepath.Join("..", "..", "testdata", "spread_ga.study")

// lines collects a process's output line by line; tests wait on it.
type lines struct {
	mu      sync.Mutex
	text    strings.Builder
	changed chan struct{}
	closed  bool
}

// collect reads r into a new lines until r ends.
func collect(r interface{ Read([]byte) (int, error) }) *lines {
	l := &lines{changed: make(chan struct{}, 1)}
	go func() {
		sc := bufio.NewScanner(r)
		for sc.Scan() {
			l.mu.Lock()
			l.text.WriteString(sc.Text() + "\n")
			l.mu.Unlock()
			l.signal()
		}
		l.mu.Lock()
		l.closed = true
		l.mu.Unlock()
		l.signal()
	}()
	return l
}

// signal wakes a waiter.
func (l *lines) signal() {
	select {
	case l.changed <- struct{}{}:
	default:
	}
}

// String returns what was read so far.
func (l *lines) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.text.String()
}

// waitCount waits until text occurs n times in the output; it fails the
// test when the output ends first (or after two minutes, a safety net
// for a broken build, not a synchronisation).
func (l *lines) waitCount(t *testing.T, text string, n int) {
	t.Helper()
	safety := time.After(2 * time.Minute)
	for {
		l.mu.Lock()
		got, closed := strings.Count(l.text.String(), text), l.closed
		l.mu.Unlock()
		if got >= n {
			return
		}
		if closed {
			t.Fatalf("the output ended with %d of %d times %q:\n%s", got, n, text, l)
		}
		select {
		case <-l.changed:
		case <-safety:
			t.Fatalf("no %d times %q in two minutes:\n%s", n, text, l)
		}
	}
}

// startWorkerProcess starts `couplet worker` on the hub; extra is added
// to its environment. It is killed when the test ends.
func startWorkerProcess(t *testing.T, hub *distribute.Hub, name string, extra ...string) (*exec.Cmd, *lines) {
	t.Helper()
	cmd := exec.Command(binary, "worker", "--connect", hub.URL(), "--name", name, "--workspace", t.TempDir(), "--trust-script", "--verbose")
	cmd.Env = append(append(os.Environ(), tokenEnv+"="+hub.Token()), extra...)
	out, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	cmd.Stderr = os.Stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		_ = cmd.Process.Kill()
		_ = cmd.Wait()
	})
	return cmd, collect(out)
}

// bestOf reads the best point and the counts of summary.json as written.
func bestOf(t *testing.T, dir string) (best string, evaluations, failed int) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		Best        json.RawMessage
		Evaluations int
		Failed      int
	}
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return string(s.Best), s.Evaluations, s.Failed
}

// TestKilledWorkerSameBest runs the GA of spread_ga.study on one process,
// then on three worker processes, one of which is killed with SIGKILL
// while it holds a request: the run gets the same best point, bit for bit
// (summary.json writes each float64 in the shortest form that reads back
// to its bits), and the same counts.
func TestKilledWorkerSameBest(t *testing.T) {
	if testing.Short() {
		t.Skip("starts five processes; the in-process tests of repl/distribute cover -short")
	}
	ref := t.TempDir()
	if out, err := exec.Command(binary, "run", spreadStudy, "--out", ref, "--trust-script", "--quiet").CombinedOutput(); err != nil {
		t.Fatalf("single-process run: %v\n%s", err, out)
	}
	wantBest, wantEvals, wantFailed := bestOf(t, ref)
	if wantFailed == 0 {
		t.Fatal("the single-process run has no failed evaluation; the study should have some")
	}

	hub, err := distribute.StartHub(distribute.HubConfig{Token: "worker-test", StoreDir: t.TempDir()})
	if err != nil {
		t.Fatal(err)
	}
	defer hub.Close()
	dir := t.TempDir()
	run := exec.Command(binary, "run", spreadStudy, "--out", dir, "--trust-script", "--quiet", "--workers-on", hub.URL(), "--redeliver-after", "1s")
	run.Env = append(os.Environ(), tokenEnv+"="+hub.Token())
	var runErr bytes.Buffer
	run.Stderr = &runErr
	if err := run.Start(); err != nil {
		t.Fatal(err)
	}
	exited := make(chan error, 1)
	go func() { exited <- run.Wait() }()
	defer func() { _ = run.Process.Kill() }()

	// The first worker, alone, answers four requests and holds the fifth
	// for ever: the run cannot end unless that request is handed out
	// again, which comes only after the kill.
	w1, log1 := startWorkerProcess(t, hub, "w1", "COUPLET_TEST_HOLD=5")
	log1.waitCount(t, "worker w1: took request", 5)
	_, log2 := startWorkerProcess(t, hub, "w2")
	_, log3 := startWorkerProcess(t, hub, "w3")
	log2.waitCount(t, "worker w2: run", 2) // it serves the run
	log3.waitCount(t, "worker w3: run", 2)
	if err := w1.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	if err := <-exited; err != nil {
		t.Fatalf("the spread run: %v\n%s", err, runErr.String())
	}
	gotBest, gotEvals, gotFailed := bestOf(t, dir)
	if gotBest != wantBest || gotEvals != wantEvals || gotFailed != wantFailed {
		t.Errorf("single process: best %s, %d evaluations, %d failed\nspread:         best %s, %d evaluations, %d failed", wantBest, wantEvals, wantFailed, gotBest, gotEvals, gotFailed)
	}
	t.Logf("w1 before the kill:\n%s", log1)
	if !strings.Contains(log2.String()+log3.String(), "(delivery 2)") {
		t.Errorf("the request w1 held was not handed out again:\nw2:\n%s\nw3:\n%s", log2, log3)
	}

	// The failed evaluations are in results.db as in a local run, each
	// naming the worker that ran it.
	db, err := sql.Open("sqlite", "file:"+filepath.Join(dir, "spread_bowl", "results.db")+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var n int
	var reason string
	if err := db.QueryRow(`SELECT count(*), min(error) FROM evaluations WHERE error != ''`).Scan(&n, &reason); err != nil {
		t.Fatal(err)
	}
	if n != wantFailed || !strings.HasPrefix(reason, "on worker w") || !strings.Contains(reason, "past the bowl's rim at 0.95") {
		t.Errorf("results.db has %d failed evaluations (want %d), the first saying %q", n, wantFailed, reason)
	}
}

// TestLocalWorkersSameBest runs the study on two worker processes the
// run starts itself, with a hub of its own.
func TestLocalWorkersSameBest(t *testing.T) {
	ref := t.TempDir()
	if out, err := exec.Command(binary, "run", spreadStudy, "--out", ref, "--trust-script", "--quiet").CombinedOutput(); err != nil {
		t.Fatalf("single-process run: %v\n%s", err, out)
	}
	dir := t.TempDir()
	if out, err := exec.Command(binary, "run", spreadStudy, "--out", dir, "--trust-script", "--quiet", "--local-workers", "2").CombinedOutput(); err != nil {
		t.Fatalf("run on local workers: %v\n%s", err, out)
	}
	wantBest, wantEvals, _ := bestOf(t, ref)
	gotBest, gotEvals, _ := bestOf(t, dir)
	if gotBest != wantBest || gotEvals != wantEvals {
		t.Errorf("single process: best %s, %d evaluations; local workers: best %s, %d evaluations", wantBest, wantEvals, gotBest, gotEvals)
	}
}

func TestWorkerAndHubHelp(t *testing.T) {
	for cmd, want := range map[string]string{
		"worker": "usage: couplet worker --connect URL\n          [--cluster-token TOKEN | --cluster-creds FILE]",
		"hub":    "usage: couplet hub [--listen HOST:PORT]",
	} {
		code, stdout, _ := runCmd(cmd, "--help")
		if code != 0 || !strings.Contains(stdout, want) || !strings.Contains(stdout, "--cluster-token TOKEN") {
			t.Errorf("couplet %s --help: exit %d, usage:\n%s", cmd, code, stdout)
		}
	}
}

func TestSpreadFlagsRefused(t *testing.T) {
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"run", spreadStudy, "--out", "x", "--workers-on", "nats://127.0.0.1:1", "--local-workers", "2"}, "--workers-on and --local-workers: give one"},
		{[]string{"run", spreadStudy, "--out", "x", "--local-workers", "-1"}, "--local-workers -1: want 1 to 256"},
		{[]string{"run", spreadStudy, "--out", "x", "--cluster-token", "t"}, "--cluster-token and --cluster-creds go with --workers-on"},
		{[]string{"run", spreadStudy, "--out", "x", "--local-workers", "1", "--redeliver-after", "1ms"}, "--redeliver-after 1ms: want at least 100ms"},
		{[]string{"worker"}, "couplet worker: need --connect URL"},
		{[]string{"--local-workers", "2"}, "couplet: --workers-on and --local-workers go with couplet run"},
		{[]string{"worker", "--connect", "nats://127.0.0.1:1", "--parallel", "0"}, "couplet worker: --parallel 0: want a whole number of 1 or more\n"},
		{[]string{"hub", "--listen", "127.0.0.1:99999", "--cluster-token", "t"}, `couplet hub: --listen "127.0.0.1:99999": want HOST:PORT with a port from 0 to 65535, e.g. 0.0.0.0:4222` + "\n"},
	} {
		code, _, stderr := runCmd(tc.args...)
		if code != 2 || !strings.Contains(stderr, tc.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", tc.args, code, stderr, tc.want)
		}
	}
}
