package optimizers

import (
	"context"
	"flag"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"couplet/mdo"
)

// reachedAt returns the number of evaluations after which the best point
// first was feasible and within tol of want (relative to |want| when rel),
// from the best-so-far history; −1 when never.
func reachedAt(r *mdo.Result, want, tol float64, rel bool) int {
	if rel {
		tol *= math.Abs(want)
	}
	for _, h := range r.History {
		if h.Feasible && math.Abs(h.Best-want) <= tol {
			return h.Evaluations
		}
	}
	return -1
}

// countRun is one row of the evaluation-count table.
type countRun struct {
	problem string
	study   func() (*mdo.Study, error)
	want    float64
	tol     float64
	rel     bool
	opt     Optimizer
	// required: the issue asks this method to reach this optimum.
	required bool
}

func countRuns() []countRun {
	// Sellar: f* = 3.18339 (Sellar, Batill & Renaud, 1996), reached when
	// within 1e-3; g06: f* = −6961.81388 (Liang et al., 2006), within 0.1 %.
	var runs []countRun
	for _, p := range []struct {
		name  string
		study func() (*mdo.Study, error)
		want  float64
		tol   float64
		rel   bool
	}{
		{"Sellar MDF", SellarMDF, SellarOptimum, 1e-3, false},
		{"Sellar IDF", SellarIDF, SellarOptimum, 1e-3, false},
		{"g06", G06, G06Optimum, 1e-3, true},
	} {
		sellar := strings.HasPrefix(p.name, "Sellar")
		runs = append(runs,
			countRun{p.name, p.study, p.want, p.tol, p.rel, NelderMead{MaxEvaluations: 20000}, sellar},
			countRun{p.name, p.study, p.want, p.tol, p.rel, CMAES{MaxEvaluations: 200000}, sellar},
			countRun{p.name, p.study, p.want, p.tol, p.rel, GA{}, false},
			countRun{p.name, p.study, p.want, p.tol, p.rel, DifferentialEvolution{}, false},
			countRun{p.name, p.study, p.want, p.tol, p.rel, ParticleSwarm{}, false},
			countRun{p.name, p.study, p.want, p.tol, p.rel, ParticleSwarm{Evolution: Evolution{Generations: 400}, Repair: Reflect}, false},
			countRun{p.name, p.study, p.want, p.tol, p.rel, Sextant{}, true},
		)
	}
	// the gradient-based method alone on the smooth problems it is asked
	// to solve: g07, g09 (Liang et al., 2006) and the welded beam (Deb,
	// 2000), reached when within 1e-6 relative
	runs = append(runs,
		countRun{"g07", G07, G07Optimum, 1e-6, true, Sextant{}, true},
		countRun{"g09", G09, G09Optimum, 1e-6, true, Sextant{}, true},
		countRun{"welded beam", WeldedBeam, WeldedBeamOptimum, 1e-6, true, Sextant{}, true},
	)
	// the evolutionary methods at their defaults on the welded beam (Deb,
	// 2000; Coello, 2000) and the pressure vessel with thicknesses in
	// sixteenths (Sandgren, 1990; Kannan & Kramer, 1994; f* as tabulated by
	// Coello, 2000), reached when within 1 % (the issue asks it of the GA
	// and the particle swarm)
	for _, p := range []struct {
		name  string
		study func() (*mdo.Study, error)
		want  float64
	}{{"welded beam", WeldedBeam, WeldedBeamOptimum}, {"pressure vessel", PressureVessel, PressureVesselOptimum}} {
		runs = append(runs,
			countRun{p.name, p.study, p.want, 1e-2, true, GA{}, true},
			countRun{p.name, p.study, p.want, 1e-2, true, DifferentialEvolution{}, true},
			countRun{p.name, p.study, p.want, 1e-2, true, ParticleSwarm{}, true},
		)
	}
	return runs
}

// TestEvaluationCounts measures, per optimiser and problem, the number of
// evaluations after which the best point reached the published optimum
// (seed 1; default settings, but a larger evaluation budget for
// Nelder–Mead and CMA-ES; each run is stopped at the end of the iteration
// that reached it). The evolutionary methods' defaults fix their budget
// (generations × population) and, under IDF, the length of the ε
// schedule. The counts are deterministic: the test fails when they differ
// from the table kept in EVALUATIONS.md, which -update rewrites.
func TestEvaluationCounts(t *testing.T) {
	if testing.Short() {
		t.Skip("long: runs every optimiser to a large budget")
	}
	var b strings.Builder
	fmt.Fprintf(&b, "| problem | optimiser | evaluations to reach f* | best f | evaluations run | stop |\n|---|---|---|---|---|---|\n")
	for _, c := range countRuns() {
		s, err := c.study()
		if err != nil {
			t.Fatal(err)
		}
		s.Seed = 1
		// stop the run at the first iteration that reaches the optimum
		ctx, cancel := context.WithCancel(context.Background())
		tol := c.tol
		if c.rel {
			tol *= math.Abs(c.want)
		}
		s.Progress = func(p mdo.Progress) {
			if p.Feasible && math.Abs(p.Best-c.want) <= tol {
				cancel()
			}
		}
		res, err := c.opt.Minimize(ctx, s)
		cancel()
		if err != nil {
			t.Fatal(err)
		}
		n := reachedAt(res, c.want, c.tol, c.rel)
		name := c.opt.Name()
		if p, ok := c.opt.(ParticleSwarm); ok && p.Repair == Reflect {
			name += fmt.Sprintf(" (reflect, %d generations)", p.Generations)
		}
		at := "not reached"
		if n >= 0 {
			at = fmt.Sprint(n)
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %.8g | %d | %s |\n", c.problem, name, at, res.Objective(), res.Evaluations, res.Stop)
		if c.required && n < 0 {
			t.Errorf("%s on %s did not reach %.8g ± %g (best %.8g)", name, c.problem, c.want, c.tol, res.Objective())
		}
	}
	got := b.String()
	path := "EVALUATIONS.md"
	doc, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	before, table, after, err := splitTable(string(doc))
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if *update {
		if err := os.WriteFile(path, []byte(before+got+after), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	if table != got {
		t.Errorf("the counts differ from %s (run go test -run TestEvaluationCounts ./optimizers -update to rewrite its table, and check its remarks):\n%s", path, got)
	}
}

// update rewrites the table of EVALUATIONS.md from TestEvaluationCounts.
var update = flag.Bool("update", false, "rewrite the table of EVALUATIONS.md with the counts measured")

// splitTable splits a Markdown text around its one table: the text before
// it, the table's lines and the text after.
func splitTable(doc string) (before, table, after string, err error) {
	start := strings.Index(doc, "\n|")
	if start < 0 {
		return "", "", "", fmt.Errorf("no table")
	}
	start++
	end := start
	for end < len(doc) && doc[end] == '|' {
		nl := strings.IndexByte(doc[end:], '\n')
		if nl < 0 {
			end = len(doc)
			break
		}
		end += nl + 1
	}
	if strings.Contains(doc[end:], "\n|") {
		return "", "", "", fmt.Errorf("more than one table")
	}
	return doc[:start], doc[start:end], doc[end:], nil
}
