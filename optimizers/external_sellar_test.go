package optimizers

import (
	"context"
	"math"
	"os/exec"
	"path/filepath"
	"testing"

	"couplet/mdo"
	"couplet/mdo/external"
)

// TestExternalProgramReachesSellarOptimum replaces Sellar's functions
// discipline with a program built for the test (mdo/external's
// testdata/sellarprog, which reads an input file and prints its
// answers) and reaches the published optimum with Nelder–Mead on two
// workers: f = 3.18339 at z = (1.97764, 0), x = 0 (Sellar, Batill &
// Renaud, AIAA 96-0714, 1996).
func TestExternalProgramReachesSellarOptimum(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs an external program some hundred times")
	}
	prog := filepath.Join(t.TempDir(), "sellarprog")
	if out, err := exec.Command("go", "build", "-o", prog, "couplet/mdo/external/testdata/sellarprog").CombinedOutput(); err != nil {
		t.Fatalf("building the test program: %v\n%s", err, out)
	}
	var discs []mdo.Discipline
	for _, d := range mdo.Sellar() {
		if d.Name() == "sellar_functions" {
			ext, err := external.New(external.Program{
				Name: d.Name(), Inputs: d.Inputs(), Outputs: d.Outputs(),
				Command:  []string{prog},
				Template: "x = @{x}\nz2 = @{z2}\ny1 = @{y1}\ny2 = @{y2}\n",
				WorkDir:  t.TempDir(),
			}, external.AllowAll())
			if err != nil {
				t.Fatal(err)
			}
			d = ext
		}
		discs = append(discs, d)
	}
	sys, err := mdo.NewSystem(discs...)
	if err != nil {
		t.Fatal(err)
	}
	ref, err := SellarMDF()
	if err != nil {
		t.Fatal(err)
	}
	st := *ref
	st.System, st.Workers = sys, 2
	res, err := NelderMead{}.Minimize(context.Background(), &st)
	if err != nil {
		t.Fatal(err)
	}
	checks := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"f", res.Objective(), SellarOptimum, 1e-3},
		{"z1", res.Get("z1"), 1.97764, 1e-2},
		{"z2", res.Get("z2"), 0, 1e-2},
		{"x", res.Get("x"), 0, 1e-2},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s = %.6g, want %.6g ± %g", c.name, c.got, c.want, c.tol)
		}
	}
	// The program reads its input with full precision and writes the
	// shortest exact form of its answers, so the run is the built-in one
	// bit for bit.
	builtin, err := NelderMead{}.Minimize(context.Background(), ref)
	if err != nil {
		t.Fatal(err)
	}
	for i, x := range res.Best.Design {
		if x != builtin.Best.Design[i] {
			t.Errorf("best design %v differs from the built-in discipline's %v", res.Best.Design, builtin.Best.Design)
			break
		}
	}
	if !res.Feasible() {
		t.Errorf("the best design is infeasible: %v", res)
	}
}
