package repl

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"couplet/mdo"
)

// runStudy replays a study file of ../studies headless and returns its
// summary.json as raw JSON with the timestamps removed.
func runStudy(t *testing.T, name string) (map[string]any, []byte) {
	t.Helper()
	out := t.TempDir()
	defer checkOutputs(t, out)
	var stdout, stderr bytes.Buffer
	if _, err := Run(context.Background(), RunOptions{File: filepath.Join("..", "studies", name), OutDir: out, Stdout: &stdout, Stderr: &stderr}); err != nil {
		t.Fatalf("%s: %v\n%s", name, err, stderr.String())
	}
	b, err := os.ReadFile(filepath.Join(out, "summary.json"))
	if err != nil {
		t.Fatal(err)
	}
	var sum map[string]any
	if err := json.Unmarshal(b, &sum); err != nil {
		t.Fatal(err)
	}
	delete(sum, "timestamps")
	stripped, err := json.Marshal(sum)
	if err != nil {
		t.Fatal(err)
	}
	return sum, stripped
}

// checkSellar checks the Sellar study's summary.
func checkSellar(t *testing.T, sum map[string]any) {
	best, ok := sum["best"].(map[string]any)
	if !ok {
		t.Fatalf("summary has no best point: %v", sum)
	}
	// Sellar, Batill & Renaud, AIAA 96-0714 (1996): f* = 3.18339 at
	// z = (1.97764, 0), x = 0, with g1 (y1 >= 3.16) active.
	if f := best["objective"].(float64); math.Abs(f-3.18339) > 1e-3 {
		t.Errorf("best.objective = %.6f, want 3.18339 ± 1e-3", f)
	}
	if best["feasible"] != true {
		t.Errorf("best point infeasible: %v", best)
	}
	if z1 := best["design"].(map[string]any)["z1"].(float64); math.Abs(z1-1.97764) > 1e-2 {
		t.Errorf("z1 = %.5f, want 1.97764 ± 0.01", z1)
	}
	if sum["study"] != "sellar" || sum["evaluations"].(float64) < 1 || sum["seed"].(float64) != 1 {
		t.Errorf("summary %v", sum)
	}
}

func TestSeedOverride(t *testing.T) {
	tests := []struct {
		seed    uint64
		seedSet bool
		want    uint64
	}{
		{0, false, 3}, // the script's own seed
		{99, true, 99},
		{0, true, 0},
	}
	for _, tc := range tests {
		out := t.TempDir()
		if _, err := Run(context.Background(), RunOptions{File: filepath.Join("testdata", "seeded_doe.study"), OutDir: out, Seed: tc.seed, SeedSet: tc.seedSet}); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(out, "summary.json"))
		if err != nil {
			t.Fatal(err)
		}
		var sum struct{ Seed uint64 }
		if err := json.Unmarshal(b, &sum); err != nil {
			t.Fatal(err)
		}
		if sum.Seed != tc.want {
			t.Errorf("seed override %d (set %v): summary seed %d, want %d", tc.seed, tc.seedSet, sum.Seed, tc.want)
		}
	}
}

// checkBestMeetsAll checks that the summary's best design is feasible
// and meets every constraint, and returns it.
func checkBestMeetsAll(t *testing.T, sum map[string]any) map[string]any {
	t.Helper()
	best := sum["best"].(map[string]any)
	if best["feasible"] != true {
		t.Errorf("no feasible design: %v", best)
	}
	// Every constraint is met at the best design.
	for name, v := range best["margins"].(map[string]any) {
		if v.(float64) < 0 {
			t.Errorf("constraint %s violated by %g", name, v)
		}
	}
	return best
}

// checkNoWorseThanBaseline checks that the baseline design of the study
// file name meets every constraint and that the summary's best design is
// feasible with an objective at most the baseline's.
func checkNoWorseThanBaseline(t *testing.T, sum map[string]any, name string) {
	t.Helper()
	best := sum["best"].(map[string]any)
	base := baselineOf(t, name)
	if !base.Converged {
		t.Fatalf("the baseline analysis failed: %s", base.Err)
	}
	for k, m := range base.Margins {
		if m < -1e-12 {
			t.Fatalf("the baseline design violates constraint %d by %g", k+1, -m)
		}
	}
	t.Logf("baseline objective %.1f, margins %v", base.Objectives[0], base.Margins)
	if best["feasible"] != true || best["objective"].(float64) > base.Objectives[0] {
		t.Errorf("best %v: want a feasible design with an objective at most the baseline's %.1f", best, base.Objectives[0])
	}
}

