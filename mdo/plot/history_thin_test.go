package plot

import (
	"math"
	"math/rand/v2"
	"testing"

	"couplet/mdo"
	"gonum.org/v1/plot/plotter"
)

// tenThousand makes 10 000 evaluations of a run that converges: the
// objective falls from 30 000 towards 20 000 with scatter, a third
// infeasible.
func tenThousand() (*mdo.Result, []*mdo.Evaluation) {
	r := rand.New(rand.NewPCG(3, 4))
	evs := make([]*mdo.Evaluation, 10000)
	for i := range evs {
		f := 20000 + 10000*math.Exp(-float64(i)/1500) + 3000*r.Float64()*r.Float64()
		feasible := r.IntN(3) != 0
		v := 0.0
		if !feasible {
			v = r.Float64()
		}
		evs[i] = &mdo.Evaluation{ID: i, Objectives: []float64{f}, F: []float64{f}, Feasible: feasible, Violation: v, Converged: true}
	}
	return &mdo.Result{Study: "thin", Optimizer: "GA", Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")}}, evs
}

// Every marker mergeClose drops lies within one cell of a kept marker of
// its own set, and markers far apart are all kept.
func TestDistinctDropsOnlyIndistinguishableMarkers(t *testing.T) {
	_, evs := tenThousand()
	var a, b plotter.XYs
	for i, e := range evs {
		p := plotter.XY{X: float64(i + 1), Y: e.Objectives[0]}
		if e.Feasible {
			a = append(a, p)
		} else {
			b = append(b, p)
		}
	}
	ka, kb := mergeClose(a, b)
	if len(ka) >= len(a) || len(kb) >= len(b) || len(ka) == 0 || len(kb) == 0 {
		t.Fatalf("kept %d of %d and %d of %d markers", len(ka), len(a), len(kb), len(b))
	}
	y0, y1 := math.Inf(1), math.Inf(-1)
	for _, p := range append(append(plotter.XYs(nil), a...), b...) {
		y0, y1 = math.Min(y0, p.Y), math.Max(y1, p.Y)
	}
	dx, dy := float64(len(evs)-1)/(float64(historyWidth)/markerCell), (y1-y0)/(float64(historyHeight)/markerCell)
	for _, c := range []struct{ all, kept plotter.XYs }{{a, ka}, {b, kb}} {
		for _, p := range c.all {
			near := false
			for _, q := range c.kept {
				if math.Abs(p.X-q.X) <= dx && math.Abs(p.Y-q.Y) <= dy {
					near = true
					break
				}
			}
			if !near {
				t.Fatalf("marker %v dropped with no kept marker within a cell (%.3g × %.3g)", p, dx, dy)
			}
		}
	}
	// spread-out points (one per 4 cells) are all kept
	var spread plotter.XYs
	for i := 0; i < 50; i++ {
		spread = append(spread, plotter.XY{X: float64(4 * i), Y: float64(4 * i)})
	}
	if k, _ := mergeClose(spread, nil); len(k) != len(spread) {
		t.Errorf("kept %d of %d markers far apart", len(k), len(spread))
	}
}

// BenchmarkHistory10k draws the history of 10 000 evaluations and reports
// the SVG's size.
func BenchmarkHistory10k(b *testing.B) {
	r, evs := tenThousand()
	b.ReportAllocs()
	var n int
	for b.Loop() {
		f, err := History(r, evs)
		if err != nil {
			b.Fatal(err)
		}
		svg, err := f.SVG()
		if err != nil {
			b.Fatal(err)
		}
		n = len(svg)
	}
	b.ReportMetric(float64(n)/1024, "KiB-svg")
}
