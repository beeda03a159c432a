package optimizers

import (
	"context"
	"fmt"
	"math"
	"sort"
	"testing"

	"couplet/mdo"
)

// evaluatedPoints runs a design on Rosenbrock(d) and returns the unit-box
// points of every evaluation, by recording them.
type pointRecorder struct{ xs [][]float64 }

func (p *pointRecorder) Begin(mdo.RunInfo) error { return nil }
func (p *pointRecorder) Record(e *mdo.Evaluation) error {
	p.xs = append(p.xs, append([]float64(nil), e.X...))
	return nil
}
func (p *pointRecorder) End(*mdo.Result) error { return nil }

func designPoints(t *testing.T, o Optimizer, d int) ([][]float64, *mdo.Result) {
	t.Helper()
	s, err := Rosenbrock(d)
	if err != nil {
		t.Fatal(err)
	}
	s.Seed = 11
	rec := &pointRecorder{}
	s.Recorder = rec
	res, err := o.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	return rec.xs, res
}

// A Latin hypercube puts exactly one point in each of the n strata of
// every variable (McKay, Beckman & Conover, 1979).
func TestLatinHypercubeStrata(t *testing.T) {
	const n = 40
	xs, res := designPoints(t, LatinHypercube{Samples: n, BatchSize: 7}, 3)
	if len(xs) != n || res.Evaluations != n || res.Stop != mdo.StopComplete {
		t.Fatalf("%d points, %d evaluations, stop %q; want %d, %d, complete", len(xs), res.Evaluations, res.Stop, n, n)
	}
	for k := 0; k < 3; k++ {
		seen := make([]bool, n)
		for _, x := range xs {
			s := int(math.Floor(x[k] * n))
			if s == n {
				s--
			}
			if seen[s] {
				t.Fatalf("variable %d: stratum %d holds two points", k, s)
			}
			seen[s] = true
		}
	}
}

// A Halton design's first coordinate, scrambled or not, is a van der
// Corput sequence in base 2: the first 2^m points put one point in each
// interval [j/2^m, (j+1)/2^m) (Halton, 1960; Owen, 2017).
func TestHaltonStratifiesBase2(t *testing.T) {
	const n = 64
	xs, _ := designPoints(t, Halton{Samples: n}, 2)
	if len(xs) != n {
		t.Fatalf("%d points, want %d", len(xs), n)
	}
	seen := make([]bool, n)
	for _, x := range xs {
		s := int(x[0] * n)
		if seen[s] {
			t.Fatalf("interval %d/%d holds two points", s, n)
		}
		seen[s] = true
	}
}

// A random design gives points in the box, with mean near 1/2.
func TestRandomDesign(t *testing.T) {
	xs, _ := designPoints(t, RandomDesign{Samples: 400}, 2)
	sum := 0.0
	for _, x := range xs {
		for _, u := range x {
			if u < 0 || u > 1 {
				t.Fatalf("point %v leaves the unit box", x)
			}
			sum += u
		}
	}
	// the mean of 800 uniform draws has standard deviation 0.0102; 5σ
	if m := sum / 800; math.Abs(m-0.5) > 0.051 {
		t.Errorf("mean coordinate %.4f, want 0.5 ± 0.051", m)
	}
}

// A full factorial evaluates every combination of levels, bounds included.
func TestFullFactorial(t *testing.T) {
	xs, res := designPoints(t, FullFactorial{Levels: 3, VariableLevels: map[string]int{"x2": 5}}, 2)
	if len(xs) != 15 || res.Stop != mdo.StopComplete {
		t.Fatalf("%d points, want 3 × 5 = 15", len(xs))
	}
	var key []string
	for _, x := range xs {
		key = append(key, fmtPoint(x))
	}
	sort.Strings(key)
	want := []string{}
	for _, a := range []float64{0, 0.5, 1} {
		for _, b := range []float64{0, 0.25, 0.5, 0.75, 1} {
			want = append(want, fmtPoint([]float64{a, b}))
		}
	}
	sort.Strings(want)
	for i := range want {
		if key[i] != want[i] {
			t.Fatalf("points %v, want %v", key, want)
		}
	}
	if res.Best == nil || !res.Feasible() {
		t.Fatal("no feasible best point")
	}
}

func fmtPoint(x []float64) string { return fmt.Sprintf("%.4f", x) }

// A design over two objectives returns the front of its feasible
// non-dominated points.
func TestDesignFront(t *testing.T) {
	s, err := ZDT1(2)
	if err != nil {
		t.Fatal(err)
	}
	res, err := FullFactorial{Levels: 11}.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	// with x2 = 0 (g = 1) the 11 points (x1, 1 − √x1) are mutually
	// non-dominated and dominate every point with x2 > 0.
	if len(res.Front) != 11 {
		t.Fatalf("front of %d points, want 11", len(res.Front))
	}
	for _, p := range res.Front {
		if p.Design[1] != 0 || math.Abs(p.Objectives[1]-(1-math.Sqrt(p.Objectives[0]))) > 1e-12 {
			t.Errorf("front point %v, %v is not on f2 = 1 − √f1", p.Design, p.Objectives)
		}
	}
}
