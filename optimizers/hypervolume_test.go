package optimizers

import (
	"context"
	"math"
	"testing"
)

func TestHypervolume2D(t *testing.T) {
	cases := []struct {
		name string
		pts  [][2]float64
		ref  [2]float64
		want float64
	}{
		// one point: the rectangle to the reference
		{"single", [][2]float64{{0.5, 0.5}}, [2]float64{1, 1}, 0.25},
		// staircase (0,1), (0.5,0.5), (1,0) with ref (1,1): only the middle
		// point lies strictly inside: 0.25 (hand computation)
		{"staircase on the boundary", [][2]float64{{0, 1}, {0.5, 0.5}, {1, 0}}, [2]float64{1, 1}, 0.25},
		// (0.2,0.6) and (0.6,0.2) to (1,1): 0.8·0.4 + 0.4·0.8 − 0.4·0.4 = 0.48
		{"two points", [][2]float64{{0.6, 0.2}, {0.2, 0.6}}, [2]float64{1, 1}, 0.48},
		// a dominated point adds nothing
		{"dominated", [][2]float64{{0.2, 0.6}, {0.6, 0.2}, {0.7, 0.7}}, [2]float64{1, 1}, 0.48},
		{"empty", nil, [2]float64{1, 1}, 0},
	}
	for _, c := range cases {
		if got := Hypervolume2D(c.pts, c.ref); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s: hypervolume %.15g, want %g", c.name, got, c.want)
		}
	}
	// The ZDT1 front f2 = 1 − √f1 has hypervolume ∫₀¹ √f1 df1 = 2/3 to
	// (1, 1) (Zitzler, Deb & Thiele, 2000). A staircase of n points on the
	// front under-estimates it by at most 1/n.
	const n = 10000
	pts := make([][2]float64, n+1)
	for i := range pts {
		f1 := float64(i) / n
		pts[i] = [2]float64{f1, 1 - math.Sqrt(f1)}
	}
	got := Hypervolume2D(pts, [2]float64{1, 1})
	if got > ZDT1Hypervolume || ZDT1Hypervolume-got > 1.0/n {
		t.Errorf("ZDT1 front staircase: hypervolume %.6f, want within 1/%d below 2/3", got, n)
	}
}

func TestNSGA2ZDT1Hypervolume(t *testing.T) {
	s, err := ZDT1(30)
	if err != nil {
		t.Fatal(err)
	}
	s.Seed = 1
	res, err := NSGA2{Evolution: Evolution{Population: 100, Generations: 200}}.Minimize(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	hv, err := FrontHypervolume(res, [2]float64{1, 1})
	if err != nil {
		t.Fatal(err)
	}
	// Zitzler, Deb & Thiele (2000): the true front has hypervolume 2/3; the
	// issue asks at least 0.65 from NSGA-II.
	if hv < 0.65 || hv > ZDT1Hypervolume {
		t.Errorf("ZDT1 hypervolume %.4f from %d front points, want in [0.65, 2/3]", hv, len(res.Front))
	}
	for _, p := range res.Front {
		if !p.Feasible {
			t.Fatalf("front point %d infeasible", p.ID)
		}
	}
}
