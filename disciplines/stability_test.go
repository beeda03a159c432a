package disciplines

import (
	"context"
	"errors"
	"math"
	"testing"

	"couplet/mdo"
)

func TestLambCoefficients(t *testing.T) {
	// Apparent-mass coefficients of prolate spheroids (Lamb,
	// "Hydrodynamics"; Munk's table, from memory), to three decimals.
	for _, c := range []struct{ f, k1, k2 float64 }{
		{4, 0.082, 0.860},
		{6, 0.045, 0.918},
		{10, 0.021, 0.960},
	} {
		k1, k2, err := LambCoefficients(c.f)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(k1-c.k1) > 1e-3 || math.Abs(k2-c.k2) > 1e-3 {
			t.Errorf("f=%g: k1 %.4f k2 %.4f, want %.3f %.3f", c.f, k1, k2, c.k1, c.k2)
		}
	}
	// slender limit: k2 − k1 → 1 (slender-body theory)
	k1, k2, _ := LambCoefficients(1000)
	if math.Abs(k2-k1-1) > 1e-4 {
		t.Errorf("f=1000: k2 − k1 = %g, want → 1", k2-k1)
	}
	if _, _, err := LambCoefficients(1); err == nil {
		t.Error("fineness 1 accepted")
	}
}

func TestNeutralPointLimits(t *testing.T) {
	// Wing alone: the neutral point is the wing's aerodynamic centre, a
	// quarter MAC subsonic and 45 % MAC supersonic (the middle of the
	// 40–50 % of Raymer, ch. 16; from memory).
	w := Longitudinal{WingArea: 100, WingAspect: 6, MAC: 4, MACX: 10, CLaWing: 4.5287, Mach: 0.3}
	if np, _ := w.NeutralPoint(); math.Abs(np-11) > 1e-12 {
		t.Errorf("subsonic wing alone: x_np %g, want 11", np)
	}
	w.Mach, w.CLaWing = 2, 2.3094
	if np, _ := w.NeutralPoint(); math.Abs(np-11.8) > 1e-12 {
		t.Errorf("supersonic wing alone: x_np %g, want 11.8", np)
	}
	// A tail moves the neutral point aft by the lift-weighted arm, with the
	// downwash 2CLα/(πA) (project reference slope A = 6 → 4.5287 /rad).
	tl := Longitudinal{WingArea: 100, WingAspect: 6, MAC: 4, MACX: 10, CLaWing: 4.5287, Mach: 0.3,
		TailArea: 25, TailArm: 15, TailMAC: 2, CLaTail: 3.5, TailEfficiency: 0.9}
	np, cla := tl.NeutralPoint()
	de := 2 * 4.5287 / (math.Pi * 6)
	th := 0.9 * 3.5 * 0.25 * (1 - de)
	if want := (4.5287*11 + th*26) / (4.5287 + th); math.Abs(np-want) > 1e-12 || math.Abs(cla-(4.5287+th)) > 1e-12 {
		t.Errorf("with tail: x_np %g, want %g", np, want)
	}
	// a fuselage moves it forward
	tl.FuselageTerm, _ = MunkFuselageTerm(30, 2.5)
	if npf, _ := tl.NeutralPoint(); !(npf < np) {
		t.Errorf("fuselage does not move the neutral point forward (%g vs %g)", npf, np)
	}
	// trim: CG at the wing aerodynamic centre and no pitching moment need no tail load;
	// a forward CG needs a download
	if l := tl.TailTrimLoad(4e5, 11, 2e4, 0); math.Abs(l) > 1e-9 {
		t.Errorf("tail load %g with CG on the ac", l)
	}
	if l := tl.TailTrimLoad(4e5, 10.5, 2e4, 0); !(l < 0) {
		t.Errorf("forward CG: tail load %g, want a download", l)
	}
}

func stabilityInputs() map[string]float64 {
	return map[string]float64{
		"wing.area": 120, "wing.aspect_ratio": 3.2, "wing.taper": 0.2, "wing.sweep": 45, "wing.span": 19.6,
		"wing.mac": 6.9, "wing.mac_x": 16.5, "fuselage.length": 34, "fuselage.diameter": 2.2,
		"htail.area": 22, "htail.arm": 13, "htail.span": 8.5, "htail.mac": 2.8,
		"aero.cla_cruise": 2.6, "aero.cla_low_speed": 3.1, "cruise.mach": 1.5,
		"aero.dynamic_pressure_cruise": stabilityTestDynamicPressure(),
		"cg.takeoff":                   18.6, "cg.cruise_start": 18.7, "cg.cruise_end": 18.4, "mass.cruise_start": 40000,
		"wing.box_torsional_stiffness": 2e8, "wing.box_bending_stiffness": 2e8, "dive.dynamic_pressure": 45000,
	}
}

// stabilityTestDynamicPressure is the dynamic pressure at Mach 1.5 and
// 15 500 m of the stability tests' cruise.
func stabilityTestDynamicPressure() float64 {
	a, err := StandardAtmosphere(15500)
	if err != nil {
		panic(err)
	}
	return a.DynamicPressure(1.5)
}

