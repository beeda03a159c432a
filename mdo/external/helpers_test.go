package external_test

import (
	"os/exec"
	"path/filepath"
	"testing"

	"couplet/mdo"
	"couplet/mdo/external"
)

// buildSellarProg builds testdata/sellarprog into a folder of the test
// and returns its path.
func buildSellarProg(t testing.TB) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "sellarprog")
	out, err := exec.Command("go", "build", "-o", path, "couplet/mdo/external/testdata/sellarprog").CombinedOutput()
	if err != nil {
		t.Fatalf("building the test program: %v\n%s", err, out)
	}
	return path
}

// sellarFunctions declares the test program as the Sellar functions
// discipline (the same variables as mdo.Sellar's sellar_functions).
func sellarFunctions(prog, mode, workDir string) external.Program {
	var inputs, outputs []mdo.Var
	for _, d := range mdo.Sellar() {
		if d.Name() == "sellar_functions" {
			inputs, outputs = d.Inputs(), d.Outputs()
		}
	}
	return external.Program{
		Name:     "sellar_functions",
		Inputs:   inputs,
		Outputs:  outputs,
		Command:  []string{prog, mode},
		Template: "# Sellar functions\nx = @{x}\nz2 = @{z2}\ny1 = @{y1}\ny2 = @{y2}\n",
		WorkDir:  workDir,
	}
}

// sellarWith returns the Sellar study with its functions discipline
// replaced by d.
func sellarWith(t testing.TB, d mdo.Discipline, workers int) *mdo.Study {
	t.Helper()
	var discs []mdo.Discipline
	for _, s := range mdo.Sellar() {
		if s.Name() == "sellar_functions" {
			s = d
		}
		discs = append(discs, s)
	}
	sys, err := mdo.NewSystem(discs...)
	if err != nil {
		t.Fatal(err)
	}
	return &mdo.Study{
		Name:        "sellar-external",
		System:      sys,
		Design:      []mdo.DesignVar{mdo.Continuous("x", 0, 10), mdo.Continuous("z1", -10, 10), mdo.Continuous("z2", 0, 10)},
		Objectives:  []mdo.Objective{mdo.Minimize("f")},
		Constraints: []mdo.Constraint{mdo.AtLeast("g1", 3.16), mdo.AtMost("g2", 24)},
		Workers:     workers,
	}
}
