package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// oneVariableScript is a script that attaches a one-variable study named
// name, whose analysis runs body (a func(in, out []float64) error body
// on one line), samples six random points of it and publishes the result.
func oneVariableScript(name, body string) string {
	return `s := mdo.FuncVars("` + name + `",
	[]mdo.Var{{Name: "a", Default: 0.5, Min: 0, Max: 1}},
	[]mdo.Var{{Name: "f", Default: 1, Min: -1e9, Max: 1e9}},
	func(in, out []float64) error { ` + body + ` })
sys, err := mdo.NewSystem(s)
if err != nil {
	panic(err)
}
study := &mdo.Study{Name: "` + name + `", System: sys, Design: []mdo.DesignVar{mdo.Continuous("a", 0, 1)},
	Objectives: []mdo.Objective{mdo.Minimize("f")}, Seed: 5, Workers: 1}
cell.Attach(study)
result, err := optimizers.RandomDesign{Samples: 6}.Minimize(cell.Context(), study)
if err != nil {
	panic(err)
}
cell.Publish(result)
`
}

// publishingCell is a first cell that publishes a result: six random
// points of a one-variable bowl f = (a - 0.3)², recorded in results.db.
var publishingCell = "//~ cell 1\n" + oneVariableScript("bowl", "out[0] = (in[0] - 0.3) * (in[0] - 0.3); return nil")

// runDying runs a study whose second cell kills the process that runs
// it, and returns the exit status and standard error. The second cell's
// first line is line 19 of the file.
func runDying(t *testing.T, out, second string, stdout *os.File, args ...string) (int, string) {
	t.Helper()
	study := filepath.Join(t.TempDir(), "dying.study")
	if err := os.WriteFile(study, []byte(publishingCell+"//~ cell 2\n"+second), 0o644); err != nil {
		t.Fatal(err)
	}
	// a run that never ends fails the test rather than hang it
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, binary, append([]string{"run", study, "--out", out}, args...)...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if stdout != nil {
		cmd.Stdout = stdout
	}
	err := cmd.Run()
	if ctx.Err() != nil {
		t.Fatalf("the run did not end; stderr:\n%s", stderr.String())
	}
	var ee *exec.ExitError
	switch {
	case errors.As(err, &ee):
		return ee.ExitCode(), stderr.String()
	case err != nil:
		t.Fatal(err)
	}
	return 0, stderr.String()
}

// checkEarlierResult checks that the folder holds the first cell's
// result: its result folder bowl with its report and store of six rows,
// and the folder's summary (study bowl, six evaluations) and index.
func checkEarlierResult(t *testing.T, out string) {
	t.Helper()
	for _, f := range []string{filepath.Join("bowl", "report.html"), filepath.Join("bowl", "summary.json"), filepath.Join("bowl", "evaluations.csv"), "index.html"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("the earlier result's %s was not written: %v", f, err)
		}
	}
	b, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatalf("the earlier result's summary was not written: %v", err)
	}
	var sum struct {
		Study       string
		Evaluations int
		Best        *struct{ Objective float64 }
	}
	if err := json.Unmarshal(b, &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Study != "bowl" || sum.Evaluations != 6 || sum.Best == nil {
		t.Errorf("summary %s; want study bowl with 6 evaluations and a best point", b)
	}
	if n := rowsIn(t, filepath.Join(out, "bowl", "results.db")); n != 6 {
		t.Errorf("results.db holds %d rows, want 6", n)
	}
}

// What no recover in the script can catch ends the process that runs
// the script, not couplet run: the result published before is written
// in full, the message names the cell and what the Go runtime said, and
// the exit status is 1.
func TestInterpreterProcessDies(t *testing.T) {
	tests := []struct {
		name, cell string
		args       []string
		want       []string
	}{
		{"panic in a goroutine", `import "fmt"
fmt.Println("starting")
never := make(chan bool)
go func() { panic("the goroutine gives up") }()
<-never
`, nil, []string{"cell 2: the interpreter process died: panic: the goroutine gives up"}},
		{"unbounded recursion", `var deep func(n int) int
deep = func(n int) int { return deep(n+1) + 1 }
deep(0)
`, nil, []string{"cell 2: the interpreter process died: fatal error: stack overflow"}},
		{"past the memory cap", `var hoard [][]byte
for {
	hoard = append(hoard, make([]byte, 1<<20))
}
`, []string{"--memory-cap", "256MiB"}, []string{"cell 2: the interpreter process died: fatal error: ", "out of memory", "its memory cap is 256MiB; --memory-cap changes it"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.args != nil && raceDetector {
				t.Skip("the race detector's shadow memory counts against the memory cap")
			}
			out := t.TempDir()
			code, errs := runDying(t, out, tc.cell, nil, tc.args...)
			if code != 1 {
				t.Errorf("exit status %d, want 1; stderr:\n%s", code, errs)
			}
			for _, w := range append(tc.want, "dying.study:19: cell 2", "the last, of study bowl published in cell 1, into "+filepath.Join(out, "bowl")) {
				if !strings.Contains(errs, w) {
					t.Errorf("stderr lacks %q:\n%s", w, errs)
				}
			}
			checkEarlierResult(t, out)
		})
	}
}

// A script that cannot be stopped (its output blocks on a pipe no one
// reads, so its cell never comes back) is ended by couplet run once the
// time limit and two graces have passed; the result published before is
// written and the exit status is 1.
func TestTimeLimitEndsAStuckScript(t *testing.T) {
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	out := t.TempDir()
	code, errs := runDying(t, out, `import (
	"fmt"
	"strings"
)
line := strings.Repeat("x", 1000)
for {
	fmt.Println(line)
}
`, w, "--timeout", "1s")
	w.Close()
	if code != 1 || !strings.Contains(errs, "cell 2: the interpreter process died: the time limit of 1s was reached and the script did not stop within 4s") {
		t.Errorf("exit status %d, stderr:\n%s\nwant exit 1 saying the time limit ended the script", code, errs)
	}
	checkEarlierResult(t, out)
}

func TestParseSize(t *testing.T) {
	tests := []struct {
		in   string
		want uint64
		err  string
	}{
		{"512MiB", 512 << 20, ""},
		{"4GiB", 4 << 30, ""},
		{"131072KiB", 128 << 20, ""},
		{"1TiB", 1 << 40, ""},
		{"100MiB", 0, "at least 128MiB"},
		{"512", 0, "followed by KiB, MiB, GiB or TiB"},
		{"512MB", 0, "followed by KiB"},
		{"0512MiB", 0, "followed by KiB"},
		{"-1GiB", 0, "followed by KiB"},
		{"1.5GiB", 0, "followed by KiB"},
		{"99999999999TiB", 0, "followed by KiB"},
	}
	for _, tc := range tests {
		got, err := parseSize("--memory-cap", tc.in)
		switch {
		case tc.err == "" && (err != nil || got != tc.want):
			t.Errorf("parseSize(%q) = %d, %v; want %d", tc.in, got, err, tc.want)
		case tc.err != "" && (err == nil || !strings.Contains(err.Error(), tc.err) || !strings.Contains(err.Error(), tc.in)):
			t.Errorf("parseSize(%q) error %v; want one naming the value and %q", tc.in, err, tc.err)
		}
	}
	if code, _, errs := runCmd("run", "x.study", "--out", t.TempDir(), "--memory-cap", "lots"); code != 2 || !strings.Contains(errs, `--memory-cap "lots"`) {
		t.Errorf("--memory-cap lots: exit %d, stderr %q; want exit 2 naming the value", code, errs)
	}
}
