package disciplines

import (
	"context"
	"strings"
	"testing"

	"couplet/mdo"
)

// fallbackSample is the small convergence benchmark's set (3 × 3 grids at
// two sweeps for each aircraft, 12 hypercube points per example study
// box) and seven points of the full benchmark's 11 × 11 grids that the
// fallback chain closed by Newton or by the continuation when they were
// chosen (business jet 132 and 143, three-engine jet 20, 31 and 176,
// supersonic airliner 141 and 185, with Anderson-accelerated Gauss–Seidel
// from the defaults).
func fallbackSample() []convCase {
	cases := convergenceCases(3, 12)
	full := convergenceCases(11, 0)
	for k, picks := range map[int][]int{0: {132, 143}, 2: {20, 31, 176}, 4: {141, 185}} {
		c := full[k]
		c.label += " (fallback points)"
		c.grid = [2]int{}
		pts := c.points
		c.points = nil
		for _, i := range picks {
			c.points = append(c.points, pts[i])
		}
		cases = append(cases, c)
	}
	return cases
}

// TestFallbackShortcutsOnTheAircraft evaluates fallbackSample's points
// through an Evaluator with the aircraft's solver and with Anderson
// acceleration from the defaults, each once as it is and once with the
// fallback chain's shortcuts off (mdo.SolverSettings.Exhaustive): every
// point gets the same answer bit for bit (failure and its text, path,
// objectives, constraints, outputs), and the shortcuts spend fewer
// discipline calls on the points that do not close. The sample must hold
// points that run the whole chain and fail, and points the chain closes.
func TestFallbackShortcutsOnTheAircraft(t *testing.T) {
	ctx := context.Background()
	anderson := mdo.DefaultSolver()
	anderson.Method = mdo.AndersonGaussSeidel
	for _, solver := range []mdo.SolverSettings{AircraftSolver(), anderson} {
		var calls [2]int
		paths := map[string]int{}
		for _, c := range fallbackSample() {
			var evs [2][]*mdo.Evaluation
			for k := range evs {
				sys, err := c.scen.NewSystem()
				if err != nil {
					t.Fatal(err)
				}
				set := solver
				set.Exhaustive = k == 1
				if err := sys.SetSolver(set); err != nil {
					t.Fatal(err)
				}
				fixed := copyMap(c.scen.Parameters)
				for n, v := range c.fixed {
					fixed[n] = v
				}
				st := &mdo.Study{Name: c.label, System: sys, Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")}, Fixed: fixed, CacheLimit: -1}
				for _, b := range c.box {
					st.Design = append(st.Design, mdo.Continuous(b.name, b.lower, b.hi))
				}
				ev, err := st.NewEvaluator()
				if err != nil {
					t.Fatal(err)
				}
				xs := make([][]float64, len(c.points))
				for i, p := range c.points {
					xs[i] = ev.ToUnit(p)
				}
				if evs[k], err = ev.Evaluate(ctx, xs); err != nil {
					t.Fatal(err)
				}
			}
			for i, a := range evs[0] {
				b := evs[1][i]
				if d := sameAnswer(a, b); d != "" && d != "work" {
					t.Errorf("%s point %d %v: %s differs with the shortcuts (%q, %q) and without (%q, %q)", c.label, i, c.points[i], d, a.Path, a.Err, b.Path, b.Err)
				}
				if !a.Converged {
					calls[0] += a.DisciplineCalls
					calls[1] += b.DisciplineCalls
					paths["failed: "+a.Failure.String()]++
				} else {
					paths[a.Path]++
				}
			}
		}
		rescued := 0
		for p, n := range paths {
			if len(p) > 9 && p[:9] == "fallback:" {
				rescued += n
			}
		}
		t.Logf("%s (from the reference: %v): %v; %d discipline calls on the points that fail with the shortcuts, %d without", solver.Method, solver.FromReference, paths, calls[0], calls[1])
		if calls[0] >= calls[1] {
			t.Errorf("%s: %d discipline calls on the failed points with the shortcuts, %d without", solver.Method, calls[0], calls[1])
		}
		if rescued == 0 || paths["failed: "+mdo.DoesNotClose.String()] == 0 {
			t.Errorf("%s: %v: the sample no longer holds both points the chain closes and points it does not", solver.Method, paths)
		}
	}
}

// TestFallbackCostOnTheBusinessJet analyses two points of the business
// jet's study box (business_jet.study, a GA's evaluations near its
// lower wing-area bound) that do not close, with the aircraft's solver
// and with the fallback chain's shortcuts off: both fail with the same
// error, which names the coupled group, the runaway variable and its
// value, and the chain costs the deterministic number of discipline
// calls below. A change that makes such a point cost more fails here;
// one that makes it cheaper on purpose writes its new count. (Before the
// continuation gave up at its third failed step they cost 13 946 and
// 9 243 calls; before Newton's stall limit asked for a halved residual,
// 7 280 and 5 947; before a branch check that settles on its short
// sweeps was confirmed by one sweep more, 6 034 and 5 084: three and
// two checks of five disciplines.)
func TestFallbackCostOnTheBusinessJet(t *testing.T) {
	ctx := context.Background()
	cases := []struct {
		point      []float64 // wing area, aspect ratio, sweep, thickness ratio
		variable   string    // the runaway variable the error names
		calls      int       // with the shortcuts
		exhaustive int       // without them
	}{
		{[]float64{100.18369611388609, 2.300545593614975, 61.570616626668624, 0.024065848726011647}, "mass.takeoff", 6049, 21480},
		{[]float64{100.00283677737232, 2.5147171303988274, 60.48614531247844, 0.024942405712682098}, "mission.fuel_fraction", 5094, 19389},
	}
	jet := Swiftlet()
	var calls [2][]int
	var errs [2][]string
	for k := range calls {
		sys, err := jet.NewSystem()
		if err != nil {
			t.Fatal(err)
		}
		set := AircraftSolver()
		set.Exhaustive = k == 1
		if err := sys.SetSolver(set); err != nil {
			t.Fatal(err)
		}
		st := &mdo.Study{Name: "business_jet_min_mass", System: sys, Objectives: []mdo.Objective{mdo.Minimize("mass.takeoff")}, Fixed: jet.Parameters, CacheLimit: -1,
			Design: []mdo.DesignVar{mdo.Continuous("wing.area", 100, 220), mdo.Continuous("wing.aspect_ratio", 1.8, 3.6), mdo.Continuous("wing.sweep", 52, 64), mdo.Continuous("wing.thickness_ratio", 0.024, 0.05)}}
		ev, err := st.NewEvaluator()
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range cases {
			evs, err := ev.Evaluate(ctx, [][]float64{ev.ToUnit(c.point)})
			if err != nil {
				t.Fatal(err)
			}
			calls[k] = append(calls[k], evs[0].DisciplineCalls)
			errs[k] = append(errs[k], evs[0].Err)
			if evs[0].Converged || evs[0].Failure != mdo.DoesNotClose {
				t.Errorf("%v (exhaustive %v): converged %v, failure %v (%s); want a point that does not close", c.point, k == 1, evs[0].Converged, evs[0].Failure, evs[0].Err)
			}
		}
	}
	for i, c := range cases {
		t.Logf("%v: %d discipline calls with the shortcuts, %d without", c.point, calls[0][i], calls[1][i])
		if errs[0][i] != errs[1][i] {
			t.Errorf("%v: %q with the shortcuts, %q without", c.point, errs[0][i], errs[1][i])
		}
		for _, want := range []string{"{aerodynamics, propulsion, mission, weights, stability}", c.variable + " = ", "weights"} {
			if !strings.Contains(errs[0][i], want) {
				t.Errorf("%v: the error %q does not name %q", c.point, errs[0][i], want)
			}
		}
		if calls[0][i] != c.calls || calls[1][i] != c.exhaustive {
			t.Errorf("%v: %d discipline calls with the shortcuts and %d without; want %d and %d", c.point, calls[0][i], calls[1][i], c.calls, c.exhaustive)
		}
	}
}
