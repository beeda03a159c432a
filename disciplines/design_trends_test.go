package disciplines

import (
	"context"
	"math"
	"testing"
)

// lineOutputs analyses the scenario (with fixed overrides) at each value
// of one design variable through an Evaluator, as a study would, and
// returns the named outputs of every point (failing the test on a point
// that does not converge).
func lineOutputs(t *testing.T, sc Scenario, fixed map[string]float64, name string, xs []float64, outs ...string) [][]float64 {
	t.Helper()
	lo, hi := xs[0], xs[0]
	for _, x := range xs {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	ev, idx, err := sweepEvaluator(sweepCase{label: name, scen: sc, fixed: fixed, box: []convBox{{name, lo, hi}}}, 1)
	if err != nil {
		t.Fatal(err)
	}
	us := make([][]float64, len(xs))
	for i, x := range xs {
		us[i] = ev.ToUnit([]float64{x})
	}
	evs, err := ev.Evaluate(context.Background(), us)
	if err != nil {
		t.Fatal(err)
	}
	res := make([][]float64, len(xs))
	for i, e := range evs {
		if !e.Converged {
			t.Fatalf("%s %s = %g: %s", sc.Name, name, xs[i], e.Err)
		}
		res[i] = make([]float64, len(outs))
		for k, o := range outs {
			res[i][k] = e.Outputs[idx[o]]
		}
	}
	return res
}

// The trends a designer expects, one variable changed with the rest
// fixed, where the physics gives the direction (common practice, no
// source, unless named): each output strictly monotonic in the variable.
func TestDesignTrends(t *testing.T) {
	kestrelFwd := with(Kestrel(), "forward-swept transport", map[string]float64{"wing.position": 0.42, "htail.volume": 1.0})
	cases := []struct {
		scen  Scenario
		fixed map[string]float64
		name  string
		xs    []float64
		out   string
		sign  float64 // +1 increasing, −1 decreasing
	}{
		// more wing area, more wing mass (every statistical wing-mass equation)
		{Kestrel(), nil, "wing.area", []float64{60, 80, 100, 120}, "mass.wing", 1},
		{Swiftlet(), nil, "wing.area", []float64{100, 115, 130, 145}, "mass.wing", 1},
		// a larger span at equal area, a heavier wing and less drag due to lift
		{Kestrel(), nil, "wing.aspect_ratio", []float64{7, 9, 11, 13}, "mass.wing", 1},
		{Kestrel(), nil, "wing.aspect_ratio", []float64{7, 9, 11, 13}, "aero.k_cruise", -1},
		// thicker sections at supersonic cruise: more volume wave drag (Ackeret, (t/c)²/β)
		{Swiftlet(), nil, "wing.thickness_ratio", []float64{0.02, 0.03, 0.04, 0.05, 0.06}, "aero.wave_drag_cruise", 1},
		{Condor(), nil, "wing.thickness_ratio", []float64{0.025, 0.035, 0.045}, "aero.wave_drag_cruise", 1},
		// farther, heavier: more fuel and a heavier aircraft (Breguet)
		{Kestrel(), nil, "mission.range", []float64{1e6, 2e6, 3e6, 4e6}, "mass.fuel", 1},
		{Swiftlet(), nil, "mission.range", []float64{4e6, 5e6, 6e6, 7e6}, "mass.takeoff", 1},
		{Kestrel(), nil, "mission.payload", []float64{3000, 6000, 9000}, "mass.takeoff", 1},
		// more landing lift, a shorter landing field
		{Kestrel(), nil, "flap.cl_increment_landing", []float64{0.8, 1.2, 1.6, 2.0}, "perf.landing_field_length", -1},
		// hot or high: thinner air, a longer landing field
		{Kestrel(), nil, "airport.elevation", []float64{0, 1000, 2000}, "perf.landing_field_length", 1},
		{Kestrel(), nil, "airport.temperature_offset", []float64{-20, 0, 20, 40}, "perf.landing_field_length", 1},
		// a larger tail moves the neutral point aft: more static margin
		{Kestrel(), nil, "htail.volume", []float64{0.5, 0.7, 0.9, 1.1}, "stability.static_margin_takeoff", 1},
		// engines further aft move the c.g. aft: less static margin
		{Kestrel(), nil, "cg.engine_position", []float64{0.3, 0.45, 0.6}, "stability.static_margin_takeoff", -1},
		// more forward sweep, a lower divergence dynamic pressure (bending–torsion coupling)
		{kestrelFwd, nil, "wing.sweep", []float64{-35, -25, -15, -5}, "stability.divergence_dynamic_pressure", 1},
		{SwiftletForwardSwept(), nil, "wing.sweep", []float64{-55, -45, -35}, "stability.divergence_dynamic_pressure", 1},
	}
	for _, c := range cases {
		res := lineOutputs(t, c.scen, c.fixed, c.name, c.xs, c.out)
		for i := 1; i < len(res); i++ {
			if d := c.sign * (res[i][0] - res[i-1][0]); !(d > 0) {
				t.Errorf("%s: %s from %g to %g: %s from %.6g to %.6g, want it to %s", c.scen.Name, c.name, c.xs[i-1], c.xs[i],
					c.out, res[i-1][0], res[i][0], map[float64]string{1: "grow", -1: "fall"}[c.sign])
			}
		}
	}
}

// Forward sweep gives a lower divergence dynamic pressure than the same
// aft sweep, which with the usual stiffness ratios removes divergence
// altogether (structural dynamics and aeroelasticity textbooks, from
// memory; project reference "Aeroelasticity").
func TestForwardSweepDivergesFirst(t *testing.T) {
	sc := with(Kestrel(), "sweep pair", map[string]float64{"wing.position": 0.38})
	for _, l := range []float64{10, 20, 30} {
		q := lineOutputs(t, sc, nil, "wing.sweep", []float64{-l, l}, "stability.divergence_dynamic_pressure")
		if !(q[0][0] < q[1][0]) {
			t.Errorf("|Λ| = %g°: divergence q %g forward, %g aft", l, q[0][0], q[1][0])
		}
	}
}

// The coupled aircraft is continuous in cruise Mach number across M = 1
// (the transonic blend of the drag, lift slope and aerodynamic centre,
// the climb fraction's two branches meeting at 0.974): between Mach
// 1 − 1e-8 and 1 + 1e-8 no output of the list moves by more than 0.1 %.
// (The supersonic wave drag leaves M = 1 with the √(M² − 1) of linear
// theory: continuous, with a steep slope just above M = 1, so steps of
// finite size straddling M = 1 are larger than their neighbours.)
func TestAircraftContinuousAcrossMachOne(t *testing.T) {
	outs := []string{"mass.takeoff", "mission.fuel_fraction", "aero.ld_cruise", "aero.cd0_cruise", "aero.k_cruise",
		"aero.wave_drag_cruise", "engine.tsfc_cruise", "stability.neutral_point", "stability.static_margin_cruise_start",
		"perf.takeoff_field_length", "engine.thrust_takeoff"}
	fixed := map[string]float64{"mission.range": 3e6, "cruise.altitude": 13000}
	ms := []float64{1 - 1e-8, 1 + 1e-8}
	res := lineOutputs(t, Swiftlet(), fixed, "cruise.mach", ms, outs...)
	for k, o := range outs {
		if relErr(res[1][k], res[0][k]) > 1e-3 {
			t.Errorf("%s: %.8g at M 1 − 1e-8, %.8g at M 1 + 1e-8", o, res[0][k], res[1][k])
		}
	}
}