// exampleChecks are the checks of each example study beyond running.
var exampleChecks = map[string]func(t *testing.T, sum map[string]any){
	"sellar.study":       checkSellar,
	"business_jet.study": func(t *testing.T, sum map[string]any) { checkBestMeetsAll(t, sum) },
	"regional_jet.study": func(t *testing.T, sum map[string]any) {
		// The Kestrel R76 baseline wing (84 m², A = 9, 25°, t/c 0.12,
		// disciplines.Kestrel) meets every constraint of the study, the
		// second-segment climb gradient exactly (the engines are sized
		// for it, so its margin is zero up to rounding); the optimum must
		// burn no more fuel than it.
		checkNoWorseThanBaseline(t, sum, "regional_jet.study")
	},
	"business_jet_calibration.study": func(t *testing.T, sum map[string]any) {
		// The re-optimised study says its factors came from the
		// calibration and names the data file.
		notes, _ := sum["notes"].([]any)
		if len(notes) != 1 {
			t.Fatalf("notes %v, want the calibration's", notes)
		}
		note, _ := notes[0].(string)
		for _, w := range []string{`calibration "Swiftlet polars"`, "disciplines/swiftlet_polars_invented.csv", "aero.factor_lift_slope = "} {
			if !strings.Contains(note, w) {
				t.Errorf("note %q lacks %q", note, w)
			}
		}
		best := sum["best"].(map[string]any)
		if best["feasible"] != true {
			t.Errorf("no feasible design: %v", best)
		}
		// Sextant converged: the summary gives what each limit costs.
		if sum["stop"] != "converged" || sum["sensitivity"] == nil {
			t.Errorf("stop %v, sensitivity %v: want a converged run with its sensitivity", sum["stop"], sum["sensitivity"])
		}
	},
	"business_jet_wing_doe.study": func(t *testing.T, sum map[string]any) {
		// A Latin hypercube of 60 samples evaluates exactly 60 points.
		if n := sum["evaluations"].(float64); n != 60 {
			t.Errorf("evaluations %g, want the 60 samples", n)
		}
		if sum["stop"] != "complete" {
			t.Errorf("stop %v, want complete", sum["stop"])
		}
	},
	"business_jet_screening.study": func(t *testing.T, sum map[string]any) {
		// Morris: 12 trajectories of 8 + 1 points; the second screening
		// asks for the same points, which are repeats, not evaluations.
		if n := sum["evaluations"].(float64); n != 108 {
			t.Errorf("evaluations %g, want 12 trajectories of 9 points = 108", n)
		}
		if sum["stop"] != "complete" {
			t.Errorf("stop %v, want complete", sum["stop"])
		}
	},
	"forward_swept_business_jet.study": func(t *testing.T, sum map[string]any) {
		// The principal result is the differential evolution's: feasible,
		// every constraint met, the wing still swept forward and its
		// divergence beyond the dive speed + 15 % (14 CFR 25.629(b):
		// q_D/q_dive − 1 ≥ 1.15² − 1 = 0.3225).
		best := checkBestMeetsAll(t, sum)
		if q := best["constraints"].(map[string]any)["stability.divergence_margin"].(float64); q < 0.3225 {
			t.Errorf("divergence margin %g < 0.3225", q)
		}
		if sw := best["design"].(map[string]any)["wing.sweep"].(float64); !(sw < 0) {
			t.Errorf("wing sweep %g°: want a forward-swept optimum", sw)
		}
	},
	"long_range_transport.study": func(t *testing.T, sum map[string]any) {
		// The principal result is the GA's: feasible and burning no more
		// fuel than the Godwit L320 baseline wing, which meets every
		// constraint of the study.
		checkNoWorseThanBaseline(t, sum, "long_range_transport.study")
	},
	"supersonic_transport.study": func(t *testing.T, sum map[string]any) {
		// The principal result is the front of take-off mass against
		// cruise Mach number: at least 5 feasible points which, sorted by
		// mass, fly faster (a Pareto front of one minimised and one
		// maximised objective), spanning at least Mach 1.75–1.95.
		front, _ := sum["front"].([]any)
		if len(front) < 5 {
			t.Fatalf("front of %d points, want at least 5", len(front))
		}
		prevM, prevMach := math.Inf(-1), math.Inf(-1)
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, p := range front {
			pt := p.(map[string]any)
			if pt["feasible"] != true {
				t.Errorf("front point %v infeasible", pt["id"])
			}
			o := pt["objectives"].(map[string]any)
			m, mach := o["mass.takeoff"].(float64), o["cruise.mach"].(float64)
			if m < prevM || mach <= prevMach {
				t.Errorf("front point (%g kg, Mach %g) after (%g kg, Mach %g) is dominated or out of order", m, mach, prevM, prevMach)
			}
			prevM, prevMach = m, mach
			lo, hi = math.Min(lo, mach), math.Max(hi, mach)
		}
		if lo > 1.75 || hi < 1.95 {
			t.Errorf("front spans Mach %g–%g, want at least 1.75–1.95", lo, hi)
		}
	},
	"business_jet_front.study": func(t *testing.T, sum map[string]any) {
		front, _ := sum["front"].([]any)
		if len(front) < 5 {
			t.Fatalf("front of %d points, want at least 5", len(front))
		}
		// Sorted by take-off mass, a Pareto front of two minimised
		// objectives has a falling field length.
		prevM, prevL := math.Inf(-1), math.Inf(1)
		for _, p := range front {
			o := p.(map[string]any)["objectives"].(map[string]any)
			m, l := o["mass.takeoff"].(float64), o["perf.takeoff_field_length"].(float64)
			if m < prevM || l >= prevL {
				t.Errorf("front point (%g kg, %g m) after (%g kg, %g m) is dominated or out of order", m, l, prevM, prevL)
			}
			prevM, prevL = m, l
		}
	},
}

