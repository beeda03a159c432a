package optimizers

import (
	"context"
	"math"
	"strings"
	"testing"

	"couplet/mdo"
)

// sellarExact is the Sellar optimum to full precision: at x = z2 = 0 the
// constraint y1 = 3.16 is active, so z1² = 3.16 + 0.2·y2 with
// y2 = √3.16 + z1, and f = 3.16 + exp(−y2) (Sellar, Batill & Renaud,
// 1996, publish 3.18339).
func sellarExact() float64 {
	z1 := 2.0
	for k := 0; k < 60; k++ { // Newton on z1² − 0.2 z1 − 3.16 − 0.2√3.16 = 0
		z1 -= (z1*z1 - 0.2*z1 - 3.16 - 0.2*math.Sqrt(3.16)) / (2*z1 - 0.2)
	}
	return 3.16 + math.Exp(-(math.Sqrt(3.16) + z1))
}

// TestSextantReachesPublishedOptima: the done-when: Sellar MDF and
// IDF within 1e-6 in at most 30 coupled analyses, g07 and g09 within 1e-6
// relative, the welded beam within 1e-5 relative, each run ending on the
// convergence test.
func TestSextantReachesPublishedOptima(t *testing.T) {
	if math.Abs(sellarExact()-SellarOptimum) > 5e-6 {
		t.Fatalf("exact Sellar optimum %.9g does not round to the published %g", sellarExact(), SellarOptimum)
	}
	tests := []struct {
		name     string
		study    func() (*mdo.Study, error)
		want     float64
		rel      float64
		maxEvals int
	}{
		{"Sellar MDF", SellarMDF, sellarExact(), 1e-6, 30},
		{"Sellar IDF", SellarIDF, sellarExact(), 1e-6, 30},
		{"g06", G06, G06Optimum, 1e-6, 0},
		{"g07", G07, G07Optimum, 1e-6, 0},
		{"g09", G09, G09Optimum, 1e-6, 0},
		{"welded beam", WeldedBeam, WeldedBeamOptimum, 1e-5, 0},
	}
	for _, tc := range tests {
		s, err := tc.study()
		if err != nil {
			t.Fatal(err)
		}
		res, rep, err := Sextant{}.Explore(context.Background(), s)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if !res.Feasible() || math.Abs(res.Objective()-tc.want) > tc.rel*math.Abs(tc.want) {
			t.Errorf("%s: f = %.10g (feasible %v), want %.10g within %g relative", tc.name, res.Objective(), res.Feasible(), tc.want, tc.rel)
		}
		if res.Stop != mdo.StopConverged || !rep.Optima[0].Converged {
			t.Errorf("%s: stopped %v, optimality %.3g, violation %.3g", tc.name, res.Stop, rep.Optima[0].Optimality, rep.Optima[0].Violation)
		}
		if tc.maxEvals > 0 && res.Analyses > tc.maxEvals {
			t.Errorf("%s: %d coupled analyses, want at most %d", tc.name, res.Analyses, tc.maxEvals)
		}
	}
}

// TestSextantWorkersAndCancel: bit-identical for any worker count; a
// cancel returns the best point so far.
func TestSextantWorkersAndCancel(t *testing.T) {
	var first *mdo.Result
	for _, w := range []int{1, 2, 3} {
		s, _ := G07()
		s.Workers = w
		res, err := Sextant{}.Minimize(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = res
			continue
		}
		if res.Objective() != first.Objective() || res.Evaluations != first.Evaluations || res.Repeats != first.Repeats {
			t.Errorf("workers %d: f %.17g after %d evaluations, workers 1: %.17g after %d", w, res.Objective(), res.Evaluations, first.Objective(), first.Evaluations)
		}
		for j := range res.Best.X {
			if res.Best.X[j] != first.Best.X[j] {
				t.Errorf("workers %d: x%d differs", w, j+1)
			}
		}
	}
	s, _ := G07()
	ctx, cancel := context.WithCancel(context.Background())
	iters := 0
	s.Progress = func(p mdo.Progress) {
		iters++
		if iters == 3 {
			cancel()
		}
	}
	res, err := Sextant{}.Minimize(ctx, s)
	if err != nil {
		t.Fatal(err)
	}
	if res.Stop != mdo.StopCancelled || res.Best == nil || res.Evaluations >= first.Evaluations {
		t.Errorf("cancelled run: stop %v, best %v, %d evaluations (full run %d)", res.Stop, res.Best != nil, res.Evaluations, first.Evaluations)
	}
}

