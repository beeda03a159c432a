package disciplines

import (
	"context"
	"math"
	"testing"

	"couplet/mdo"
)

// TestAircraftTotals: the total derivatives of the converged aircraft
// analysis (coupled chain rule over finite-difference partials of the
// disciplines) agree with central differences of the converged analysis
// itself within 1e-4 relative (the requirement), in direct and
// adjoint mode, for every scenario.
func TestAircraftTotals(t *testing.T) {
	of := []string{"mass.takeoff", "mass.fuel", "perf.takeoff_field_length", "perf.landing_field_length",
		"perf.climb_gradient_second_segment", "stability.static_margin_takeoff"}
	wrt := []string{"wing.area", "wing.aspect_ratio", "wing.sweep", "wing.thickness_ratio", "mission.payload", "cruise.mach"}
	scen := append(Scenarios(), SwiftletTrijet(), Condor())
	for _, sc := range scen {
		t.Run(sc.Name, func(t *testing.T) {
			sys, err := sc.NewSystem()
			if err != nil {
				t.Fatal(err)
			}
			set := mdo.DefaultSolver()
			set.Tolerance = 1e-13
			set.MaxIterations = 2000
			if err := sys.SetSolver(set); err != nil {
				t.Fatal(err)
			}
			analyse := func(p map[string]float64) *mdo.Workspace {
				w := sys.NewWorkspace()
				if err := sc.Apply(w); err != nil {
					t.Fatal(err)
				}
				for n, v := range p {
					if err := w.Set(n, v); err != nil {
						t.Fatal(err)
					}
				}
				if err := w.Analyze(context.Background()); err != nil {
					t.Fatal(err)
				}
				return w
			}
			w := analyse(nil)
			for _, mode := range []mdo.DerivativeMode{mdo.DirectMode, mdo.AdjointMode} {
				tot, err := w.Totals(of, wrt, mdo.TotalsOptions{Mode: mode})
				if err != nil {
					t.Fatal(err)
				}
				if mode == mdo.DirectMode {
					for j, n := range wrt {
						x := sc.Parameters[n]
						h := 1e-5 * math.Max(math.Abs(x), 1)
						a := analyse(map[string]float64{n: x + h})
						b := analyse(map[string]float64{n: x - h})
						for i, f := range of {
							want := (a.Get(f) - b.Get(f)) / (2 * h)
							got := tot.J.At(i, j)
							floor := 1e-3 * math.Max(math.Abs(w.Get(f)), 1e-3) / math.Max(math.Abs(x), 1)
							if rel := math.Abs(got-want) / math.Max(math.Abs(want), floor); rel > 1e-4 {
								t.Errorf("d%s/d%s = %.8g, central differences of the analysis %.8g (rel %.2g)", f, n, got, want, rel)
							}
						}
					}
					continue
				}
				// the adjoint agrees with the direct mode
				dir, _ := w.Totals(of, wrt, mdo.TotalsOptions{Mode: mdo.DirectMode})
				for i := range of {
					for j := range wrt {
						a, d := tot.J.At(i, j), dir.J.At(i, j)
						if math.Abs(a-d) > 1e-8*math.Max(math.Abs(d), 1e-6) {
							t.Errorf("adjoint d%s/d%s = %.12g, direct %.12g", of[i], wrt[j], a, d)
						}
					}
				}
			}
		})
	}
}