func stabilitySystem(t *testing.T, set map[string]float64) *mdo.Workspace {
	t.Helper()
	return analysed(t, stabilityInputs(), set, NewNeutralPoints(), NewStability(), NewWingDivergence())
}

func TestStabilitySystem(t *testing.T) {
	ws := stabilitySystem(t, nil)
	// the supersonic aerodynamic-centre shift puts the cruise neutral point
	// aft of the low-speed one
	if !(get(t, ws, "stability.neutral_point") > get(t, ws, "stability.neutral_point_low_speed")) {
		t.Error("cruise neutral point not aft of the low-speed one")
	}
	// plausible: margins within ±50 % MAC; forward CG → tail download
	for _, n := range []string{"stability.static_margin_takeoff", "stability.static_margin_cruise_start", "stability.static_margin_cruise_end"} {
		if v := get(t, ws, n); !(v > -0.5 && v < 0.5) {
			t.Errorf("%s = %g", n, v)
		}
	}
	if l := get(t, ws, "stability.tail_lift_cruise"); !(l < 0 && l > -0.3*40000*G0) {
		t.Errorf("tail lift %g N", l)
	}
	// static margin falls as the CG moves aft
	prev := math.Inf(1)
	for _, x := range []float64{17.5, 18.5, 19.5, 20.5} {
		sm := get(t, stabilitySystem(t, map[string]float64{"cg.cruise_start": x}), "stability.static_margin_cruise_start")
		if !(sm < prev) {
			t.Errorf("CG %g m: static margin %g not below %g", x, sm, prev)
		}
		prev = sm
	}
	// divergence: an aft-swept wing has margin; sweeping forward lowers q_D
	if m := get(t, ws, "stability.divergence_margin"); !(m > 0) {
		t.Errorf("aft-swept wing divergence margin %g", m)
	}
	q0 := get(t, stabilitySystem(t, map[string]float64{"wing.sweep": 0}), "stability.divergence_dynamic_pressure")
	q30 := get(t, stabilitySystem(t, map[string]float64{"wing.sweep": -30}), "stability.divergence_dynamic_pressure")
	if !(q30 < q0 && q0 < NoDivergence) {
		t.Errorf("q_D at −30° %g, at 0° %g", q30, q0)
	}
}

func TestStabilityRefusesBadInput(t *testing.T) {
	sys, err := mdo.NewSystem(NewNeutralPoints(), NewStability(), NewWingDivergence())
	if err != nil {
		t.Fatal(err)
	}
	ws := sys.NewWorkspace()
	var re *mdo.RangeError
	for _, c := range []struct {
		name string
		v    float64
	}{{"wing.sweep", -75}, {"cruise.mach", 2.6}, {"aero.dynamic_pressure_cruise", -1}, {"wing.area", 0}} {
		if err := ws.Set(c.name, c.v); !errors.As(err, &re) || re.Var != c.name {
			t.Errorf("%s = %g: err = %v, want a range error naming it", c.name, c.v, err)
		}
	}
}

func BenchmarkNeutralPointsCompute(b *testing.B) {
	n := NewNeutralPoints()
	in := defaultValues(n.Inputs())
	out := make([]float64, npNumOut)
	benchCompute(b, n, in, out)
}

func BenchmarkStabilityCompute(b *testing.B) {
	s := NewStability()
	in := defaultValues(s.Inputs())
	out := make([]float64, stNumOut)
	benchCompute(b, s, in, out)
}

// One System shared by goroutines, each with its own workspace, gives the
// serial results (the disciplines keep no state; run with -race).
func TestDisciplinesShareAcrossWorkspaces(t *testing.T) {
	sys, err := mdo.NewSystem(append(newWeightsPair(), NewNeutralPoints(), NewStability(), NewWingDivergence())...)
	if err != nil {
		t.Fatal(err)
	}
	in := weightsInputs()
	for k, v := range stabilityInputs() {
		if sys.IsParameter(k) {
			in[k] = v
		}
	}
	run := func(scale float64) ([]float64, error) {
		ws := sys.NewWorkspace()
		for k, v := range in {
			if err := ws.Set(k, v); err != nil {
				return nil, err
			}
		}
		if err := ws.Set("wing.area", 120*scale); err != nil {
			return nil, err
		}
		for i := 0; i < 50; i++ {
			if err := ws.Analyze(context.Background()); err != nil {
				return nil, err
			}
		}
		return append([]float64(nil), ws.Values()...), nil
	}
	want := make([][]float64, 4)
	for g := range want {
		if want[g], err = run(1 + 0.05*float64(g)); err != nil {
			t.Fatal(err)
		}
	}
	got := make([][]float64, 4)
	errs := make([]error, 4)
	done := make(chan int)
	for g := 0; g < 4; g++ {
		go func(g int) {
			got[g], errs[g] = run(1 + 0.05*float64(g))
			done <- g
		}(g)
	}
	for range got {
		<-done
	}
	for g := range got {
		if errs[g] != nil {
			t.Fatal(errs[g])
		}
		for i := range got[g] {
			if got[g][i] != want[g][i] {
				t.Fatalf("workspace %d: %s = %g concurrently, %g serially", g, sys.Vars().At(i).Name, got[g][i], want[g][i])
			}
		}
	}
}