func TestEveryStudyRunsHeadless(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "studies", "*.study"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 5 {
		t.Fatalf("%d example studies, want at least 5", len(files))
	}
	for _, f := range files {
		name := filepath.Base(f)
		check, ok := exampleChecks[name]
		if !ok {
			t.Errorf("example study %s has no checks", name)
			continue
		}
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			sum, raw := runStudy(t, name)
			if sum["best"] == nil && sum["front"] == nil {
				t.Fatalf("%s handed over no result: %s", name, raw)
			}
			check(t, sum)
			if name == "sellar.study" {
				// A second run gives the same summary apart from its
				// timestamps.
				if _, again := runStudy(t, name); !bytes.Equal(raw, again) {
					t.Errorf("two runs differ:\n%s\n%s", raw, again)
				}
			}
		})
	}
}

// checkOutputs checks the files a run leaves beside summary.json.
func checkOutputs(t *testing.T, dir string) {
	t.Helper()
	dir = resultFolder(t, dir)
	for _, name := range []string{"results.db", "evaluations.csv", "report.html", "history.svg", "dsm.svg"} {
		if fi, err := os.Stat(filepath.Join(dir, name)); err != nil || fi.Size() == 0 {
			t.Errorf("run output %s missing or empty: %v", name, err)
		}
	}
}

// baselineOf evaluates the baseline design of the study the first cell of
// an example study attaches (its fixed values, see Evaluator.Start).
func baselineOf(t *testing.T, name string) *mdo.Evaluation {
	t.Helper()
	s := studySession(t, name, 1)
	c := s.Exec(context.Background(), `ev, err := study.NewEvaluator()
if err != nil {
	panic(err)
}
base, err := ev.EvaluateOne(cell.Context(), ev.Start())
if err != nil {
	panic(err)
}
base`)
	if c.Err != nil {
		t.Fatal(c.Err)
	}
	base, ok := c.Value.(*mdo.Evaluation)
	if !ok {
		t.Fatalf("the baseline cell showed %T, want *mdo.Evaluation", c.Value)
	}
	return base
}