// TestSextantMultiStart: the starts are deterministic, the best is the
// global Sellar optimum, and the local optimum near z1 = −1.72 (f ≈ 4.13,
// see mdo.Sellar) counts as a second distinct optimum when a start finds
// it.
func TestSextantMultiStart(t *testing.T) {
	run := func() (*mdo.Result, *StartsReport) {
		s, _ := SellarMDF()
		s.Seed = 3
		res, rep, err := Sextant{Starts: 8}.Explore(context.Background(), s)
		if err != nil {
			t.Fatal(err)
		}
		return res, rep
	}
	res, rep := run()
	if len(rep.Optima) != 8 {
		t.Fatalf("%d optima reported for 8 starts", len(rep.Optima))
	}
	if math.Abs(res.Objective()-sellarExact()) > 1e-6*sellarExact() {
		t.Errorf("best of 8 starts f = %.9g, want %.9g", res.Objective(), sellarExact())
	}
	local := false
	for _, o := range rep.Optima {
		local = local || (o.Converged && o.Feasible && math.Abs(o.Objective-sellarExact()) > 0.1)
	}
	want := 1
	if local {
		want = 2
	}
	if rep.Distinct != want {
		t.Errorf("%d distinct optima, want %d: %+v", rep.Distinct, want, rep.Optima)
	}
	res2, rep2 := run()
	if res2.Objective() != res.Objective() || rep2.Distinct != rep.Distinct || res2.Evaluations != res.Evaluations {
		t.Error("two multi-start runs differ")
	}
}

// TestSextantSettings: bad settings are refused by name.
func TestSextantSettings(t *testing.T) {
	s, _ := SellarMDF()
	for _, o := range []Sextant{{MaxIterations: -1}, {OptimalityTolerance: 2}, {Starts: -3}} {
		if _, err := o.Minimize(context.Background(), s); err == nil || !strings.Contains(err.Error(), "Sextant") {
			t.Errorf("%+v: %v", o, err)
		}
	}
}

