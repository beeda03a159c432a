package external_test

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"

	"couplet/mdo"
	"couplet/mdo/external"
)

// parentEnv names the file in which the helper process of
// TestProgramDiesWithItsParent has its program write its process number.
const parentEnv = "COUPLET_TEST_PROGRAM_PIDFILE"

// TestProgramDiesWithItsParent starts this test binary as a parent that
// runs an external program as a discipline (a script that writes its
// process number and then sleeps for ten minutes), kills the parent
// with SIGKILL once the program has written its number, and checks that
// the program is gone: a killed run or session must not leave programs
// running.
func TestProgramDiesWithItsParent(t *testing.T) {
	if pidFile := os.Getenv(parentEnv); pidFile != "" {
		runHangingProgram(t, pidFile)
		return
	}
	dir := t.TempDir()
	pidFile := filepath.Join(dir, "program.pid")
	parent := exec.Command(os.Args[0], "-test.run=^TestProgramDiesWithItsParent$")
	parent.Env = append(os.Environ(), parentEnv+"="+pidFile)
	var out bytes.Buffer
	parent.Stdout, parent.Stderr = &out, &out
	if err := parent.Start(); err != nil {
		t.Fatal(err)
	}
	// synchronise on what the program writes: its process number
	var pid int
	for deadline := time.Now().Add(60 * time.Second); pid == 0; {
		if b, err := os.ReadFile(pidFile); err == nil && bytes.HasSuffix(b, []byte("\n")) {
			pid, _ = strconv.Atoi(string(bytes.TrimSpace(b)))
		}
		if pid == 0 && time.Now().After(deadline) {
			_ = parent.Process.Kill()
			_ = parent.Wait()
			t.Fatalf("the program did not start within a minute; the parent said:\n%s", out.String())
		}
		time.Sleep(10 * time.Millisecond)
	}
	t.Cleanup(func() { _ = syscall.Kill(pid, syscall.SIGKILL) })
	if err := parent.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	_ = parent.Wait()
	for deadline := time.Now().Add(30 * time.Second); running(pid); {
		if time.Now().After(deadline) {
			t.Fatalf("the program (process %d) still runs 30 s after its parent was killed", pid)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// running reports whether process pid runs (exists and is not a zombie
// waiting to be collected).
func running(pid int) bool {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return false
	}
	end := bytes.LastIndexByte(b, ')')
	return end < 0 || end+2 >= len(b) || (b[end+2] != 'Z' && b[end+2] != 'X')
}

// runHangingProgram is the parent's side: it runs a program that writes
// its process number to pidFile and sleeps, as a discipline; it returns
// only if the program ends, which the test never lets it do.
func runHangingProgram(t *testing.T, pidFile string) {
	// in the test's folder, which the test removes (this process is killed)
	script := filepath.Join(filepath.Dir(pidFile), "hang.sh")
	body := "#!/bin/sh\necho $$ > " + strconv.Quote(pidFile) + ".tmp && mv " + strconv.Quote(pidFile) + ".tmp " + strconv.Quote(pidFile) + "\nexec sleep 600\n"
	if err := os.WriteFile(script, []byte(body), 0o755); err != nil {
		t.Fatal(err)
	}
	d, err := external.New(external.Program{
		Name:     "hang",
		Inputs:   []mdo.Var{{Name: "a", Unit: "-", Min: -1, Max: 1}},
		Outputs:  []mdo.Var{{Name: "b", Unit: "-", Min: -1, Max: 1}},
		Command:  []string{script},
		Template: "a = @{a}\n",
		Timeout:  time.Hour,
		WorkDir:  filepath.Dir(pidFile),
	}, external.AllowAll())
	if err != nil {
		t.Fatal(err)
	}
	err = d.Compute([]float64{0}, []float64{0})
	t.Fatalf("the program ended: %v", err)
}
