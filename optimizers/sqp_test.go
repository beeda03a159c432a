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