// TestSextantFlatAndDuplicateRows: a constraint that does not vary with
// the design (a scripted constant) and a constraint declared twice give
// the subproblem a row of zero gradient or two identical rows, on which
// its interior-point solver broke down: the run stalled at iteration 1
// ("the iterate became non-finite") and a violated constant spent the
// whole budget of 2000 evaluations. Now a satisfied constant is left out,
// a violated one ends the start infeasible with the constraint, its value
// and its limit, and of parallel rows the tighter is kept.
//
// The problem is Example 12.3 of Nocedal & Wright, Numerical
// Optimization, 2nd ed. (from memory): minimise x1 + x2 subject to
// x1² + x2² ≤ b. By the KKT conditions (ibid., Theorem 12.1), ∇f = −λ∇c
// at x1 = x2 = −√(b/2): 1 = 2λ√(b/2), so f* = −√(2b) and
// λ* = 1/√(2b) = −d f*/d b: f* = −2, λ* = 0.5 at b = 2; f* = −√3,
// λ* = 1/√3 at b = 1.5.
func TestSextantFlatAndDuplicateRows(t *testing.T) {
	study := func(extra ...mdo.Constraint) *mdo.Study {
		s, _, err := funcStudy("flat", []float64{-2, -2}, []float64{2, 2}, []string{"f", "c", "c_twin", "k"},
			func(in, out []float64) error {
				x1, x2 := in[0], in[1]
				out[0] = x1 + x2
				out[1] = x1*x1 + x2*x2
				out[2] = x1*x1 + x2*x2 // the same expression: the same row
				out[3] = 1             // a constant
				return nil
			})
		if err != nil {
			t.Fatal(err)
		}
		s.Objectives = []mdo.Objective{mdo.Minimize("f")}
		s.Constraints = append([]mdo.Constraint{mdo.AtMost("c", 2)}, extra...)
		return s
	}
	sqrt3 := math.Sqrt(3)
	tests := []struct {
		name  string
		study *mdo.Study
		// the optimum; infeasible: no feasible point, the detail names
		// these words
		f          float64
		infeasible []string
		// d f*/d limit of each active limit that has one, part of the
		// reason of each active one whose multiplier is not defined
		// (sqp_sensitivity.go); in neither: inactive
		perUnit    map[string]float64
		notDefined map[string]string
	}{
		// a constant at its limit binds (tightened, the limit cannot be
		// met), but its multiplier is no derivative
		{name: "a constant at its upper limit", study: study(mdo.AtMost("k", 1)), f: -2,
			perUnit: map[string]float64{"c": -0.5}, notDefined: map[string]string{"k": "does not vary with the design"}},
		{name: "a constant at its lower limit", study: study(mdo.AtLeast("k", 1)), f: -2,
			perUnit: map[string]float64{"c": -0.5}, notDefined: map[string]string{"k": "does not vary with the design"}},
		{name: "a constant at its target", study: study(mdo.EqualTo("k", 1, 1e-6)), f: -2,
			perUnit: map[string]float64{"c": -0.5}, notDefined: map[string]string{"k": "does not vary with the design"}},
		{name: "a constant within its limit", study: study(mdo.AtMost("k", 1.5)), f: -2,
			perUnit: map[string]float64{"c": -0.5}},
		{name: "a constant above its upper limit", study: study(mdo.AtMost("k", 0.5)),
			infeasible: []string{`constraint "k" is 1, above its upper limit 0.5`, "does not vary with the design"}},
		{name: "a constant off its target", study: study(mdo.EqualTo("k", 2, 1e-6)),
			infeasible: []string{`constraint "k" is 1, off its target 2`, "does not vary with the design"}},
		// two limits with one gradient: the multipliers are not unique
		// (sqp_sensitivity.go), the two share λ*
		{name: "the same constraint twice", study: study(mdo.AtMost("c_twin", 2)), f: -2,
			notDefined: map[string]string{"c": "not unique", "c_twin": "not unique"}},
		{name: "the same constraint twice, the second looser", study: study(mdo.AtMost("c_twin", 3)), f: -2,
			perUnit: map[string]float64{"c": -0.5}},
		{name: "the same constraint twice, the second tighter", study: study(mdo.AtMost("c_twin", 1.5)), f: -sqrt3,
			perUnit: map[string]float64{"c_twin": -1 / sqrt3}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			res, rep, err := Sextant{}.Explore(context.Background(), tc.study)
			if err != nil {
				t.Fatal(err)
			}
			if tc.infeasible != nil {
				if res.Feasible() {
					t.Fatalf("feasible at f = %g", res.Objective())
				}
				for _, w := range tc.infeasible {
					if !strings.Contains(res.StopDetail, w) {
						t.Errorf("the stop detail does not say %q:\n%s", w, res.StopDetail)
					}
				}
				// each start ends at its first point: the start and the
				// 8 restarts (Sextant.Restarts' default) one analysis each
				if res.Evaluations != 9 {
					t.Errorf("%d evaluations, want 9 (one per start)", res.Evaluations)
				}
				return
			}
			if !res.Feasible() || res.Stop != mdo.StopConverged || rep.Sensitivity == nil {
				t.Fatalf("no converged feasible optimum (f = %g, stop %v: %s)", res.Objective(), res.Stop, res.StopDetail)
			}
			if f := res.Objective(); math.Abs(f-tc.f) > 1e-6 {
				t.Errorf("f* = %.9g, want %.9g", f, tc.f)
			}
			for _, l := range rep.Sensitivity.Limits {
				want, defined := tc.perUnit[l.Constraint]
				why, undefined := tc.notDefined[l.Constraint]
				switch {
				case undefined && (!l.Active || !math.IsNaN(l.PerUnit) || !strings.Contains(l.NotDefined, why)):
					t.Errorf("%s: %+v, want active, not defined: %q", l.Constraint, l, why)
				case defined && (!l.Active || l.NotDefined != "" || math.Abs(l.PerUnit-want) > 1e-5):
					t.Errorf("%s: d f*/d limit %g (%+v), want %g", l.Constraint, l.PerUnit, l, want)
				case !defined && !undefined && (l.Active || l.PerUnit != 0 || l.NotDefined != ""):
					t.Errorf("%s: %+v, want inactive", l.Constraint, l)
				}
			}
			// the multipliers of the two copies of the circle add up to
			// that of the circle alone: λ* in the scaled units of the
			// subproblem, λ* × Scale / max(|f(start)|, 1) with f(start) = 0
			var sum float64
			for i, c := range tc.study.Constraints {
				if c.Name == "c" || c.Name == "c_twin" {
					sum += rep.Optima[0].Multipliers[i] / c.EffectiveScale()
				}
			}
			if want := -1 / tc.f; math.Abs(sum-want) > 1e-6 {
				t.Errorf("the circle's multipliers over their scales add to %.9g, want λ* = −1/f* = %.9g", sum, want)
			}
		})
	}
}
